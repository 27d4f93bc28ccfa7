import { writeTx, type Db } from '../../db/client';
import { closedBatch, MEASUREMENT_REL_SD, proposeCalibration, type ClosedBatch } from '../../src/batches/calibration';
import type {
  Calibration,
  CalibrationAccept,
  CalibrationExclusion,
  CalibrationQuery,
  CalibrationSettings,
  CalibrationSettingsPatch,
  CalibrationView,
} from '../../src/contracts/calibrations';
import type { SessionUser } from '../../src/contracts/session';
import { ModelInputError } from '../../src/model';
import { lotKinetics } from '../../src/planning';
import { HttpError, notFound } from '../http-error';
import { readingPoints } from '../repositories/batches';
import {
  calibrationIdsIn,
  closedBatchesOf,
  deleteExclusion,
  findCalibration,
  findCalibrationSettings,
  findExclusion,
  findSiteCalibration,
  insertCalibration,
  insertExclusion,
  listExclusions,
  setCalibrationState,
  upsertCalibrationSettings,
  type CalibrationJoined,
} from '../repositories/calibrations';
import { findSiteBatch } from '../repositories/batches';
import { findSiteEnzyme, findSiteLot, findSiteRecipe } from '../repositories/recipes';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { planningLot } from './evidence';

const toCalibration = ({ calibration: c, decidedBy }: CalibrationJoined): Calibration => ({
  id: c.id,
  recipeId: c.recipeId,
  lotId: c.lotId,
  state: c.state,
  createdAt: c.createdAt,
  decidedBy: decidedBy ?? null,
  decidedAt: c.decidedAt,
  batchIds: c.batchIds,
  result: c.result,
});

/**
 * Proposes a new calibration of a recipe and lot from all its closed batches, replacing the previous proposal.
 * Nothing else changes: plans use a calibration only once the engineer accepts it. Computed before the write so
 * the transaction stays short; an engine refusal leaves the previous proposal in place and says why in the audit.
 */
export async function recalibrate(db: Db, u: SessionUser, recipeId: number, lotId: number, now: Date): Promise<Calibration | null> {
  const recipe = (await findSiteRecipe(db, u.siteId, recipeId))?.recipe;
  const lotRow = await findSiteLot(db, u.siteId, lotId);
  if (!recipe || !lotRow) return null;
  const enzyme = (await findSiteEnzyme(db, u.siteId, recipe.enzymeId))!;
  const lot = await planningLot(db, u.siteId, lotRow, recipeId);
  const closed: ClosedBatch[] = [];
  for (const b of await closedBatchesOf(db, u.siteId, recipeId, lotId)) closed.push(closedBatch(b, await readingPoints(db, b.id)));
  const excluded = (await listExclusions(db, u.siteId)).map((e) => ({ batchId: e.batchId, reason: e.reason, by: e.by, at: e.at }));
  let proposal: ReturnType<typeof proposeCalibration> = null;
  let problem: string | null = null;
  try {
    proposal = proposeCalibration({
      recipe,
      enzyme,
      lot,
      batches: closed,
      excluded,
      measurementRelSd: (await calibrationSettingsOf(db, u.siteId)).measurementRelSd,
    });
  } catch (e) {
    if (!(e instanceof ModelInputError)) throw e;
    problem = `${e.field}: ${e.rule}`;
  }
  return writeTx(db, async (tx) => {
    if (!proposal) {
      if (problem)
        await appendAudit(tx, {
          siteId: u.siteId,
          userId: u.id,
          actor: u.email,
          action: 'calibration.refused',
          entity: 'recipe',
          entityId: recipeId,
          newValue: { lotId, problem },
          at: now,
        });
      return null;
    }
    for (const id of await calibrationIdsIn(tx, u.siteId, recipeId, lotId, 'proposed')) await setCalibrationState(tx, id, { state: 'superseded' });
    const row = await insertCalibration(tx, {
      siteId: u.siteId,
      recipeId,
      lotId,
      state: 'proposed',
      batchIds: proposal.batchIds,
      result: proposal.result,
      createdAt: now.toISOString(),
    });
    const outliers = proposal.result.batches.filter((b) => b.isOutlier).map((b) => b.batchId);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'calibration.propose',
      entity: 'calibration',
      entityId: row.id,
      newValue: { recipeId, lotId, batchIds: proposal.batchIds, outliers, posterior: proposal.result.posterior },
      at: now,
    });
    return toCalibration((await findSiteCalibration(tx, u.siteId, row.id))!);
  });
}

