import { Router } from 'express';
import { IdParam, RowId } from './params';
import { Assay, AssayTableInput, AssayUpload, MAX_ASSAY_BYTES } from '../../src/contracts/assays';
import { CertificateFile, Lot, LotDecision, LotDetail, LotInput, LotList, LotQuery } from '../../src/contracts/lots';
import { allow, currentUser } from '../middleware/auth';
import { singleFile } from '../middleware/upload';
import { ASSAY_TEMPLATE_CSV } from '../services/assay-csv';
import { addAssay, exportAssayCsv } from '../services/assays';
import { attachCertificate, createLot, decideLot, getLot, listLots, MAX_CERTIFICATE_BYTES, readCertificate } from '../services/lots';
import type { AppContext } from '../context';

const AssayParam = IdParam.extend({ assayId: RowId });

const attachment = (name: string) => `attachment; filename="${name.replace(/["\\\r\n]/g, '_')}"`;

export function lotsRouter(s: AppContext): Router {
  const router = Router();
  router.get('/', allow('lots.read'), async (req, res) => {
    res.json(LotList.parse({ lots: await listLots(s, currentUser(req), LotQuery.parse(req.query)) }));
  });
  router.post('/', allow('lots.edit'), async (req, res) => {
    res.status(201).json(Lot.parse(await createLot(s, currentUser(req), LotInput.parse(req.body))));
  });
  router.get('/assay-template', allow('lots.read'), (_req, res) => {
    res.type('text/csv').set('content-disposition', attachment('assay-template.csv')).send(ASSAY_TEMPLATE_CSV);
  });
  router.get('/:id', allow('lots.read'), async (req, res) => {
    res.json(LotDetail.parse(await getLot(s, currentUser(req), IdParam.parse(req.params).id)));
  });
  router.post('/:id/decision', allow('lots.decide'), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.json(LotDetail.parse(await decideLot(s, currentUser(req), id, LotDecision.parse(req.body))));
  });
  router.post('/:id/certificate', allow('lots.edit'), singleFile('file', MAX_CERTIFICATE_BYTES), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    res.status(201).json(CertificateFile.parse(await attachCertificate(s, currentUser(req), id, req.file)));
  });
  router.get('/:id/certificate', allow('lots.read'), async (req, res) => {
    const { file, bytes } = await readCertificate(s, currentUser(req), IdParam.parse(req.params).id);
    res
      .type(file.mimeType)
      .set({ 'content-disposition': attachment(file.fileName), 'x-sha256': file.sha256 })
      .send(bytes);
  });
  // A CSV file (multipart, field "file", optional field "scale") or the editable table's rows (JSON); both are checked the same way.
  router.post('/:id/assays', allow('lots.edit'), singleFile('file', MAX_ASSAY_BYTES), async (req, res) => {
    const { id } = IdParam.parse(req.params);
    const file = req.file;
    const assay = file
      ? await addAssay(
          s,
          currentUser(req),
          id,
          () => ({ kind: 'assay-csv', bytes: file.buffer, scale: AssayUpload.parse(req.body ?? {}).scale }),
          file.originalname.slice(0, 120),
        )
      : await addAssay(s, currentUser(req), id, () => ({ kind: 'assay-table', input: AssayTableInput.parse(req.body) }), null);
    res.status(201).json(Assay.parse(assay));
  });
  router.get('/:id/assays/:assayId/csv', allow('lots.read'), async (req, res) => {
    const { id, assayId } = AssayParam.parse(req.params);
    const { fileName, csv } = await exportAssayCsv(s, currentUser(req), id, assayId);
    res.type('text/csv').set('content-disposition', attachment(fileName)).send(csv);
  });
  return router;
}
