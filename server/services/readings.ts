// Readings logged one at a time (phone, control-system link) through group commit, and the readings table's pages.
import { failsWholeTransaction, writeTx, type Db } from '../../db/client';
import { batchHours, readingDeviations, type DeviationDraft, type ReadingRules } from '../../src/batches';
import { type Reading, type ReadingInput, type ReadingResult, type ReadingsPage, type ReadingSource } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError } from '../http-error';
import {
  deviationsOfReading,
  findReadingJoined,
  insertReadingRows,
  readingsAtOrBefore,
  readingsPage,
  readingsWithKeys,
  type BatchJoined,
  type ReadingRow,
} from '../repositories/batches';
import type { Services } from '../context';
import { appendAudits } from './audit';
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
  /** Stored readings with the keys of the group's requests, by key; and the reading before each of their times. */
  stored: Map<string, ReadingRow>;
  before: Map<string, { takenAt: string; c: number } | undefined>;
  /** This flush's new readings of the batch, in arrival order. */
  added: Added[];
  raised: { readingId: number; draft: DeviationDraft; by: SessionUser }[];
  lastBy: SessionUser | null;
};
/** A new reading of this flush: its row once stored. */
type Added = { req: ReadingRequest; takenAt: string; note: string | null; startedAt: string; drafts: DeviationDraft[]; row?: ReadingRow };
/** What a flush decided for one request before writing: refused, a repeat (of a stored or an added reading), or new. */
type Judged = { error: unknown } | { repeatOf: () => number; startedAt: string } | Added;

/**
 * Group commit for logged readings. Each reading is its own fsync'd write under synchronous=FULL, so one
 * transaction per request caps ingest at the disk's flush rate. Requests are queued and the queue is stored on
 * the next turn of the event loop in ONE transaction: each reading with its own audit event, in arrival order.
 * A refused reading (bad time, reused key, closed batch) fails alone: every reading is judged first, from what the
 * database holds and the readings before it in the queue, and only then are the accepted ones written, a few
 * statements for the whole group. Every request is answered only after the transaction committed, so a 2xx still
 * means the reading is on disk.
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
  return await writeTx(db, async (t) => {
    const groups = await loadGroups(t, reqs);
    // Judged in arrival order; nothing is written until every reading is judged.
    const judged = reqs.map((req): Judged => {
      try {
        return judge(groups.get(groupKey(req))!, req, now);
      } catch (error) {
        return { error };
      }
    });
    const added = judged.filter((j): j is Added => 'req' in j);
    const rows = await insertReadingRows(
      t,
      added.map(({ req: { u, batchId, input, source }, takenAt, note }) => ({
        siteId: u.siteId,
        batchId,
        clientKey: input.key,
        takenAt,
        c: input.c,
        note,
        source,
        enteredBy: u.id,
        receivedAt: now.toISOString(),
      })),
    );
    for (const [i, a] of added.entries()) a.row = rows[i];
    await appendAudits(
      t,
      added.map(({ req: { u, batchId, input, source }, takenAt, note, row }) => ({
        siteId: u.siteId,
        userId: u.id,
        actor: u.email,
        action: 'batch.reading',
        entity: 'batch',
        entityId: batchId,
        newValue: { readingId: row!.id, key: input.key, takenAt, c: input.c, note, ...(source === 'manual' ? {} : { source }) },
        at: now,
      })),
    );
    const out = judged.map((j): Stored => {
      if ('error' in j) return j;
      // A repeat of a reading added earlier in this flush answers with that reading.
      if ('repeatOf' in j) return { created: false, readingId: j.repeatOf(), startedAt: j.startedAt };
      return { created: true, result: { reading: toReading(j.row!, j.req.u.name, j.startedAt), deviations: [] } };
    });
    // Once per batch and flush: the status (and so a low forecast and the corrective setpoints) needs every reading.
    const answers = new Map(out.flatMap((o) => ('result' in o ? [[o.result.reading.id, o.result] as const] : [])));
    for (const g of groups.values()) {
      if ('error' in g || !g.added.length) continue;
      for (const a of g.added) for (const draft of a.drafts) g.raised.push({ readingId: a.row!.id, draft, by: a.req.u });
      g.lastBy = g.added.at(-1)!.req.u;
      for (const row of await raiseDeviations(t, g.lastBy, g.b, g.raised, now, { checkForecast: checksForecast() }))
        if (row.readingId !== null) answers.get(row.readingId)!.deviations.push(toDeviation({ deviation: row, acknowledgedBy: null, closedBy: null }));
    }
    return out;
  });
}

const groupKey = ({ u, batchId }: ReadingRequest) => `${u.siteId}:${batchId}`;
const isoTime = (input: ReadingInput) => new Date(input.takenAt).toISOString();

/** Each batch of the flush once: the batch and its rules, and what the database holds for its readings. */
async function loadGroups(t: Db, reqs: ReadingRequest[]): Promise<Map<string, BatchGroup | { error: unknown }>> {
  const byGroup = new Map<string, ReadingRequest[]>();
  for (const req of reqs) byGroup.set(groupKey(req), [...(byGroup.get(groupKey(req)) ?? []), req]);
  const groups = new Map<string, BatchGroup | { error: unknown }>();
  for (const [key, [firstReq, ...rest]] of byGroup) {
    try {
      const b = (await loadBatch(t, firstReq!.u.siteId, firstReq!.batchId)).batch;
      const all = [firstReq!, ...rest];
      const times = [...new Set(all.flatMap((r) => (Number.isNaN(Date.parse(r.input.takenAt)) ? [] : [isoTime(r.input)])))];
      const before = await readingsAtOrBefore(t, b.id, times);
      groups.set(key, {
        b,
        rules: rulesOf(b.program, await batchSettingsOf(t, firstReq!.u.siteId)),
        stored: new Map((await readingsWithKeys(t, b.id, [...new Set(all.map((r) => r.input.key))])).map((r) => [r.clientKey, r])),
        before: new Map(times.map((at, i) => [at, before[i]])),
        added: [],
        raised: [],
        lastBy: null,
      });
    } catch (error) {
      if (failsWholeTransaction(error)) throw error;
      groups.set(key, { error });
    }
  }
  return groups;
}

