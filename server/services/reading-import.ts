// Historian imports: a file read and checked on the import worker, then stored in parts with progress.
import { writeTx, type Db } from '../../db/client';
import { batchHours, isTimeZone, deviationRun } from '../../src/batches';
import { READING_MAX_C, READING_MIN_C, type ImportProblem, type ImportProgress, type ImportQuery, type ImportResult } from '../../src/contracts/batches';
import type { SessionUser } from '../../src/contracts/session';
import { HttpError } from '../http-error';
import { runImport } from '../imports';
import { batchRecordOf } from './batch-record';
import { existingKeys, insertReadings } from '../repositories/batches';
import type { Services } from '../routes/services';
import { appendAudit } from './audit';
import { nextTurn } from '../next-turn';
import { batchSettingsOf, loadBatch, runningBatch } from './batches';
import { raiseDeviations } from './deviations';
import { checkReadingTime, rulesOf } from './readings';

const pointsOf = (db: Db, b: { id: number; startedAt: string }) => batchRecordOf(db, b).points;

const MAX_PROBLEMS = 200;
// Rows checked between turns of the event loop: a few milliseconds of work, so other requests get in between.
const ROWS_PER_TURN = 10_000;
// About 40 ms of inserts on this machine's kind (7.5 us a row measured under load): the longest any other request waits.
const ROWS_PER_PART = 5_000;

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
