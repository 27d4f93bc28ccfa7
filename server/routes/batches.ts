import express, { Router } from 'express';
import { Readable } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import { z } from 'zod';
import {
  Batch,
  BATCH_READERS,
  BATCH_STARTERS,
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
  READING_LOGGERS,
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
import type { Services } from './services';

const IdParam = z.object({ id: z.coerce.number().int().positive() });
// A historian export of a long batch at one reading a second runs to several megabytes. Kept as bytes: the
// import worker finds the file's encoding (UTF-8, UTF-16, Latin-1) itself; the limit is checked as it streams in.
const csvBody = express.raw({ type: ['text/csv', 'text/plain', 'application/csv'], limit: MAX_IMPORT_BYTES });

export function batchesRouter(s: Services): Router {
  const router = Router();
  const readings = readingIngest(s);
  router.get('/', allow(...BATCH_READERS), (req, res) => {
    res.json(BatchList.parse({ batches: listBatches(s, currentUser(req)) }));
  });
  router.post('/', allow(...BATCH_STARTERS), (req, res) => {
    res.status(201).json(Batch.parse(startBatch(s, currentUser(req), BatchStart.parse(req.body))));
  });
  router.get('/settings', allow(...BATCH_READERS), (req, res) => {
    res.json(BatchSettings.parse(batchSettingsOf(s.db, currentUser(req).siteId)));
  });
  router.patch('/settings', allow('supervisor', 'admin'), (req, res) => {
    res.json(BatchSettings.parse(changeBatchSettings(s, currentUser(req), BatchSettingsPatch.parse(req.body))));
  });
  router.get('/:id', allow(...BATCH_READERS), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(BatchDetail.parse(getBatchDetail(s, currentUser(req), id)));
  });
  router.get('/:id/readings', allow(...BATCH_READERS), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(ReadingsPage.parse(getReadingsPage(s, currentUser(req), id, ReadingsPageQuery.parse(req.query))));
  });
  router.post('/:id/readings', allow(...READING_LOGGERS), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { created, result } = await readings.log(currentUser(req), id, ReadingInput.parse(req.body));
    res.status(created ? 201 : 200).json(ReadingResult.parse(result));
  });
  router.post('/:id/readings/import', allow(...READING_LOGGERS), csvBody, async (req, res) => {
    const { id } = IdParam.parse(req.params);
    if (!Buffer.isBuffer(req.body)) throw new HttpError(400, 'invalid_input', 'Send the historian export as text/csv', { file: 'Expected a CSV file' });
    res.json(ImportResult.parse(await importReadings(s, currentUser(req), id, req.body, ImportQuery.parse(req.query))));
  });
  router.get('/:id/readings/import', allow(...READING_LOGGERS), (req, res) => {
    res.json(ImportProgress.parse(importProgress(s, currentUser(req), IdParam.parse(req.params).id)));
  });
  router.post('/:id/close', allow(...BATCH_STARTERS), (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(Batch.parse(closeBatch(s, currentUser(req), id, BatchClose.parse(req.body))));
  });
  router.get('/:id/report.csv', allow(...BATCH_READERS), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const { filename, parts } = batchReportCsv(s, currentUser(req), id);
    res.type('text/csv').attachment(filename);
    await pipeline(Readable.from(parts), res);
  });
  return router;
}