export async function getCalibrationView({ db }: Services, u: SessionUser, q: CalibrationQuery): Promise<CalibrationView> {
  const found = await findSiteRecipe(db, u.siteId, q.recipeId);
  const lotRow = await findSiteLot(db, u.siteId, q.lotId);
  if (!found) throw notFound('Recipe');
  if (!lotRow) throw notFound('Lot');
  const enzyme = (await findSiteEnzyme(db, u.siteId, found.recipe.enzymeId))!;
  const proposed = await findCalibration(db, u.siteId, q.recipeId, q.lotId, 'proposed');
  const accepted = await findCalibration(db, u.siteId, q.recipeId, q.lotId, 'accepted');
  const inUse = lotKinetics(found.recipe, enzyme.tRefC, await planningLot(db, u.siteId, lotRow, q.recipeId)).evidence.text;
  return {
    recipeId: q.recipeId,
    lotId: q.lotId,
    proposed: proposed ? toCalibration(proposed) : null,
    accepted: accepted ? toCalibration(accepted) : null,
    inUse,
  };
}

/** The engineer's decision: a proposed calibration becomes the one plans use, audited with the batches it used. */
export async function acceptCalibration({ db, clock }: Services, u: SessionUser, id: number, input: CalibrationAccept): Promise<Calibration> {
  const found = await findSiteCalibration(db, u.siteId, id);
  if (!found) throw notFound('Calibration');
  const c = found.calibration;
  if (c.state !== 'proposed') throw new HttpError(409, 'calibration_not_proposed', `This calibration is ${c.state}; only the current proposal can be accepted`);
  const now = clock.now();
  return writeTx(db, async (tx) => {
    const previous = await calibrationIdsIn(tx, u.siteId, c.recipeId, c.lotId, 'accepted');
    for (const old of previous) await setCalibrationState(tx, old, { state: 'superseded' });
    await setCalibrationState(tx, id, { state: 'accepted', decidedBy: u.id, decidedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'calibration.accept',
      entity: 'calibration',
      entityId: id,
      oldValue: { state: 'proposed', supersedes: previous },
      newValue: {
        state: 'accepted',
        recipeId: c.recipeId,
        lotId: c.lotId,
        batchIds: c.batchIds,
        posterior: c.result.posterior,
        comment: input.comment ?? null,
      },
      at: now,
    });
    return toCalibration((await findSiteCalibration(tx, u.siteId, id))!);
  });
}

/** Leaves a closed batch out of calibration (or takes it back in), with the reason, audited; then proposes anew. */
export async function setExclusion({ db, clock }: Services, u: SessionUser, input: CalibrationExclusion): Promise<CalibrationView> {
  const j = await findSiteBatch(db, u.siteId, input.batchId);
  if (!j) throw new HttpError(400, 'invalid_input', 'No such batch at this site', { batchId: 'No such batch at this site' });
  if (j.batch.state !== 'closed') throw new HttpError(409, 'batch_running', 'Only a closed batch is calibration evidence');
  const now = clock.now();
  const existing = await findExclusion(db, j.batch.id);
  if (input.isExcluded === !!existing) throw new HttpError(409, 'no_change', input.isExcluded ? 'This batch is already left out' : 'This batch is already in');
  await writeTx(db, async (tx) => {
    if (input.isExcluded)
      await insertExclusion(tx, { siteId: u.siteId, batchId: j.batch.id, reason: input.reason, excludedBy: u.id, excludedAt: now.toISOString() });
    else await deleteExclusion(tx, j.batch.id);
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: input.isExcluded ? 'calibration.exclude_batch' : 'calibration.include_batch',
      entity: 'batch',
      entityId: j.batch.id,
      oldValue: existing ? { reason: existing.reason } : null,
      newValue: { reason: input.reason, recipeId: j.batch.recipeId, lotId: j.batch.lotId },
      at: now,
    });
  });
  await recalibrate(db, u, j.batch.recipeId, j.batch.lotId, now);
  return await getCalibrationView({ db, clock }, u, { recipeId: j.batch.recipeId, lotId: j.batch.lotId });
}

/** The site's measurement spread for calibration, or the stated default. */
export async function calibrationSettingsOf(db: Db, siteId: number): Promise<CalibrationSettings> {
  return { measurementRelSd: (await findCalibrationSettings(db, siteId))?.measurementRelSd ?? MEASUREMENT_REL_SD };
}

/** The admin sets the measurement spread, audited; proposals computed from then on use it (earlier ones keep theirs, stated with them). */
export async function changeCalibrationSettings({ db, clock }: Services, u: SessionUser, patch: CalibrationSettingsPatch): Promise<CalibrationSettings> {
  const before = await calibrationSettingsOf(db, u.siteId);
  const now = clock.now();
  await writeTx(db, async (tx) => {
    await upsertCalibrationSettings(tx, { siteId: u.siteId, measurementRelSd: patch.measurementRelSd, updatedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'calibration_settings.update',
      entity: 'calibration_settings',
      entityId: u.siteId,
      oldValue: before,
      newValue: patch,
      at: now,
    });
  });
  return { ...patch };
}
