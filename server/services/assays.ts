import { writeTx, type Db } from '../../db/client';
import type { Assay } from '../../src/contracts/assays';
import type { SessionUser } from '../../src/contracts/session';
import { fitAssay } from '../../src/stability';
import { notFound } from '../http-error';
import { findLotAssay, insertAssay, listAssayPoints } from '../repositories/assays';
import { findSiteEnzyme } from '../repositories/enzymes';
import { findSiteLot } from '../repositories/lots';
import type { Services } from '../routes/services';
import { assayPointsCsv, type CheckedAssay } from './assay-csv';
import { appendAudit } from './audit';
import { listLotAssayViews } from './lots';

/** Stores checked points with the engine's fit about the enzyme's reference temperature, audited. */
export function addAssay({ db, clock }: Services, u: SessionUser, lotId: number, read: () => CheckedAssay, source: 'csv' | 'table', fileName: string | null): Assay {
  const found = findSiteLot(db, u.siteId, lotId);
  if (!found) throw notFound('Lot');
  // Read after the lot check, so another site's lot id answers 404 whatever the file holds.
  const checked = read();
  const enzyme = findSiteEnzyme(db, u.siteId, found.lot.enzymeId)!;
  const result = fitAssay(
    enzyme.tRefC,
    checked.points.map((p) => ({ c: p.tempC, h: p.timeH, residual: p.residual })),
  );
  const now = clock.now();
  const id = writeTx(db, (tx) => {
    const row = insertAssay(
      tx,
      {
        siteId: u.siteId,
        lotId,
        source,
        fileName,
        scale: checked.scale,
        scaleNote: checked.scaleNote,
        fit: result.fit,
        fitProblem: result.problem,
        pointCount: checked.points.length,
        createdBy: u.id,
        createdAt: now.toISOString(),
      },
      checked.points,
    );
    appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'assay.create',
      entity: 'lot',
      entityId: lotId,
      newValue: { assayId: row.id, source, fileName, points: checked.points.length, scale: checked.scale, kdRefPerH: result.fit?.kdRefPerH ?? null, edKJPerMol: result.fit?.edKJPerMol ?? null, fitProblem: result.problem },
      at: now,
    });
    return row.id;
  });
  return listLotAssayViews(db, u, lotId, enzyme.specTempC).find((a) => a.id === id)!;
}

/** All points of one assay as CSV, text cells escaped against spreadsheet formulas. */
export function exportAssayCsv({ db }: Services, u: SessionUser, lotId: number, assayId: number): { fileName: string; csv: string } {
  const found = findSiteLot(db, u.siteId, lotId);
  if (!found) throw notFound('Lot');
  const assay = findLotAssay(db, u.siteId, lotId, assayId);
  if (!assay) throw notFound('Assay');
  return { fileName: `${found.lot.lotCode.replace(/[^\w.-]/g, '_')}-assay-${assay.id}.csv`, csv: assayPointsCsv(listAssayPoints(db, assay.id)) };
}

