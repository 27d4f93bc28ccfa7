// Readings logged one at a time (phone, control-system link) through group commit, and the readings table's pages.
import { failsWholeTransaction, writeTx, type Db } from '../../db/client';
import { batchHours, readingDeviations, type DeviationDraft, type ReadingRules } from '../../src/batches';
import { type Reading, type ReadingInput, type ReadingResult, type ReadingsPage, type ReadingSource } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError } from '../http-error';
import {
  deviationsOfReading,
  findReadingByKey,
  findReadingJoined,
  insertReading,
  readingAtOrBefore,
  readingsPage,
  type BatchJoined,
  type ReadingRow,
} from '../repositories/batches';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { batchSettingsOf, loadBatch } from './batches';
import { raiseDeviations, toDeviation } from './deviations';
import { checkReadingTime, rulesOf } from './historian-plan';

export const toReading = (r: ReadingRow, enteredBy: string, startedAt: string): Reading => ({
  id: r.id,
  key: r.clientKey,
  takenAt: r.takenAt,
  h: batchHours(startedAt, r.takenAt),
  c: r.c,
  note: r.note,
  source: r.source,
  enteredBy,
});

/** A page of the readings table, newest first; `before` is the id of the last reading of the previous page. */
export async function getReadingsPage(s: Services, u: SessionUser, id: number, q: { before?: number; limit: number }): Promise<ReadingsPage> {
  const b = (await loadBatch(s.db, u.siteId, id)).batch;
  const rows = await readingsPage(s.db, b.id, q.limit + 1, q.before ?? null);
  if (!rows) throw new HttpError(400, 'invalid_input', 'No such reading in this batch', { before: 'Give the id of a reading of this batch' });
  const readings = rows.slice(0, q.limit).map((r) => toReading(r.reading, r.enteredBy, b.startedAt));
  return { readings, nextBefore: rows.length > q.limit ? readings.at(-1)!.id : null };
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
 * `checkForecast: false`: a feed of a reading a second per batch (the control-system link) does not check the
 * forecast against the P10 in its group commit (each check integrates the whole batch, inside the transaction); it
 * calls `checkForecastLow` itself, once a minute per batch, outside it. Other rules run on every reading.
 */
export function readingIngest(s: Services, opts: { checkForecast?: boolean } = {}): ReadingIngest {
  const checksForecast = () => opts.checkForecast !== false;
  let queue: { req: ReadingRequest; resolve: (r: Logged) => void; reject: (e: unknown) => void }[] = [];
  let flushing: Promise<void> = Promise.resolve();
  const flush = async () => {
    const items = queue;
    queue = [];
    let stored: Stored[];
    try {
      stored = await storeReadings(
        s,
        items.map((i) => i.req),
        checksForecast,
      );
    } catch (err) {
      for (const i of items) i.reject(err);
      return;
    }
    for (const [k, item] of items.entries()) {
      const o = stored[k]!;
      if ('error' in o) item.reject(o.error);
      else if (o.created) item.resolve(o);
      else readingAnswer(s.db, o.readingId, o.startedAt).then((result) => item.resolve({ created: false, result }), item.reject);
    }
  };
  return {
    log: (u, batchId, input, source = 'manual') =>
      new Promise<Logged>((resolve, reject) => {
        // One flush at a time: readings that arrive while one is stored wait for the next (fewer collisions on
        // PostgreSQL, where a flush is not over within the turn).
        if (queue.push({ req: { u, batchId, input, source }, resolve, reject }) === 1) setImmediate(() => (flushing = flushing.then(flush)));
      }),
  };
}

async function readingAnswer(db: Db, readingId: number, startedAt: string): Promise<ReadingResult> {
  const r = (await findReadingJoined(db, readingId))!;
  return { reading: toReading(r.reading, r.enteredBy, startedAt), deviations: (await deviationsOfReading(db, readingId)).map(toDeviation) };
}

/** One transaction for a group of readings; per reading its stored id or the error that refused it. */
async function storeReadings({ db, clock }: Services, reqs: ReadingRequest[], checksForecast: () => boolean): Promise<Stored[]> {
  const now = clock.now();
  return await writeTx(db, async (t, savepoint) => {
    const groups = new Map<string, BatchGroup>();
    const out: Stored[] = [];
    for (const req of reqs) {
      try {
        out.push(await savepoint(() => storeReading(t, groups, req, now)));
      } catch (error) {
        // A database that cannot be written fails the whole group, not one reading (PostgreSQL runs it again).
        if (failsWholeTransaction(error)) throw error;
        out.push({ error });
      }
    }
    // Once per batch and flush: the status (and so a low forecast and the corrective setpoints) needs every reading.
    const answers = new Map(out.flatMap((o) => ('result' in o ? [[o.result.reading.id, o.result] as const] : [])));
    for (const g of groups.values()) {
      if (!g.lastBy) continue;
      for (const row of await raiseDeviations(t, g.lastBy, g.b, g.raised, now, { checkForecast: checksForecast() }))
        if (row.readingId !== null) answers.get(row.readingId)!.deviations.push(toDeviation({ deviation: row, acknowledgedBy: null, closedBy: null }));
    }
    return out;
  });
}

/** Stores one reading once per key: the first answers 201, a repeat of the same reading 200 with the same body. */
async function storeReading(t: Db, groups: Map<string, BatchGroup>, { u, batchId, input, source }: ReadingRequest, now: Date): Promise<Stored> {
  const groupKey = `${u.siteId}:${batchId}`;
  let g = groups.get(groupKey);
  if (!g) {
    const b = (await loadBatch(t, u.siteId, batchId)).batch;
    g = { b, rules: rulesOf(b.program, await batchSettingsOf(t, u.siteId)), raised: [], lastBy: null };
    groups.set(groupKey, g);
  }
  const b = g.b;
  const takenAt = new Date(input.takenAt).toISOString();
  const note = input.note ? input.note : null;
  const existing = await findReadingByKey(t, b.id, input.key);
  if (existing) {
    if (existing.takenAt !== takenAt || existing.c !== input.c || existing.note !== note)
      throw new HttpError(409, 'key_reused', 'This reading key was already used for a different reading', { key: 'Already used for another reading' });
    return { created: false, readingId: existing.id, startedAt: b.startedAt };
  }
  if (b.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is closed; readings can no longer be added');
  const bad = checkReadingTime(b.startedAt, Date.parse(takenAt), now);
  if (bad) throw new HttpError(400, 'invalid_input', bad, { takenAt: bad });
  // Only the reading before this one in time matters to the rules; earlier readings of this group count too.
  const before = await readingAtOrBefore(t, b.id, takenAt);
  const prev = before ? { h: batchHours(b.startedAt, before.takenAt), c: before.c } : null;
  const drafts = readingDeviations(g.rules, prev, { h: batchHours(b.startedAt, takenAt), c: input.c });
  const row = await insertReading(t, {
    siteId: u.siteId,
    batchId: b.id,
    clientKey: input.key,
    takenAt,
    c: input.c,
    note,
    source,
    enteredBy: u.id,
    receivedAt: now.toISOString(),
  });
  await appendAudit(t, {
    siteId: u.siteId,
    userId: u.id,
    actor: u.email,
    action: 'batch.reading',
    entity: 'batch',
    entityId: b.id,
    newValue: { readingId: row.id, key: input.key, takenAt, c: input.c, note, ...(source === 'manual' ? {} : { source }) },
    at: now,
  });
  for (const draft of drafts) g.raised.push({ readingId: row.id, draft, by: u });
  g.lastBy = u;
  return { created: true, result: { reading: toReading(row, u.name, b.startedAt), deviations: [] } };
}
