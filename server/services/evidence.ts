// The lot's evidence as every computation reads it: assay fit, accepted calibration, and whether a stored plan
// was computed on evidence that has since been replaced.
import type { Db } from '../../db/client';
import type { PlanningLot } from '../../src/contracts/recipes';
import type { Plan } from '../../src/contracts/plans';
import { findCalibration, newestLotFit } from '../repositories/calibrations';
import type { findSiteLot } from '../repositories/recipes';

type LotRow = NonNullable<Awaited<ReturnType<typeof findSiteLot>>>;

/** A lot for planning a recipe: its certificate, newest assay fit and the calibration accepted for this recipe. */
export async function planningLot(db: Db, siteId: number, l: LotRow, recipeId: number): Promise<PlanningLot> {
  const f = await newestLotFit(db, siteId, l.id);
  const c = await findCalibration(db, siteId, recipeId, l.id, 'accepted');
  return {
    id: l.id,
    lotCode: l.lotCode,
    certKdPerH: l.certKdPerH,
    certTempC: l.certTempC,
    expiresOn: l.expiresOn,
    fit: f?.fit ? { assayId: f.id, createdAt: f.createdAt, fit: f.fit } : null,
    calibration: c
      ? {
          id: c.calibration.id,
          acceptedAt: c.calibration.decidedAt ?? c.calibration.createdAt,
          acceptedBy: c.decidedBy ?? 'unknown',
          batchCount: c.calibration.batchIds.length,
          fitAssayId: c.calibration.result.prior.fitAssayId,
          ...c.calibration.result.posterior,
        }
      : null,
  };
}

/** Why a stored plan is on older evidence than its lot now has, or null; the plan itself is never recomputed. */
export async function olderEvidence(db: Db, siteId: number, p: Pick<Plan, 'recipeId' | 'outputs'> & { lotId: number }): Promise<string | null> {
  const used = p.outputs.kinetics.evidence;
  const fit = await newestLotFit(db, siteId, p.lotId);
  const cal = await findCalibration(db, siteId, p.recipeId, p.lotId, 'accepted');
  const fitId = fit?.fit ? fit.id : null;
  const calId = cal && cal.calibration.result.prior.fitAssayId === fitId ? cal.calibration.id : null;
  if ((used?.fitAssayId ?? null) !== fitId)
    return `Computed on older evidence: the lot has ${fitId === null ? 'no assay fit now' : `a newer assay fit (${fit!.createdAt.slice(0, 10)})`}. Compute a new plan to use it.`;
  if ((used?.calibrationId ?? null) !== calId)
    return `Computed on older evidence: ${calId === null ? 'the calibration it used is no longer in use' : `a newer calibration was accepted (${(cal!.calibration.decidedAt ?? '').slice(0, 10)})`}. Compute a new plan to use it.`;
  return null;
}
