// Batches: start on the release in effect, close with the measured product, the list, and the site's band and gap
// settings. Readings, deviations, the batch page and the report have their own modules beside this one.
import { writeTx, type Db } from '../../db/client';
import { batchProgram } from '../../src/batches';
import {
  CLOCK_SKEW_MIN,
  DEFAULT_BATCH_SETTINGS,
  type Batch,
  type BatchClose,
  type BatchSettings,
  type BatchSettingsPatch,
  type BatchStart,
  type BatchSummary,
} from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError, notFound } from '../http-error';
import { statusNow } from './batch-record';
import {
  batchesLoggedBy,
  countActiveDeviations,
  findBatchSettings,
  findSiteBatch,
  insertBatch,
  lastReadingTimes,
  listDeviations,
  listSiteBatches,
  runningBatchOnVessel,
  updateBatch,
  upsertBatchSettings,
  type BatchJoined,
} from '../repositories/batches';
import { findSiteEnzyme, findSiteRecipe } from '../repositories/recipes';
import { findSiteVessel } from '../repositories/vessels';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { getPlan } from './plans';
import { recalibrate } from './calibrations';
import { planningLot } from './evidence';
import { acceptedLot } from './lots';
import { releaseInEffect } from './recipes';

// A batch may be registered after it started (the paperwork follows the vessel), but not a week late.
const LATE_START_LIMIT_H = 7 * 24;

// Settings -----------------------------------------------------------------------------------------------

export async function batchSettingsOf(db: Db, siteId: number): Promise<BatchSettings> {
  const row = await findBatchSettings(db, siteId);
  return row ? { toleranceC: row.toleranceC, gapLimitMin: row.gapLimitMin } : { ...DEFAULT_BATCH_SETTINGS };
}

export async function changeBatchSettings({ db, clock }: Services, u: SessionUser, patch: BatchSettingsPatch): Promise<BatchSettings> {
  const before = await batchSettingsOf(db, u.siteId);
  const after = { ...before, ...patch };
  const now = clock.now();
  await writeTx(db, async (tx) => {
    await upsertBatchSettings(tx, { siteId: u.siteId, ...after, updatedAt: now.toISOString() });
    await appendAudit(tx, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'batch_settings.update',
      entity: 'batch_settings',
      entityId: u.siteId,
      oldValue: before,
      newValue: after,
      at: now,
    });
  });
  return after;
}

// Mapping and loading -----------------------------------------------------------------------------------

export const toBatch = (j: BatchJoined, isMine: boolean): Batch => ({
  id: j.batch.id,
  recipeId: j.batch.recipeId,
  recipeName: j.recipeName,
  vesselId: j.batch.vesselId,
  vesselName: j.vesselName,
  lotId: j.batch.lotId,
  lotCode: j.lotCode,
  state: j.batch.state,
  startedAt: j.batch.startedAt,
  startedBy: j.startedBy,
  closedAt: j.batch.closedAt,
  closedBy: j.closedBy,
  closeComment: j.batch.closeComment,
  measuredProductGPerL: j.batch.measuredProductGPerL,
  forecastAtCloseGPerL: j.batch.forecastAtCloseGPerL,
  program: j.batch.program,
  isMine,
});

export async function loadBatch(db: Db, siteId: number, id: number): Promise<BatchJoined> {
  const found = await findSiteBatch(db, siteId, id);
  if (!found) throw notFound('Batch');
  return found;
}