/**
 * Whether one reading is stored, as if the readings before it in the flush were stored already: the first with
 * a key answers 201, a repeat of the same reading 200 with the same body, a different reading under a used key 409.
 */
function judge(g: BatchGroup | { error: unknown }, req: ReadingRequest, now: Date): Judged {
  if ('error' in g) throw g.error;
  const { b } = g;
  const { input } = req;
  const takenAt = isoTime(input);
  const note = input.note ? input.note : null;
  const pending = g.added.find((a) => a.req.input.key === input.key);
  const existing = pending ? { takenAt: pending.takenAt, c: pending.req.input.c, note: pending.note } : g.stored.get(input.key);
  if (existing) {
    if (existing.takenAt !== takenAt || existing.c !== input.c || existing.note !== note)
      throw new HttpError(409, 'key_reused', 'This reading key was already used for a different reading', { key: 'Already used for another reading' });
    const storedId = g.stored.get(input.key)?.id;
    return { repeatOf: () => (pending ? pending.row!.id : storedId!), startedAt: b.startedAt };
  }
  if (b.state === 'closed') throw new HttpError(409, 'batch_closed', 'This batch is closed; readings can no longer be added');
  const bad = checkReadingTime(b.startedAt, Date.parse(takenAt), now);
  if (bad) throw new HttpError(400, 'invalid_input', bad, { takenAt: bad });
  // Only the reading before this one in time matters to the rules: the latest stored at or before its time, or a
  // reading of this flush at or before it (which comes after any stored one of the same time, as its id will).
  let before = g.before.get(takenAt);
  for (const a of g.added) if (a.takenAt <= takenAt && (!before || a.takenAt >= before.takenAt)) before = { takenAt: a.takenAt, c: a.req.input.c };
  const prev = before ? { h: batchHours(b.startedAt, before.takenAt), c: before.c } : null;
  const added: Added = {
    req,
    takenAt,
    note,
    startedAt: b.startedAt,
    drafts: readingDeviations(g.rules, prev, { h: batchHours(b.startedAt, takenAt), c: input.c }),
  };
  g.added.push(added);
  return added;
}
