// Deviations of a batch: raised with their audit events (and a corrective setpoint where the temperature can
// correct the cause), acknowledged by the operator, closed by the supervisor.
import { writeTx, type Db } from '../../db/client';
import { CORRECTABLE, forecastDeviation, type DeviationDraft } from '../../src/batches';
import { type BatchStatus, type Deviation, type DeviationAcknowledge, type DeviationClose } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError, notFound } from '../http-error';
import { statusNow } from './batch-record';
import {
  findSiteDeviation,
  hasActiveDeviation,
  insertDeviation,
  updateDeviation,
  type BatchJoined,
  type DeviationJoined,
  type DeviationRow,
} from '../repositories/batches';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { batchSettingsOf, loadBatch, runningBatch } from './batches';

export const toDeviation = ({ deviation: d, acknowledgedBy, closedBy }: DeviationJoined): Deviation => ({
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

const isoAfterStart = (startedAt: string, h: number) => new Date(Date.parse(startedAt) + h * 3_600_000).toISOString();

/**
 * Stores the deviations new readings raised, each with its audit event, and a low forecast if the batch's readings
 * (stored, the new ones included) now forecast below P10. `by` is who logged the reading, else `u`.
 */
export async function raiseDeviations(
  t: Db,
  u: SessionUser,
  b: BatchJoined['batch'],
  raised: { readingId: number | null; draft: DeviationDraft; by?: SessionUser }[],
  now: Date,
  opts: { checkForecast?: boolean; withCorrective?: boolean; status?: () => BatchStatus | null } = {},
): Promise<DeviationRow[]> {
  const { checkForecast = true, withCorrective = true } = opts;
  const settings = await batchSettingsOf(t, u.siteId);
  // The status integrates every reading of the batch; it is needed only for a corrective setpoint or a P10 check.
  // Without a corrective (the earlier parts of an import) deviations are raised without a suggested setpoint.
  // `opts.status` may give it computed elsewhere (an import's, on the worker) or null for "compute it here".
  const checksForecast = checkForecast && b.program.p10GPerL !== null && !(await hasActiveDeviation(t, b.id, 'forecast_low'));
  const status =
    checksForecast || (withCorrective && raised.some((r) => CORRECTABLE.has(r.draft.kind)))
      ? (opts.status?.() ?? (await statusNow(t, b, now.toISOString(), true)))
      : null;
  const low = status && checksForecast ? forecastDeviation(b.program.p10GPerL, status.forecastGPerL, false, status.lastH) : null;
  const all = low ? [...raised, { readingId: null, draft: low }] : raised;
  const rows: DeviationRow[] = [];
  for (const { readingId, draft, by = u } of all) {
    const row = await insertDeviation(t, {
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
    await appendAudit(t, {
      siteId: u.siteId,
      userId: by.id,
      actor: by.email,
      action: 'deviation.raise',
      entity: 'deviation',
      entityId: row.id,
      newValue: { batchId: b.id, kind: draft.kind, at: row.at, message: draft.message, settings, corrective: row.corrective },
      at: now,
    });
    rows.push(row);
  }
  return rows;
}

/**
 * A deviation the readings cannot raise themselves (the control-system link's lost signal), stored with its audit
 * event like the others, unless one of its kind is still active on the batch. Returns whether it was raised.
 */
export async function raiseBatchDeviation({ db, clock }: Services, u: SessionUser, batchId: number, draft: DeviationDraft): Promise<boolean> {
  const b = (await runningBatch(db, u.siteId, batchId)).batch;
  const now = clock.now();
  return writeTx(db, async (t) => {
    if (await hasActiveDeviation(t, b.id, draft.kind)) return false;
    await raiseDeviations(t, u, b, [{ readingId: null, draft }], now);
    return true;
  });
}

/**
 * The P10 check of a running batch on its stored readings, outside any reading's transaction (the batch's kept
 * record, so only readings added since the last check are read): raises `forecast_low` when the forecast is below
 * the plan's P10 and none is active. Returns whether it raised one.
 */
export async function checkForecastLow({ db, clock }: Services, u: SessionUser, batchId: number): Promise<boolean> {
  const b = (await loadBatch(db, u.siteId, batchId)).batch;
  if (b.state !== 'running' || b.program.p10GPerL === null || (await hasActiveDeviation(db, b.id, 'forecast_low'))) return false;
  const now = clock.now();
  const status = await statusNow(db, b, now.toISOString());
  const low = forecastDeviation(b.program.p10GPerL, status.forecastGPerL, false, status.lastH);
  if (!low) return false;
  return writeTx(db, async (t) => {
    if (await hasActiveDeviation(t, b.id, 'forecast_low')) return false;
    await raiseDeviations(t, u, b, [{ readingId: null, draft: low }], now, { checkForecast: false });
    return true;
  });
}

async function loadDeviation(db: Db, siteId: number, id: number): Promise<DeviationJoined> {
  const d = await findSiteDeviation(db, siteId, id);
  if (!d) throw notFound('Deviation');
  return d;
}

export async function acknowledgeDeviation({ db, clock }: Services, u: SessionUser, id: number, input: DeviationAcknowledge): Promise<Deviation> {
  const d = await loadDeviation(db, u.siteId, id);
  if (d.deviation.state !== 'open') throw new HttpError(409, 'already_acknowledged', 'This deviation was already acknowledged');
  const now = clock.now();
  await writeTx(db, async (t) => {
    await updateDeviation(t, id, { state: 'acknowledged', acknowledgedBy: u.id, acknowledgedAt: now.toISOString(), acknowledgeComment: input.comment });
    await appendAudit(t, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'deviation.acknowledge',
      entity: 'deviation',
      entityId: id,
      oldValue: { state: 'open' },
      newValue: { state: 'acknowledged', comment: input.comment },
      at: now,
    });
  });
  return toDeviation(await loadDeviation(db, u.siteId, id));
}

export async function closeDeviation({ db, clock }: Services, u: SessionUser, id: number, input: DeviationClose): Promise<Deviation> {
  const d = await loadDeviation(db, u.siteId, id);
  if (d.deviation.state === 'open') throw new HttpError(409, 'not_acknowledged', 'The operator acknowledges a deviation before it is closed');
  if (d.deviation.state === 'closed') throw new HttpError(409, 'already_closed', 'This deviation is already closed');
  const now = clock.now();
  await writeTx(db, async (t) => {
    await updateDeviation(t, id, { state: 'closed', closedBy: u.id, closedAt: now.toISOString(), closeComment: input.comment || null });
    await appendAudit(t, {
      siteId: u.siteId,
      userId: u.id,
      actor: u.email,
      action: 'deviation.close',
      entity: 'deviation',
      entityId: id,
      oldValue: { state: 'acknowledged' },
      newValue: { state: 'closed', comment: input.comment ?? null },
      at: now,
    });
  });
  return toDeviation(await loadDeviation(db, u.siteId, id));
}