export async function runningBatch(db: Db, siteId: number, id: number): Promise<BatchJoined> {
  const j = await loadBatch(db, siteId, id);
  if (j.batch.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is closed; readings can no longer be added');
  return j;
}

// Reads --------------------------------------------------------------------------------------------------

export async function listBatches({ db, clock }: Services, u: SessionUser): Promise<BatchSummary[]> {
  const rows = await listSiteBatches(db, u.siteId);
  const ids = rows.map((r) => r.batch.id);
  const logged = new Set(await batchesLoggedBy(db, u.id, ids));
  const active = new Map((await countActiveDeviations(db, ids)).map((r) => [r.batchId, r.n]));
  const last = new Map((await lastReadingTimes(db, ids)).map((r) => [r.batchId, r.last]));
  const now = clock.now().toISOString();
  const out: BatchSummary[] = [];
  for (const j of rows) {
    const b = j.batch;
    const forecast = b.state === 'closed' && b.forecastAtCloseGPerL !== null ? b.forecastAtCloseGPerL : (await statusNow(db, b, now)).forecastGPerL;
    out.push({
      id: b.id,
      recipeName: j.recipeName,
      vesselName: j.vesselName,
      lotCode: j.lotCode,
      source: b.source,
      state: b.state,
      startedAt: b.startedAt,
      closedAt: b.closedAt,
      batchH: b.program.batchH,
      isMine: b.startedBy === u.id || logged.has(b.id),
      openDeviations: active.get(b.id) ?? 0,
      lastReadingAt: last.get(b.id) ?? null,
      plannedProductGPerL: b.program.plannedProductGPerL,
      forecastGPerL: forecast,
      measuredProductGPerL: b.measuredProductGPerL,
    });
  }
  return out;
}

// Start and close ----------------------------------------------------------------------------------------

export async function startBatch({ db, clock }: Services, u: SessionUser, input: BatchStart): Promise<Batch> {
  const found = await findSiteRecipe(db, u.siteId, input.recipeId);
  if (!found) throw new HttpError(400, 'invalid_input', 'No such recipe at this site', { recipeId: 'Choose a recipe' });
  const { recipe } = found;
  const vessel = await findSiteVessel(db, u.siteId, input.vesselId);
  if (!vessel) throw new HttpError(400, 'invalid_input', 'No such vessel at this site', { vesselId: 'Choose a vessel' });
  const lot = await acceptedLot(db, u.siteId, input.lotId);
  if (lot.enzymeId !== recipe.enzymeId)
    throw new HttpError(400, 'invalid_input', 'The lot is of another enzyme', { lotId: `Choose a lot of ${found.enzymeName}` });
  const now = clock.now();
  const startMs = Date.parse(input.startedAt);
  if (startMs > now.getTime() + CLOCK_SKEW_MIN * 60_000)
    throw new HttpError(400, 'invalid_input', 'The start is in the future', { startedAt: 'A batch cannot start in the future' });
  if (startMs < now.getTime() - LATE_START_LIMIT_H * 3_600_000)
    throw new HttpError(400, 'invalid_input', 'The start is more than a week ago', { startedAt: 'At most a week ago' });
  if (await runningBatchOnVessel(db, u.siteId, vessel.id))
    throw new HttpError(409, 'vessel_busy', `${vessel.name} already has a running batch`, { vesselId: 'This vessel already has a running batch' });
  // The release in effect on the batch's start day, not necessarily the newest approval (its date may be ahead).
  const release = await releaseInEffect(db, recipe, new Date(startMs), u.siteTimeZone);
  const plan = release.planId ? await getPlan({ db, clock }, u, release.planId) : null;
  const enzyme = (await findSiteEnzyme(db, u.siteId, recipe.enzymeId))!;
  const program = batchProgram({
    recipe: { ...recipe, currentSetpointC: release.setpointC },
    enzyme,
    lot: await planningLot(db, u.siteId, lot, recipe.id),
    vessel,
    plan,
  });
  const temps = program.stages.map((s) => s.c);
  if (Math.min(...temps) < vessel.minC || Math.max(...temps) > vessel.maxC)
    throw new HttpError(
      400,
      'plan_outside_vessel',
      `The ${program.source === 'released_plan' ? 'released plan' : 'current setpoint'} lies outside ${vessel.name}'s range of ${vessel.minC}-${vessel.maxC} °C`,
      { vesselId: 'The plan does not fit this vessel' },
    );
  const startedAt = new Date(startMs).toISOString();
  return writeTx(db, async (t) => {
    const row = await insertBatch(t, {
      siteId: u.siteId,
      recipeId: recipe.id,
      vesselId: vessel.id,
      lotId: lot.id,
      planId: program.planId,
      source: program.source,
      program,
      state: 'running',
      startedAt,
      startedBy: u.id,
    });
    await appendAudit(t, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'batch.start',
      entity: 'batch',
      entityId: row.id,
      newValue: { recipeId: recipe.id, vesselId: vessel.id, lotId: lot.id, startedAt, source: program.source, planId: program.planId, stages: program.stages },
      at: now,
    });
    return toBatch((await findSiteBatch(t, u.siteId, row.id))!, true);
  });
}

export async function closeBatch({ db, clock }: Services, u: SessionUser, id: number, input: BatchClose): Promise<Batch> {
  const j = await loadBatch(db, u.siteId, id);
  const b = j.batch;
  if (b.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is already closed');
  const open = (await listDeviations(db, b.id)).filter((d) => d.deviation.state !== 'closed').length;
  if (open) throw new HttpError(409, 'open_deviations', `Close the batch's ${open} open deviation${open > 1 ? 's' : ''} first`);
  const now = clock.now();
  const forecast = (await statusNow(db, b, now.toISOString())).forecastGPerL;
  const patch = {
    state: 'closed' as const,
    closedAt: now.toISOString(),
    closedBy: u.id,
    closeComment: input.comment || null,
    measuredProductGPerL: input.measuredProductGPerL ?? null,
    forecastAtCloseGPerL: forecast,
  };
  const closed = await writeTx(db, async (t) => {
    await updateBatch(t, b.id, patch);
    await appendAudit(t, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'batch.close',
      entity: 'batch',
      entityId: b.id,
      oldValue: { state: 'running' },
      newValue: { ...patch, closedBy: u.email },
      at: now,
    });
    return toBatch((await findSiteBatch(t, u.siteId, b.id))!, b.startedBy === u.id);
  });
  // A measured product makes the batch evidence: a new calibration is proposed (used only once an engineer accepts it).
  if (patch.measuredProductGPerL !== null) await recalibrate(db, u, b.recipeId, b.lotId, now);
  return closed;
}
