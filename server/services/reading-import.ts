// Historian imports: the file read, checked and run through the deviation rules on the import worker
// (server/services/historian-plan.ts); this thread only stores the result, in short parts with progress.
import { writeTx } from '../../db/client';
import { isTimeZone, statusAtHour } from '../../src/batches';
import type { ImportProgress, ImportQuery, ImportResult } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import type { Reading as Point } from '../../src/model';
import { HttpError } from '../http-error';
import { runImport } from '../imports';
import { nextTurn } from '../next-turn';
import { insertReadings, newestReadingId, readingKeysAfter } from '../repositories/batches';
import type { Services } from '../context';
import { appendAudit } from './audit';
import { batchRecordOf, keepAdded } from './batch-record';
import { batchSettingsOf, loadBatch, runningBatch } from './batches';
import { raiseDeviations } from './deviations';
import type { ImportBasis } from './historian-plan';

// A part is one transaction, its commit's fsync included, in one turn of the event loop: about 8 ms of inserts
// at 7.5 us a row (measured under load), so no other request waits long behind it. A deviation (its row and its
// audit event with the chain's HMAC) costs about as much as this many readings.
const ROWS_PER_PART = 1_000;
const ROWS_PER_DEVIATION = 10;
// Stored keys read per turn for the worker's "already stored" check.
const KEYS_PER_TURN = 5_000;
const HISTORIAN_KEY = 'historian:';

/** Imports under way, by batch id: bytes read of the upload's total, for the progress answer. */
const importsRunning = new Map<number, Omit<ImportProgress, 'isRunning' | 'phase'> & { phase: 'reading' | 'storing' }>();

/** How far a running import into the batch is, or null when none runs. */
export async function importProgress(s: Services, u: SessionUser, id: number): Promise<ImportProgress> {
  await loadBatch(s.db, u.siteId, id);
  const p = importsRunning.get(id);
  return p ? { isRunning: true, ...p } : { isRunning: false, bytesRead: 0, bytesTotal: 0, phase: null, rowsStored: 0, rowsToStore: 0 };
}

/** The batch's historian keys, a page per turn, as newline-joined pages. */
async function historianKeys(s: Services, batchId: number): Promise<string[]> {
  const pages: string[] = [];
  for (let after = HISTORIAN_KEY; ;) {
    const page = (await readingKeysAfter(s.db, batchId, after, KEYS_PER_TURN)).filter((k) => k.startsWith(HISTORIAN_KEY));
    if (page.length) pages.push(page.join('\n'));
    if (page.length < KEYS_PER_TURN) return pages;
    after = page.at(-1)!;
    await nextTurn();
  }
}

const isoOf = (ms: number | undefined) => (ms === undefined ? null : new Date(ms).toISOString());

/** Where each part ends (exclusive): at ROWS_PER_PART, deviations counted at ROWS_PER_DEVIATION rows each. */
function partEnds(rows: number, draftIndices: readonly number[]): number[] {
  const ends: number[] = [];
  let d = 0;
  for (let from = 0; from < rows || ends.length === 0;) {
    let cost = 0;
    let to = from;
    while (to < rows && cost < ROWS_PER_PART) {
      cost++;
      while (d < draftIndices.length && draftIndices[d] === to) {
        cost += ROWS_PER_DEVIATION;
        d++;
      }
      to++;
    }
    ends.push(to);
    from = to;
  }
  return ends;
}

/**
 * A historian export: read, checked and run through the deviation rules on the import worker against the batch
 * as it stood when the import began, then stored in parts; rows that cannot be stored are reported by line and
 * the rest go in. One import per batch at a time.
 */
