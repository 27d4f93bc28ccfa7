// A batch's reading record as the engine sees it (hours since start and °C, in time order), kept per database
// connection and batch until a reading is added. A 300,000-row historian record takes a second to load and
// integrate; the list, the batch page and each phone reading would otherwise pay that every time.
//
// Readings are only ever added and ids only grow, so the newest id (an index lookup) is the record's version (on
// PostgreSQL with the count beside it: see readingVersion). A record read inside a transaction is not kept: the
// transaction may roll back and its ids be given out again.
import { databaseOf, inWriteTx, type Db } from '../../db/client';
import { batchHours, batchStatus, statusAtHour } from '../../src/batches';
import type { BatchProgram, BatchStatus } from '../../src/contracts/batches';
import type { Reading as Point } from '../../src/model';
import { nextTurn } from '../next-turn';
import { readingPointRows, readingPointRowsAfter, readingVersion, type PointRow } from '../repositories/batches';

export type BatchRecord = {
  version: number;
  ids: Int32Array;
  points: Point[];
  /** Each reading's stored time (ISO text), for merging in later readings. */
  at: string[];
  /** Status at batch hour 0 without and with a corrective setpoint: the integration, kept; see statusNow. */
  status?: BatchStatus;
  withCorrective?: BatchStatus;
};

const KEPT_PER_CONNECTION = 32;
const kept = new WeakMap<object, Map<number, BatchRecord>>();

type BatchRef = { id: number; startedAt: string };

type Row = PointRow;

function fromRows(rows: readonly Row[], startedAt: string): { ids: Int32Array; points: Point[]; at: string[] } {
  const ids = new Int32Array(rows.length);
  const points: Point[] = new Array(rows.length);
  const at: string[] = new Array(rows.length);
  const startMs = Date.parse(startedAt);
  for (let i = 0; i < rows.length; i++) {
    const [id, takenAt, c] = rows[i]!;
    ids[i] = id;
    at[i] = takenAt;
    points[i] = { h: (Date.parse(takenAt) - startMs) / 3_600_000, c };
  }
  return { ids, points, at };
}

type Added = ReturnType<typeof fromRows>;

/** The kept record with the readings added since merged in, in the stored order (time, then id), `rows` a step. */
function merger(old: BatchRecord, added: Added) {
  const n = old.ids.length + added.ids.length;
  const ids = new Int32Array(n);
  const points: Point[] = new Array(n);
  const at: string[] = new Array(n);
  let i = 0;
  let j = 0;
  let k = 0;
  return {
    /** Merges the next `rows`; true once all are. */
    step(rows: number): boolean {
      for (const end = Math.min(n, k + rows); k < end; k++) {
        // Times are toISOString() text: text order is time order; equal times keep id order (old ids are lower).
        const takeOld = j >= added.ids.length || (i < old.ids.length && old.at[i]! <= added.at[j]!);
        if (takeOld) {
          ids[k] = old.ids[i]!;
          points[k] = old.points[i]!;
          at[k] = old.at[i++]!;
        } else {
          ids[k] = added.ids[j]!;
          points[k] = added.points[j]!;
          at[k] = added.at[j++]!;
        }
      }
      return k === n;
    },
    record: (version: number): BatchRecord => ({ version, ids, points, at }),
  };
}

function merged(old: BatchRecord, added: Added, version: number): BatchRecord {
  const m = merger(old, added);
  m.step(Infinity);
  return m.record(version);
}

function keep(db: Db, batchId: number, record: BatchRecord) {
  let byBatch = kept.get(databaseOf(db));
  if (!byBatch) kept.set(databaseOf(db), (byBatch = new Map()));
  byBatch.delete(batchId);
  byBatch.set(batchId, record);
  if (byBatch.size > KEPT_PER_CONNECTION) byBatch.delete(byBatch.keys().next().value!);
}

// Rows merged per turn of the event loop: a few milliseconds.
const MERGED_PER_TURN = 10_000;

/**
 * Keeps `base` with readings just stored merged in, a step per turn, when they are all the batch gained since
 * `base` (the caller knows: an import that stored ids base.version+1 to `version`). The base status (statusNow's,
 * with corrective) may come along, computed elsewhere over the same readings. A large import's record would
 * otherwise be read back and merged in one long turn by whichever request reads the batch next.
 */
export async function keepAdded(db: Db, b: BatchRef, base: BatchRecord, added: Added, version: number, withCorrective: BatchStatus | null): Promise<void> {
  const m = merger(base, added);
  while (!m.step(MERGED_PER_TURN)) await nextTurn();
  const now = await readingVersion(db, b.id);
  // More came meanwhile (or, on PostgreSQL, a reading with a lower id became visible): the next reader merges.
  if (now.newest !== version || (now.count !== null && now.count !== base.ids.length + added.ids.length)) return;
  const record = m.record(version);
  if (withCorrective) {
    record.withCorrective = withCorrective;
    record.status = { ...withCorrective, corrective: null };
  }
  keep(db, b.id, record);
}

export async function batchRecordOf(db: Db, b: BatchRef): Promise<BatchRecord> {
  const { newest: version, count } = await readingVersion(db, b.id);
  const hit = kept.get(databaseOf(db))?.get(b.id);
  const complete = (r: { ids: Int32Array }) => count === null || r.ids.length === count;
  if (hit && hit.version === version && complete(hit)) return hit;
  let record = hit && hit.version < version ? merged(hit, fromRows(await readingPointRowsAfter(db, b.id, hit.version), b.startedAt), version) : null;
  if (!record || !complete(record)) record = { version, ...fromRows(await readingPointRows(db, b.id), b.startedAt) };
  if (inWriteTx(db)) return record;
  keep(db, b.id, record);
  return record;
}

/** The batch's status now: the kept integration with the figures that depend on the clock brought up to date. */
export async function statusNow(db: Db, b: BatchRef & { program: BatchProgram }, nowIso: string, withCorrective = false): Promise<BatchStatus> {
  const record = await batchRecordOf(db, b);
  const nowH = batchHours(b.startedAt, nowIso);
  // Neither the integration nor the corrective setpoint (from the state at the last reading) depends on the clock.
  const base = withCorrective
    ? (record.withCorrective ??= batchStatus(b.program, record.points, 0, true))
    : (record.status ??= batchStatus(b.program, record.points, 0));
  return statusAtHour(b.program, base, nowH);
}
