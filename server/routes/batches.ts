import express, { Router } from 'express';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { IdParam } from './params';
import {
  Batch,
  BatchClose,
  BatchDetail,
  BatchList,
  BatchSettings,
  BatchSettingsPatch,
  BatchStart,
  ImportProgress,
  ImportQuery,
  ImportResult,
  MAX_IMPORT_BYTES,
  ReadingInput,
  ReadingResult,
  ReadingsPage,
  ReadingsPageQuery,
} from '../../src/contracts/batches';
import { HttpError } from '../http-error';
import { allow, currentUser } from '../middleware/auth';
import { getBatchDetail } from '../services/batch-detail';
import { batchReportCsv } from '../services/batch-report';
import { batchSettingsOf, changeBatchSettings, closeBatch, listBatches, startBatch } from '../services/batches';
import { importProgress, importReadings } from '../services/reading-import';
import { getReadingsPage, readingIngest } from '../services/readings';
import type { AppContext } from '../context';

// A historian export of a long batch at one reading a second runs to several megabytes. Kept as bytes: the
// import worker finds the file's encoding (UTF-8, UTF-16, Latin-1) itself; the limit is checked as it streams in.
const csvBody = express.raw({ type: ['text/csv', 'text/plain', 'application/csv'], limit: MAX_IMPORT_BYTES });

export function batchesRouter(s: AppContext): Router {
  const router = Router();
  const readings = readingIngest(s);
  router.get('/', allow('batches.read'), async (req, res) => {
    res.json(BatchList.parse({ batches: await listBatches(s, currentUser(req)) }));
  });
  router.post('/', allow('batches.start'), async (req, res) => {
    res.status(201).json(Batch.parse(await startBatch(s, currentUser(req), BatchStart.parse(req.body))));
  });
  router.get('/settings', allow('batches.read'), async (req, res) => {
    res.json(BatchSettings.parse(await batchSettingsOf(s.db, currentUser(req).siteId)));
  });
  router.patch('/settings', allow('batches.settings'), async (req, res) => {
    res.json(BatchSettings.parse(await changeBatchSettings(s, currentUser(req), BatchSettingsPatch.parse(req.body))));
  });
  router.get('/:id', allow('batches.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(BatchDetail.parse(await getBatchDetail(s, currentUser(req), id)));
  });
  router.get('/:id/readings', allow('batches.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(ReadingsPage.parse(await getReadingsPage(s, currentUser(req), id, ReadingsPageQuery.parse(req.query))));
  });
  router.post('/:id/readings', allow('readings.log'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { created, result } = await readings.log(currentUser(req), id, ReadingInput.parse(req.body));
    res.status(created ? 201 : 200).json(ReadingResult.parse(result));
  });
  router.post('/:id/readings/import', allow('readings.log'), csvBody, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    if (!Buffer.isBuffer(req.body)) throw new HttpError(400, 'invalid_input', 'Send the historian export as text/csv', { file: 'Expected a CSV file' });
    res.json(ImportResult.parse(await importReadings(s, currentUser(req), id, req.body, ImportQuery.parse(req.query))));
  });
  router.get('/:id/readings/import', allow('readings.log'), async (req, res) => {
    res.json(ImportProgress.parse(await importProgress(s, currentUser(req), IdParam.parse(req.params).id)));
  });
  router.post('/:id/close', allow('batches.close'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Batch.parse(await closeBatch(s, currentUser(req), id, BatchClose.parse(req.body))));
  });
  router.get('/:id/report.csv', allow('batches.read'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { filename, parts } = await batchReportCsv(s, currentUser(req), id);
    res.type('text/csv').attachment(filename);
    await pipeline(Readable.from(parts), res);
  });
  return router;
}