export async function importReadings(s: Services, u: SessionUser, id: number, bytes: Uint8Array, q: ImportQuery): Promise<ImportResult> {
  const { db, clock } = s;
  const b0 = (await runningBatch(db, u.siteId, id)).batch;
  const timeZone = q.timeZone ?? u.siteTimeZone;
  if (!isTimeZone(timeZone))
    throw new HttpError(400, 'invalid_input', `Unknown time zone ${timeZone}`, { timeZone: 'Give an IANA zone such as Europe/Berlin' });
  if (importsRunning.has(id)) throw new HttpError(409, 'import_running', 'Another import into this batch is running; try again when it has finished');
  const progress = { bytesRead: 0, bytesTotal: bytes.length, phase: 'reading' as 'reading' | 'storing', rowsStored: 0, rowsToStore: 0 };
  importsRunning.set(id, progress);
  try {
    const record = await batchRecordOf(db, b0);
    const basis: ImportBasis = {
      startedAt: b0.startedAt,
      program: b0.program,
      settings: await batchSettingsOf(db, u.siteId),
      nowMs: clock.now().getTime(),
      storedKeys: await historianKeys(s, b0.id),
      storedH: Float64Array.from(record.points, (p) => p.h),
      storedC: Float64Array.from(record.points, (p) => p.c),
    };
    const plan = await runImport({ kind: 'historian', bytes, timeZone, dateOrder: q.dateOrder, basis }, (n) => (progress.bytesRead = n));
    progress.bytesRead = bytes.length;
    progress.phase = 'storing';
    if (plan.total === 0) throw new HttpError(400, 'invalid_input', 'The file has no readings', { file: 'Expected lines of time and °C' });
    // Read again: the batch may have closed while the file was being read.
    const b = (await runningBatch(db, u.siteId, id)).batch;
    const now = clock.now();
    const n = plan.atMs.length;
    // Each row's stored time and point, made part by part (300,000 at once would be one long turn).
    const at: string[] = new Array(n);
    const points: Point[] = new Array(n);
    const startMs = Date.parse(b.startedAt);
    // Stored in parts, one transaction each, so no other request waits behind the whole file. The audit event
    // goes with the first part and states what the import stores; a part's deviations go with its readings.
    // Should the server stop between parts, those stored stay and the same file uploaded again stores the rest.
    const ends = partEnds(
      n,
      plan.drafts.map((d) => d.index),
    );
    const ids = new Int32Array(n);
    // Whether the batch gained nothing but this import's readings since the worker's basis: then the worker's
    // status is the batch's, and the kept record takes the import in without reading it back.
    let alone = true;
    let raised = 0;
    let d = 0;
    progress.rowsToStore = n;
    for (let part = 0, from = 0; part < ends.length; part++) {
      const to = ends[part]!;
      if (part > 0) await nextTurn();
      const current = part > 0 ? (await runningBatch(db, u.siteId, id)).batch : b;
      raised += await writeTx(db, async (t) => {
        alone &&= (await newestReadingId(t, b.id)) === (from === 0 ? record.version : ids[from - 1]!);
        const rows = [];
        for (let i = from; i < to; i++) {
          const iso = (at[i] = new Date(plan.atMs[i]!).toISOString());
          points[i] = { h: (plan.atMs[i]! - startMs) / 3_600_000, c: plan.c[i]! };
          rows.push({
            siteId: u.siteId,
            batchId: b.id,
            clientKey: `${HISTORIAN_KEY}${iso}`,
            takenAt: iso,
            c: plan.c[i]!,
            note: null,
            source: 'historian' as const,
            enteredBy: u.id,
            receivedAt: now.toISOString(),
          });
        }
        const stored = await insertReadings(t, rows);
        stored.forEach((rid, i) => (ids[from + i] = rid));
        if (part === 0)
          await appendAudit(t, {
            siteId: u.siteId,
            userId: u.id,
            actor: u.email,
            action: 'batch.readings_import',
            entity: 'batch',
            entityId: b.id,
            newValue: {
              rows: plan.total,
              imported: n,
              parts: ends.length,
              timeZone,
              dateOrder: q.dateOrder,
              encoding: plan.encoding,
              first: isoOf(plan.atMs[0]),
              last: isoOf(plan.atMs[n - 1]),
            },
            at: now,
          });
        const mine: { readingId: number; draft: (typeof plan.drafts)[number]['draft'] }[] = [];
        for (; d < plan.drafts.length && plan.drafts[d]!.index < to; d++) mine.push({ readingId: ids[plan.drafts[d]!.index]!, draft: plan.drafts[d]!.draft });
        // The forecast and the corrective setpoint come from the whole record: once, with the last part.
        const last = part === ends.length - 1;
        const status = () => (alone && plan.status ? statusAtHour(b.program, plan.status, (now.getTime() - startMs) / 3_600_000) : null);
        return mine.length || (n && last) ? (await raiseDeviations(t, u, current, mine, now, { checkForecast: last, withCorrective: last, status })).length : 0;
      });
      progress.rowsStored = to;
      from = to;
    }
    if (alone && n) {
      await keepAdded(db, b, record, { ids, at, points }, ids[n - 1]!, plan.status);
    }
    return {
      rows: plan.total,
      imported: n,
      skipped: plan.skipped,
      outOfOrder: plan.outOfOrder,
      deviationsRaised: raised,
      problems: plan.problems,
      timeZone,
      encoding: plan.encoding,
    };
  } finally {
    importsRunning.delete(id);
  }
}
