import { unwritableReason, writeTx, type Db } from '../../db/client';
import {
  batchHours,
  batchProgram,
  forecastDeviation,
  isTimeZone,
  plannedAt,
  deviationRun,
  readingDeviations,
  sampleIndices,
  type DeviationDraft,
  type ReadingRules,
} from '../../src/batches';
import {
  CLOCK_SKEW_MIN,
  DEFAULT_BATCH_SETTINGS,
  READING_MAX_C,
  READING_MIN_C,
  type Batch,
  type BatchClose,
  type BatchDetail,
  type BatchProgram,
  type BatchSettings,
  type BatchSettingsPatch,
  type BatchStart,
  type BatchSummary,
  type Deviation,
  type DeviationAcknowledge,
  type DeviationClose,
  type ImportProblem,
  type ImportProgress,
  type ImportQuery,
  type ImportResult,
  type Reading,
  type ReadingInput,
  type ReadingResult,
  type ReadingsPage,
  type ReadingSource,
} from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { csvLines } from '../csv';
import { HttpError, notFound } from '../http-error';
import { runImport } from '../imports';
import { batchRecordOf, statusNow } from './batch-record';
import {
  batchesLoggedBy,
  countActiveDeviations,
  deviationsOfReading,
  existingKeys,
  findBatchSettings,
  findReadingByKey,
  findReadingJoined,
  findSiteBatch,
  findSiteDeviation,
  hasActiveDeviation,
  insertBatch,
  insertDeviation,
  insertReading,
  insertReadings,
  lastReadingTimes,
  listDeviations,
  listReadings,
  listSiteBatches,
  planSignatures,
  readingAtOrBefore,
  readingsAfter,
  readingsByIds,
  readingsPage,
  runningBatchOnVessel,
  updateBatch,
  updateDeviation,
  upsertBatchSettings,
  type BatchJoined,
  type DeviationJoined,
  type DeviationRow,
  type ReadingRow,
} from '../repositories/batches';
import { findSiteEnzyme, findSiteRecipe } from '../repositories/recipes';
import { findSiteVessel } from '../repositories/vessels';
import type { Services } from '../routes/services';
import { appendAudit } from './audit';
import { getPlan } from './plans';
import { recalibrate } from './calibrations';
import { planningLot } from './evidence';
import { acceptedLot, releaseInEffect } from './recipes';

// A batch may be registered after it started (the paperwork follows the vessel), but not a week late.
const LATE_START_LIMIT_H = 7 * 24;
// Kinds whose cause an operator can correct with the temperature: these get a corrective setpoint.
const CORRECTABLE = new Set(['band', 'vessel_max', 'forecast_low']);

// Settings -----------------------------------------------------------------------------------------------

export function batchSettingsOf(db: Db, siteId: number): BatchSettings {
  const row = findBatchSettings(db, siteId);
  return row ? { toleranceC: row.toleranceC, gapLimitMin: row.gapLimitMin } : { ...DEFAULT_BATCH_SETTINGS };
}

export function changeBatchSettings({ db, clock }: Services, u: SessionUser, patch: BatchSettingsPatch): BatchSettings {
  const before = batchSettingsOf(db, u.siteId);
  const after = { ...before, ...patch };
  const now = clock.now();
  writeTx(db, (tx) => {
    upsertBatchSettings(tx, { siteId: u.siteId, ...after, updatedAt: now.toISOString() });
    appendAudit(tx, { siteId: u.siteId, userId: u.id, actor: u.email, action: 'batch_settings.update', entity: 'batch_settings', entityId: u.siteId, oldValue: before, newValue: after, at: now });
  });
  return after;
}

// Mapping ------------------------------------------------------------------------------------------------

