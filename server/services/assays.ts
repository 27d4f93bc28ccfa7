import { writeTx } from '../../db/client';
import type { Assay } from '../../src/contracts/assays';
import type { SessionUser } from '../../src/contracts/session';
import { notFound } from '../http-error';
import { findLotAssay, insertAssay, listAssayPoints } from '../repositories/assays';
import { findSiteEnzyme } from '../repositories/enzymes';
import { findSiteLot } from '../repositories/lots';
import type { Services } from '../context';
import { runImport, type ImportTask } from '../imports';
import { assayPointsCsv } from './assay-csv';
import { appendAudit } from './audit';
import { listLotAssayViews } from './lots';

type AssayJob = Extract<ImportTask, { kind: 'assay-csv' | 'assay-table' }>;
type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

/** Checks the rows and fits them about the enzyme's reference temperature on the import worker, then stores them, audited. */
export async function addAssay(
  { db, clock }: Services,
  u: SessionUser,
  lotId: number,
  job: () => DistributiveOmit<AssayJob, 'tRefC'>,
  fileName: string | null,
): Promise<Assay> {
  const found = await findSiteLot(db, u.siteId, lotId);
  if (!found) throw notFound('Lot');
  const enzyme = (await findSiteEnzyme(db, u.siteId, found.lot.enzymeId))!;
  // Read after the lot check, so another site's lot id answers 404 whatever the file holds.
  const task = job();
  const source = task.kind === 'assay-csv' ? 'csv' : 'table';
  const { checked, fit: result } = await runImport({ ...task, tRefC: enzyme.tRefC } as AssayJob);
  const now = clock.now();
  const id = await writeTx(db, async (tx) => {
    const row = await insertAssay(
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
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'assay.create',
      entity: 'lot',
      entityId: lotId,
      newValue: {
        assayId: row.id,
        source,
        fileName,
        points: checked.points.length,
        scale: checked.scale,
        kdRefPerH: result.fit?.kdRefPerH ?? null,
        edKJPerMol: result.fit?.edKJPerMol ?? null,
        fitProblem: result.problem,
      },
      at: now,
    });
    return row.id;
  });
  return (await listLotAssayViews(db, u, lotId, enzyme.specTempC)).find((a) => a.id === id)!;
}

/** All points of one assay as CSV, text cells escaped against spreadsheet formulas. */
export async function exportAssayCsv({ db }: Services, u: SessionUser, lotId: number, assayId: number): Promise<{ fileName: string; csv: string }> {
  const found = await findSiteLot(db, u.siteId, lotId);
  if (!found) throw notFound('Lot');
  const assay = await findLotAssay(db, u.siteId, lotId, assayId);
  if (!assay) throw notFound('Assay');
  return { fileName: `${found.lot.lotCode.replace(/[^\w.-]/g, '_')}-assay-${assay.id}.csv`, csv: assayPointsCsv(await listAssayPoints(db, assay.id)) };
}