const toBatch = (j: BatchJoined, isMine: boolean): Batch => ({
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

const toReading = (r: ReadingRow, enteredBy: string, startedAt: string): Reading => ({
  id: r.id,
  key: r.clientKey,
  takenAt: r.takenAt,
  h: batchHours(startedAt, r.takenAt),
  c: r.c,
  note: r.note,
  source: r.source,
  enteredBy,
});

const toDeviation = ({ deviation: d, acknowledgedBy, closedBy }: DeviationJoined): Deviation => ({
  id: d.id,
  batchId: d.batchId,
  kind: d.kind,
  state: d.state,
  readingId: d.readingId,
  at: d.at,
  message: d.message,
  valueC: d.valueC,
  expectedC: d.expectedC,
  corrective: d.corrective ?? null,
  raisedAt: d.raisedAt,
  acknowledgedBy,
  acknowledgedAt: d.acknowledgedAt,
  acknowledgeComment: d.acknowledgeComment,
  closedBy,
  closedAt: d.closedAt,
  closeComment: d.closeComment,
});

const pointsOf = (db: Db, b: { id: number; startedAt: string }) => batchRecordOf(db, b).points;

const rulesOf = (program: BatchProgram, settings: BatchSettings): ReadingRules => ({
  ...settings,
  vesselMaxC: program.vessel.maxC,
  plannedAt: (h) => plannedAt(program, h),
});

function loadBatch(db: Db, siteId: number, id: number): BatchJoined {
  const found = findSiteBatch(db, siteId, id);
  if (!found) throw notFound('Batch');
  return found;
}

const isoAfterStart = (startedAt: string, h: number) => new Date(Date.parse(startedAt) + h * 3_600_000).toISOString();

// Reads --------------------------------------------------------------------------------------------------

export function listBatches({ db, clock }: Services, u: SessionUser): BatchSummary[] {
  const rows = listSiteBatches(db, u.siteId);
  const ids = rows.map((r) => r.batch.id);
  const logged = new Set(batchesLoggedBy(db, u.id, ids));
  const active = new Map(countActiveDeviations(db, ids).map((r) => [r.batchId, r.n]));
  const last = new Map(lastReadingTimes(db, ids).map((r) => [r.batchId, r.last]));
  const now = clock.now().toISOString();
  return rows.map((j) => {
    const b = j.batch;
    const forecast =
      b.state === 'closed' && b.forecastAtCloseGPerL !== null
        ? b.forecastAtCloseGPerL
        : statusNow(db, b, now).forecastGPerL;
    return {
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
    };
  });
}

// A phone needs neither megabytes of historian data nor 50,000 table rows: past this many it gets a sample.
const DETAIL_READINGS = 5000;
const LATEST_KEPT = 50;

export function getBatchDetail(s: Services, u: SessionUser, id: number): BatchDetail {
  const record = batchRecordOf(s.db, loadBatch(s.db, u.siteId, id).batch);
  const chosen = sampleIndices(record.points.map((p) => p.c), DETAIL_READINGS, LATEST_KEPT);
  return { ...batchRecord(s, u, id, chosen.length === record.ids.length ? 'all' : chosen.map((i) => record.ids[i]!)), readingsTotal: record.ids.length };
}

/** A page of the readings table, newest first; `before` is the id of the last reading of the previous page. */
export function getReadingsPage(s: Services, u: SessionUser, id: number, q: { before?: number; limit: number }): ReadingsPage {
  const b = loadBatch(s.db, u.siteId, id).batch;
  const rows = readingsPage(s.db, b.id, q.limit + 1, q.before ?? null);
  if (!rows) throw new HttpError(400, 'invalid_input', 'No such reading in this batch', { before: 'Give the id of a reading of this batch' });
  const readings = rows.slice(0, q.limit).map((r) => toReading(r.reading, r.enteredBy, b.startedAt));
  return { readings, nextBefore: rows.length > q.limit ? readings.at(-1)!.id : null };
}

/** The batch record with every reading (the report) or the chosen ones (the batch page of a long record). */
function batchRecord({ db, clock }: Services, u: SessionUser, id: number, which: 'all' | readonly number[] = 'all'): Omit<BatchDetail, 'readingsTotal'> {
  const j = loadBatch(db, u.siteId, id);
  const b = j.batch;
  const readings = (which === 'all' ? listReadings(db, b.id) : readingsByIds(db, which)).map((r) => toReading(r.reading, r.enteredBy, b.startedAt));
  const devs = listDeviations(db, b.id).map(toDeviation);
  const now = clock.now().toISOString();
  const needsCorrective = b.state === 'running' && devs.some((d) => d.state !== 'closed' && CORRECTABLE.has(d.kind));
  const status = statusNow(db, b, now, needsCorrective);
  const isMine = b.startedBy === u.id || batchesLoggedBy(db, u.id, [b.id]).length > 0;
  const signed = b.planId
    ? planSignatures(db, u.siteId, b.planId).map(({ signature: sg, changeRequestId }) => ({
        changeRequestId,
        printedName: sg.printedName,
        role: sg.role,
        meaning: sg.meaning,
        comment: sg.comment,
        signedAt: sg.signedAt,
        recordHash: sg.recordHash,
      }))
    : [];
  return { batch: toBatch(j, isMine), readings, deviations: devs, status, settings: batchSettingsOf(db, u.siteId), signatures: signed, now };
}

// Start and close ----------------------------------------------------------------------------------------

export function startBatch({ db, clock }: Services, u: SessionUser, input: BatchStart): Batch {
  const found = findSiteRecipe(db, u.siteId, input.recipeId);
  if (!found) throw new HttpError(400, 'invalid_input', 'No such recipe at this site', { recipeId: 'Choose a recipe' });
  const { recipe } = found;
  const vessel = findSiteVessel(db, u.siteId, input.vesselId);
  if (!vessel) throw new HttpError(400, 'invalid_input', 'No such vessel at this site', { vesselId: 'Choose a vessel' });
  const lot = acceptedLot(db, u.siteId, input.lotId);
  if (lot.enzymeId !== recipe.enzymeId) throw new HttpError(400, 'invalid_input', 'The lot is of another enzyme', { lotId: `Choose a lot of ${found.enzymeName}` });
  const now = clock.now();
  const startMs = Date.parse(input.startedAt);
  if (startMs > now.getTime() + CLOCK_SKEW_MIN * 60_000) throw new HttpError(400, 'invalid_input', 'The start is in the future', { startedAt: 'A batch cannot start in the future' });
  if (startMs < now.getTime() - LATE_START_LIMIT_H * 3_600_000) throw new HttpError(400, 'invalid_input', 'The start is more than a week ago', { startedAt: 'At most a week ago' });
  if (runningBatchOnVessel(db, u.siteId, vessel.id)) throw new HttpError(409, 'vessel_busy', `${vessel.name} already has a running batch`, { vesselId: 'This vessel already has a running batch' });
  // The release in effect on the batch's start day, not necessarily the newest approval (its date may be ahead).
  const release = releaseInEffect(db, recipe, new Date(startMs), u.siteTimeZone);
  const plan = release.planId ? getPlan({ db, clock }, u, release.planId) : null;
  const enzyme = findSiteEnzyme(db, u.siteId, recipe.enzymeId)!;
  const program = batchProgram({ recipe: { ...recipe, currentSetpointC: release.setpointC }, enzyme, lot: planningLot(db, u.siteId, lot, recipe.id), vessel, plan });
  const temps = program.stages.map((s) => s.c);
  if (Math.min(...temps) < vessel.minC || Math.max(...temps) > vessel.maxC)
    throw new HttpError(400, 'plan_outside_vessel', `The ${program.source === 'released_plan' ? 'released plan' : 'current setpoint'} lies outside ${vessel.name}'s range of ${vessel.minC}-${vessel.maxC} °C`, { vesselId: 'The plan does not fit this vessel' });
  const startedAt = new Date(startMs).toISOString();
  return writeTx(db, (t) => {
    const row = insertBatch(t, { siteId: u.siteId, recipeId: recipe.id, vesselId: vessel.id, lotId: lot.id, planId: program.planId, source: program.source, program, state: 'running', startedAt, startedBy: u.id });
    appendAudit(t, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'batch.start',
      entity: 'batch',
      entityId: row.id,
      newValue: { recipeId: recipe.id, vesselId: vessel.id, lotId: lot.id, startedAt, source: program.source, planId: program.planId, stages: program.stages },
      at: now,
    });
    return toBatch(findSiteBatch(t, u.siteId, row.id)!, true);
  });
}

export function closeBatch({ db, clock }: Services, u: SessionUser, id: number, input: BatchClose): Batch {
  const j = loadBatch(db, u.siteId, id);
  const b = j.batch;
  if (b.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is already closed');
  const open = listDeviations(db, b.id).filter((d) => d.deviation.state !== 'closed').length;
  if (open) throw new HttpError(409, 'open_deviations', `Close the batch's ${open} open deviation${open > 1 ? 's' : ''} first`);
  const now = clock.now();
  const forecast = statusNow(db, b, now.toISOString()).forecastGPerL;
  const patch = {
    state: 'closed' as const,
    closedAt: now.toISOString(),
    closedBy: u.id,
    closeComment: input.comment || null,
    measuredProductGPerL: input.measuredProductGPerL ?? null,
    forecastAtCloseGPerL: forecast,
  };
  const closed = writeTx(db, (t) => {
    updateBatch(t, b.id, patch);
    appendAudit(t, { siteId: u.siteId, userId: u.id, actor: u.email, action: 'batch.close', entity: 'batch', entityId: b.id, oldValue: { state: 'running' }, newValue: { ...patch, closedBy: u.email }, at: now });
    return toBatch(findSiteBatch(t, u.siteId, b.id)!, b.startedBy === u.id);
  });
  // A measured product makes the batch evidence: a new calibration is proposed (used only once an engineer accepts it).
  if (patch.measuredProductGPerL !== null) recalibrate(db, u, b.recipeId, b.lotId, now);
  return closed;
}

// Readings -----------------------------------------------------------------------------------------------

/**
 * Stores the deviations new readings raised, each with its audit event, and a low forecast if the batch's readings
 * (stored, the new ones included) now forecast below P10. `by` is who logged the reading, else `u`.
 */
function raiseDeviations(
  t: Db,
  u: SessionUser,
  b: BatchJoined['batch'],
  raised: { readingId: number | null; draft: DeviationDraft; by?: SessionUser }[],
  now: Date,
  opts: { checkForecast?: boolean; withCorrective?: boolean } = {},
): DeviationRow[] {
  const { checkForecast = true, withCorrective = true } = opts;
  const settings = batchSettingsOf(t, u.siteId);
  // The status integrates every reading of the batch; it is needed only for a corrective setpoint or a P10 check.
  // Without a corrective (the earlier parts of an import) deviations are raised without a suggested setpoint.
  const checksForecast = checkForecast && b.program.p10GPerL !== null && !hasActiveDeviation(t, b.id, 'forecast_low');
  const status =
    checksForecast || (withCorrective && raised.some((r) => CORRECTABLE.has(r.draft.kind))) ? statusNow(t, b, now.toISOString(), true) : null;
  const low = status && checksForecast ? forecastDeviation(b.program.p10GPerL, status.forecastGPerL, false, status.lastH) : null;
  const all = low ? [...raised, { readingId: null, draft: low }] : raised;
  return all.map(({ readingId, draft, by = u }) => {
    const row = insertDeviation(t, {
      siteId: u.siteId,
      batchId: b.id,
      kind: draft.kind,
      state: 'open',
      readingId,
      at: isoAfterStart(b.startedAt, draft.h),
      message: draft.message,
      valueC: draft.valueC,
      expectedC: draft.expectedC,
      corrective: CORRECTABLE.has(draft.kind) && withCorrective && status ? status.corrective : null,
      raisedAt: now.toISOString(),
    });
    appendAudit(t, {
      siteId: u.siteId,
      userId: by.id,
      actor: by.email,
      action: 'deviation.raise',
      entity: 'deviation',
      entityId: row.id,
      newValue: { batchId: b.id, kind: draft.kind, at: row.at, message: draft.message, settings, corrective: row.corrective },
      at: now,
    });
    return row;
  });
}

function checkReadingTime(startedAt: string, takenMs: number, now: Date): string | null {
  if (takenMs > now.getTime() + CLOCK_SKEW_MIN * 60_000) return `More than ${CLOCK_SKEW_MIN} min ahead of the server's clock`;
  if (takenMs < Date.parse(startedAt)) return 'Before the batch started';
  return null;
}

function runningBatch(db: Db, siteId: number, id: number): BatchJoined {
  const j = loadBatch(db, siteId, id);
  if (j.batch.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is closed; readings can no longer be added');
  return j;
}

type ReadingRequest = { u: SessionUser; batchId: number; input: ReadingInput; source: ReadingSource };
type Logged = { created: boolean; result: ReadingResult };
// A new reading carries its answer from the transaction; a repeat is answered from the database.
type Stored = { created: true; result: ReadingResult } | { created: false; readingId: number; startedAt: string } | { error: unknown };
/** What a flush knows of one batch, loaded once, and the deviations its new readings raised. */
type BatchGroup = {
  b: BatchJoined['batch'];
  rules: ReadingRules;
  raised: { readingId: number; draft: DeviationDraft; by: SessionUser }[];
  lastBy: SessionUser | null;
};

/**
 * Group commit for logged readings. Each reading is its own fsync'd write under synchronous=FULL, so one
 * transaction per request caps ingest at the disk's flush rate. Requests are queued and the queue is stored on
 * the next turn of the event loop in ONE transaction: each reading with its own audit event, in arrival order,
 * under its own savepoint so a refused reading (bad time, reused key, closed batch) fails alone. Every request
 * is answered only after the transaction committed, so a 2xx still means the reading is on disk.
 */
export type ReadingIngest = { log(u: SessionUser, batchId: number, input: ReadingInput, source?: ReadingSource): Promise<Logged> };

/**
 * `forecastEveryMs`: a feed of a reading a second (the control-system link) checks a batch's forecast against its
 * P10 at most this often, not on every flush (each check integrates the whole batch); other rules run on every reading.
 */
export function readingIngest(s: Services, opts: { forecastEveryMs?: number } = {}): ReadingIngest {
  const forecastAt = new Map<number, number>();
  const checksForecast = (batchId: number, nowMs: number) => {
    if (!opts.forecastEveryMs) return true;
    if (nowMs - (forecastAt.get(batchId) ?? -Infinity) < opts.forecastEveryMs) return false;
    forecastAt.set(batchId, nowMs);
    return true;
  };
  let queue: { req: ReadingRequest; resolve: (r: Logged) => void; reject: (e: unknown) => void }[] = [];
  const flush = () => {
    const items = queue;
    queue = [];
    let stored: Stored[];
    try {
      stored = storeReadings(s, items.map((i) => i.req), checksForecast);
    } catch (err) {
      for (const i of items) i.reject(err);
      return;
    }
    items.forEach((item, k) => {
      const o = stored[k];
      if ('error' in o) return item.reject(o.error);
      if (o.created) return item.resolve(o);
      try {
        item.resolve({ created: false, result: readingAnswer(s.db, o.readingId, o.startedAt) });
      } catch (err) {
        item.reject(err);
      }
    });
  };
  return {
    log: (u, batchId, input, source = 'manual') =>
      new Promise<Logged>((resolve, reject) => {
        if (queue.push({ req: { u, batchId, input, source }, resolve, reject }) === 1) setImmediate(flush);
      }),
  };
}

function readingAnswer(db: Db, readingId: number, startedAt: string): ReadingResult {
  const r = findReadingJoined(db, readingId)!;
  return { reading: toReading(r.reading, r.enteredBy, startedAt), deviations: deviationsOfReading(db, readingId).map(toDeviation) };
}

/** One transaction for a group of readings; per reading its stored id or the error that refused it. */
function storeReadings({ db, clock }: Services, reqs: ReadingRequest[], checksForecast: (batchId: number, nowMs: number) => boolean): Stored[] {
  const now = clock.now();
  return writeTx(db, (t, savepoint) => {
    const groups = new Map<string, BatchGroup>();
    const out = reqs.map((req): Stored => {
      try {
        return savepoint(() => storeReading(t, groups, req, now));
      } catch (error) {
        // A file that cannot be written fails the whole group, not one reading.
        if (unwritableReason(error)) throw error;
        return { error };
      }
    });
    // Once per batch and flush: the status (and so a low forecast and the corrective setpoints) needs every reading.
    const answers = new Map(out.flatMap((o) => ('result' in o ? [[o.result.reading.id, o.result] as const] : [])));
    for (const g of groups.values()) {
      if (!g.lastBy) continue;
      for (const row of raiseDeviations(t, g.lastBy, g.b, g.raised, now, { checkForecast: checksForecast(g.b.id, now.getTime()) }))
        if (row.readingId !== null) answers.get(row.readingId)!.deviations.push(toDeviation({ deviation: row, acknowledgedBy: null, closedBy: null }));
    }
    return out;
  });
}

/** Stores one reading once per key: the first answers 201, a repeat of the same reading 200 with the same body. */
function storeReading(t: Db, groups: Map<string, BatchGroup>, { u, batchId, input, source }: ReadingRequest, now: Date): Stored {
  const groupKey = `${u.siteId}:${batchId}`;
  let g = groups.get(groupKey);
  if (!g) {
    const b = loadBatch(t, u.siteId, batchId).batch;
    g = { b, rules: rulesOf(b.program, batchSettingsOf(t, u.siteId)), raised: [], lastBy: null };
    groups.set(groupKey, g);
  }
  const b = g.b;
  const takenAt = new Date(input.takenAt).toISOString();
  const note = input.note ? input.note : null;
  const existing = findReadingByKey(t, b.id, input.key);
  if (existing) {
    if (existing.takenAt !== takenAt || existing.c !== input.c || existing.note !== note)
      throw new HttpError(409, 'key_reused', 'This reading key was already used for a different reading', { key: 'Already used for another reading' });
    return { created: false, readingId: existing.id, startedAt: b.startedAt };
  }
  if (b.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is closed; readings can no longer be added');
  const bad = checkReadingTime(b.startedAt, Date.parse(takenAt), now);
  if (bad) throw new HttpError(400, 'invalid_input', bad, { takenAt: bad });
  // Only the reading before this one in time matters to the rules; earlier readings of this group count too.
  const before = readingAtOrBefore(t, b.id, takenAt);
  const prev = before ? { h: batchHours(b.startedAt, before.takenAt), c: before.c } : null;
  const drafts = readingDeviations(g.rules, prev, { h: batchHours(b.startedAt, takenAt), c: input.c });
  const row = insertReading(t, { siteId: u.siteId, batchId: b.id, clientKey: input.key, takenAt, c: input.c, note, source, enteredBy: u.id, receivedAt: now.toISOString() });
  appendAudit(t, { siteId: u.siteId, userId: u.id, actor: u.email, action: 'batch.reading', entity: 'batch', entityId: b.id, newValue: { readingId: row.id, key: input.key, takenAt, c: input.c, note, ...(source === 'manual' ? {} : { source }) }, at: now });
  for (const draft of drafts) g.raised.push({ readingId: row.id, draft, by: u });
  g.lastBy = u;
  return { created: true, result: { reading: toReading(row, u.name, b.startedAt), deviations: [] } };
}

/**
 * A deviation the readings cannot raise themselves (the control-system link's lost signal), stored with its audit
 * event like the others, unless one of its kind is still active on the batch. Returns whether it was raised.
 */
export function raiseBatchDeviation({ db, clock }: Services, u: SessionUser, batchId: number, draft: DeviationDraft): boolean {
  const b = runningBatch(db, u.siteId, batchId).batch;
  const now = clock.now();
  return writeTx(db, (t) => {
    if (hasActiveDeviation(t, b.id, draft.kind)) return false;
    raiseDeviations(t, u, b, [{ readingId: null, draft }], now);
    return true;
  });
}

const MAX_PROBLEMS = 200;
// Rows checked between turns of the event loop: a few milliseconds of work, so other requests get in between.
const ROWS_PER_TURN = 10_000;
// About 40 ms of inserts on this machine's kind (7.5 us a row measured under load): the longest any other request waits.
const ROWS_PER_PART = 5_000;
const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/** Imports under way, by batch id: bytes read of the upload's total, for the progress answer. */
const importsRunning = new Map<number, Omit<ImportProgress, 'isRunning' | 'phase'> & { phase: 'reading' | 'storing' }>();

/** How far a running import into the batch is, or null when none runs. */
export function importProgress(s: Services, u: SessionUser, id: number): ImportProgress {
  loadBatch(s.db, u.siteId, id);
  const p = importsRunning.get(id);
  return p ? { isRunning: true, ...p } : { isRunning: false, bytesRead: 0, bytesTotal: 0, phase: null, rowsStored: 0, rowsToStore: 0 };
}

/**
 * A historian export: read and checked on the import worker, then stored in one transaction; rows that cannot
 * be stored are reported by line and the rest go in. One import per batch at a time.
 */
export async function importReadings(s: Services, u: SessionUser, id: number, bytes: Uint8Array, q: ImportQuery): Promise<ImportResult> {
  const { db, clock } = s;
  runningBatch(db, u.siteId, id);
  const timeZone = q.timeZone ?? u.siteTimeZone;
  if (!isTimeZone(timeZone)) throw new HttpError(400, 'invalid_input', `Unknown time zone ${timeZone}`, { timeZone: 'Give an IANA zone such as Europe/Berlin' });
  if (importsRunning.has(id)) throw new HttpError(409, 'import_running', 'Another import into this batch is running; try again when it has finished');
  const progress = { bytesRead: 0, bytesTotal: bytes.length, phase: 'reading' as 'reading' | 'storing', rowsStored: 0, rowsToStore: 0 };
  importsRunning.set(id, progress);
  try {
    const parsed = await runImport({ kind: 'historian', bytes, timeZone, dateOrder: q.dateOrder }, (n) => (progress.bytesRead = n));
    progress.bytesRead = bytes.length;
    progress.phase = 'storing';
    if (parsed.total === 0) throw new HttpError(400, 'invalid_input', 'The file has no readings', { file: 'Expected lines of time and °C' });
    // Read again: the batch may have closed while the file was being read.
    const b = runningBatch(db, u.siteId, id).batch;
    const now = clock.now();
    const problems: ImportProblem[] = parsed.problems.map((p) => ({ line: p.line, kind: 'invalid', message: p.message }));
    const keys = existingKeys(db, b.id);
    const seen = new Map<number, number>();
    const accepted: { line: number; at: string; ms: number; c: number; key: string }[] = [];
    let outOfOrder = 0;
    let lastMs = -Infinity;
    const { lines, atMs, c: temps } = parsed;
    for (let i = 0; i < lines.length; i++) {
      if (i % ROWS_PER_TURN === ROWS_PER_TURN - 1) await nextTurn();
      const line = lines[i]!;
      const ms = atMs[i]!;
      const c = temps[i]!;
      const at = new Date(ms).toISOString();
      const key = `historian:${at}`;
      const reject = (kind: ImportProblem['kind'], message: string) => problems.push({ line, kind, message });
      const badTime = checkReadingTime(b.startedAt, ms, now);
      if (c < READING_MIN_C || c > READING_MAX_C) reject('invalid', `${c} °C is outside ${READING_MIN_C} to ${READING_MAX_C} °C`);
      else if (badTime) reject('invalid', `${at}: ${badTime}`);
      else if (seen.has(ms)) reject('duplicate', `Same time as line ${seen.get(ms)}`);
      else if (keys.has(key)) reject('already_stored', `A reading at ${at} (UTC, to the millisecond) is already stored`);
      else {
        if (ms < lastMs) {
          outOfOrder++;
          reject('out_of_order', `Earlier than the line before it; stored in time order`);
        }
        lastMs = Math.max(lastMs, ms);
        seen.set(ms, line);
        accepted.push({ line, at, ms, c, key });
      }
    }
    await nextTurn();
    // Rows are checked in file order: sorted already unless the file went back in time.
    if (problems.some((p, i) => i > 0 && p.line < problems[i - 1]!.line)) problems.sort((a, b2) => a.line - b2.line);
    if (outOfOrder) accepted.sort((a, b2) => a.ms - b2.ms);
    await nextTurn();
    const settings = batchSettingsOf(db, u.siteId);
    const run = deviationRun(rulesOf(b.program, settings), pointsOf(db, b));
    const drafts: ReturnType<typeof run> = [];
    for (let i = 0; i < accepted.length; i += ROWS_PER_TURN) {
      if (i > 0) await nextTurn();
      for (const d of run(accepted.slice(i, i + ROWS_PER_TURN).map((a) => ({ h: batchHours(b.startedAt, a.at), c: a.c })))) drafts.push(d);
    }
    // Stored in parts, one transaction each, so no other request waits behind the whole file. The audit event
    // goes with the first part and states what the import stores; a part's deviations go with its readings.
    // Should the server stop between parts, those stored stay and the same file uploaded again stores the rest.
    let raised = 0;
    progress.rowsToStore = accepted.length;
    const parts = Math.max(1, Math.ceil(accepted.length / ROWS_PER_PART));
    for (let part = 0; part < parts; part++) {
      const from = part * ROWS_PER_PART;
      const to = Math.min(accepted.length, from + ROWS_PER_PART);
      if (part > 0) await nextTurn();
      const current = part > 0 ? runningBatch(db, u.siteId, id).batch : b;
      raised += writeTx(db, (t) => {
        const ids = insertReadings(
          t,
          accepted.slice(from, to).map((a) => ({ siteId: u.siteId, batchId: b.id, clientKey: a.key, takenAt: a.at, c: a.c, note: null, source: 'historian' as const, enteredBy: u.id, receivedAt: now.toISOString() })),
        );
        if (part === 0)
          appendAudit(t, {
            siteId: u.siteId,
            userId: u.id,
            actor: u.email,
            action: 'batch.readings_import',
            entity: 'batch',
            entityId: b.id,
            newValue: { rows: parsed.total, imported: accepted.length, parts, timeZone, dateOrder: q.dateOrder, encoding: parsed.encoding, first: accepted[0]?.at ?? null, last: accepted.at(-1)?.at ?? null },
            at: now,
          });
        const mine = drafts.filter((d) => d.index >= from && d.index < to).map((d) => ({ readingId: ids[d.index - from]!, draft: d.draft }));
        // The forecast and the corrective setpoint come from the whole record: once, with the last part.
        const last = part === parts - 1;
        return mine.length || (accepted.length && last) ? raiseDeviations(t, u, current, mine, now, { checkForecast: last, withCorrective: last }).length : 0;
      });
      progress.rowsStored = to;
      // The kept record takes in the part just stored, so the next part reads only its own rows.
      batchRecordOf(db, b);
    }
    const skipped = problems.filter((p) => p.kind !== 'out_of_order').length;
    return { rows: parsed.total, imported: accepted.length, skipped, outOfOrder, deviationsRaised: raised, problems: problems.slice(0, MAX_PROBLEMS), timeZone, encoding: parsed.encoding };
  } finally {
    importsRunning.delete(id);
  }
}

// Deviations ---------------------------------------------------------------------------------------------

function loadDeviation(db: Db, siteId: number, id: number): DeviationJoined {
  const d = findSiteDeviation(db, siteId, id);
  if (!d) throw notFound('Deviation');
  return d;
}

export function acknowledgeDeviation({ db, clock }: Services, u: SessionUser, id: number, input: DeviationAcknowledge): Deviation {
  const d = loadDeviation(db, u.siteId, id);
  if (d.deviation.state !== 'open') throw new HttpError(409, 'already_acknowledged', 'This deviation was already acknowledged');
  const now = clock.now();
  writeTx(db, (t) => {
    updateDeviation(t, id, { state: 'acknowledged', acknowledgedBy: u.id, acknowledgedAt: now.toISOString(), acknowledgeComment: input.comment });
    appendAudit(t, { siteId: u.siteId, userId: u.id, actor: u.email, action: 'deviation.acknowledge', entity: 'deviation', entityId: id, oldValue: { state: 'open' }, newValue: { state: 'acknowledged', comment: input.comment }, at: now });
  });
  return toDeviation(loadDeviation(db, u.siteId, id));
}

export function closeDeviation({ db, clock }: Services, u: SessionUser, id: number, input: DeviationClose): Deviation {
  const d = loadDeviation(db, u.siteId, id);
  if (d.deviation.state === 'open') throw new HttpError(409, 'not_acknowledged', 'The operator acknowledges a deviation before it is closed');
  if (d.deviation.state === 'closed') throw new HttpError(409, 'already_closed', 'This deviation is already closed');
  const now = clock.now();
  writeTx(db, (t) => {
    updateDeviation(t, id, { state: 'closed', closedBy: u.id, closedAt: now.toISOString(), closeComment: input.comment || null });
    appendAudit(t, { siteId: u.siteId, userId: u.id, actor: u.email, action: 'deviation.close', entity: 'deviation', entityId: id, oldValue: { state: 'acknowledged' }, newValue: { state: 'closed', comment: input.comment ?? null }, at: now });
  });
  return toDeviation(loadDeviation(db, u.siteId, id));
}

// Report -------------------------------------------------------------------------------------------------

// The report of a long record is written a page of readings at a time, other requests served in between.
const REPORT_PAGE = 5_000;

/**
 * The batch record as section/field/value rows: recipe, plan, status, readings and deviations, spreadsheet-safe.
 * The batch is checked at once (not found, wrong site); the CSV itself comes in parts.
 */
export function batchReportCsv(s: Services, u: SessionUser, id: number): { filename: string; parts: AsyncGenerator<string> } {
  const record = batchRecord(s, u, id, []);
  return { filename: `batch-${record.batch.id}.csv`, parts: reportParts(s, record) };
}

async function* reportParts(s: Services, record: Omit<BatchDetail, 'readingsTotal'>): AsyncGenerator<string> {
  const { batch: b, deviations: devs, status, settings, signatures: signed } = record;
  const p = b.program;
  const rows: unknown[][] = [
    ['batch', 'id', b.id, ''],
    ['batch', 'recipe', b.recipeName, ''],
    ['batch', 'vessel', b.vesselName, ''],
    ['batch', 'lot', b.lotCode, ''],
    ['batch', 'state', b.state, ''],
    ['batch', 'started_at_utc', b.startedAt, ''],
    ['batch', 'started_by', b.startedBy, ''],
    ['batch', 'closed_at_utc', b.closedAt, ''],
    ['batch', 'closed_by', b.closedBy, ''],
    ['batch', 'close_comment', b.closeComment, ''],
    ['plan', 'source', p.source === 'released_plan' ? 'released plan' : 'recipe current setpoint', ''],
    ['plan', 'plan_id', p.planId, ''],
    ['plan', 'batch_length', p.batchH, 'h'],
    ...p.stages.map((st, i) => ['plan', `stage_${i + 1}`, `${st.hours} h at ${st.c}`, 'h, degC']),
    ['plan', 'fill_temperature', p.fillC, 'degC'],
    ['plan', 'planned_product', p.plannedProductGPerL, 'g/L'],
    ['plan', 'p10_product', p.p10GPerL, 'g/L'],
    ['plan', 'tolerance_band', settings.toleranceC, '+/- degC'],
    ['plan', 'gap_limit', settings.gapLimitMin, 'min'],
    ['plan', 'vessel_max', p.vessel.maxC, 'degC'],
    ['status', 'readings', status.readings, ''],
    ['status', 'activity_left', status.activityLeft, 'fraction'],
    ['status', 'product_so_far', status.productSoFarGPerL, 'g/L'],
    ['status', 'forecast_product', status.forecastGPerL, 'g/L'],
    ['status', 'thermal_dose', status.equivalentHAtRef, `h at ${status.refC} degC`],
    ['status', 'forecast_at_close', b.forecastAtCloseGPerL, 'g/L'],
    ['status', 'measured_product', b.measuredProductGPerL, 'g/L'],
    ...(signed.length
      ? signed.map((g) => ['signature', `${g.printedName} (${g.role})`, g.meaning, `${g.signedAt} ${g.comment}; change request ${g.changeRequestId}; record ${g.recordHash}`])
      : [['signature', 'none', p.source === 'released_plan' ? 'no signature found for the plan' : 'runs the recipe current setpoint', '']]),
  ];
  yield csvLines([['section', 'field', 'value', 'detail'], ...rows]);
  for (let after: { takenAt: string; id: number } | null = null; ; ) {
    await nextTurn();
    const page = readingsAfter(s.db, b.id, REPORT_PAGE, after);
    if (page.length) yield csvLines(page.map(({ reading: r, enteredBy }) => ['reading', r.takenAt, r.c, `degC; ${r.source}; ${enteredBy}${r.note ? `; ${r.note}` : ''}`]));
    if (page.length < REPORT_PAGE) break;
    after = page.at(-1)!.reading;
  }
  yield csvLines([
    ...devs.map((d) => [
      'deviation',
      `${d.id} ${d.kind} at ${d.at}`,
      d.message,
      [
        d.state,
        d.acknowledgedBy ? `acknowledged by ${d.acknowledgedBy} ${d.acknowledgedAt}: ${d.acknowledgeComment}` : null,
        d.closedBy ? `closed by ${d.closedBy} ${d.closedAt}${d.closeComment ? `: ${d.closeComment}` : ''}` : null,
        d.corrective ? `suggested ${d.corrective.setpointC.toFixed(1)} degC from hour ${d.corrective.fromH.toFixed(1)}` : null,
      ]
        .filter(Boolean)
        .join('; '),
    ]),
  ]);
}
