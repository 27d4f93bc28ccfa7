// What a historian import will store, worked out on the import worker from the read file and the batch as it
// stood when the import began: each row checked (range, time, repeats in the file, already stored, order), the
// rows to store in time order, the deviations they raise and the batch's status with them. Pure: the server's
// thread only stores the result, in short parts (server/services/reading-import.ts).
import { batchStatus, CORRECTABLE, deviationRun, plannedAt, type DeviationDraft, type ReadingRules } from '../../src/batches';
import {
  CLOCK_SKEW_MIN,
  READING_MAX_C,
  READING_MIN_C,
  type BatchProgram,
  type BatchSettings,
  type BatchStatus,
  type ImportProblem,
} from '../../src/contracts/batches';
import type { Reading as Point } from '../../src/model';
import type { CsvEncoding } from '../csv-reader';
import type { ParsedCsv } from './historian-csv';

export const MAX_PROBLEMS = 200;

export const rulesOf = (program: BatchProgram, settings: BatchSettings): ReadingRules => ({
  ...settings,
  vesselMaxC: program.vessel.maxC,
  plannedAt: (h) => plannedAt(program, h),
});

export function checkReadingTime(startedAt: string, takenMs: number, now: Date): string | null {
  if (takenMs > now.getTime() + CLOCK_SKEW_MIN * 60_000) return `More than ${CLOCK_SKEW_MIN} min ahead of the server's clock`;
  if (takenMs < Date.parse(startedAt)) return 'Before the batch started';
  return null;
}

/** The batch as the import found it: its stored readings (in stored order: time, then id) and historian keys. */
export type ImportBasis = {
  startedAt: string;
  program: BatchProgram;
  settings: BatchSettings;
  nowMs: number;
  /** The batch's stored reading keys, pages joined by newlines (a few long strings cross threads cheaply). */
  storedKeys: string[];
  storedH: Float64Array;
  storedC: Float64Array;
};

export type ImportPlan = {
  total: number;
  encoding: CsvEncoding;
  /** The rows to store, in time order: instant (ms) and °C. */
  atMs: Float64Array;
  c: Float64Array;
  /** The first MAX_PROBLEMS problems by line; `skipped` counts all rows not stored. */
  problems: ImportProblem[];
  skipped: number;
  outOfOrder: number;
  /** Deviations, by index into the rows to store. */
  drafts: { index: number; draft: DeviationDraft }[];
  /** The status at batch hour 0 with a corrective setpoint over stored and new readings (statusNow's base), when one can be needed. */
  status: BatchStatus | null;
};

export function planImport(parsed: ParsedCsv, basis: ImportBasis): ImportPlan {
  const { startedAt, program } = basis;
  const now = new Date(basis.nowMs);
  const startMs = Date.parse(startedAt);
  const problems: ImportProblem[] = parsed.problems.map((p) => ({ line: p.line, kind: 'invalid', message: p.message }));
  const keys = new Set(basis.storedKeys.flatMap((page) => (page ? page.split('\n') : [])));
  const seen = new Map<number, number>();
  const accepted: { ms: number; c: number }[] = [];
  let outOfOrder = 0;
  let lastMs = -Infinity;
  for (const row of parsed.rows) {
    const { line, c } = row;
    const ms = Date.parse(row.at);
    const at = new Date(ms).toISOString();
    const reject = (kind: ImportProblem['kind'], message: string) => problems.push({ line, kind, message });
    const badTime = checkReadingTime(startedAt, ms, now);
    if (c < READING_MIN_C || c > READING_MAX_C) reject('invalid', `${c} °C is outside ${READING_MIN_C} to ${READING_MAX_C} °C`);
    else if (badTime) reject('invalid', `${at}: ${badTime}`);
    else if (seen.has(ms)) reject('duplicate', `Same time as line ${seen.get(ms)}`);
    else if (keys.has(`historian:${at}`)) reject('already_stored', `A reading at ${at} (UTC, to the millisecond) is already stored`);
    else {
      if (ms < lastMs) {
        outOfOrder++;
        reject('out_of_order', `Earlier than the line before it; stored in time order`);
      }
      lastMs = Math.max(lastMs, ms);
      seen.set(ms, line);
      accepted.push({ ms, c });
    }
  }
  // Rows are checked in file order: sorted already unless the file went back in time.
  if (problems.some((p, i) => i > 0 && p.line < problems[i - 1]!.line)) problems.sort((a, b) => a.line - b.line);
  if (outOfOrder) accepted.sort((a, b) => a.ms - b.ms);
  const added: Point[] = accepted.map((a) => ({ h: (a.ms - startMs) / 3_600_000, c: a.c }));
  const stored: Point[] = Array.from(basis.storedH, (h, i) => ({ h, c: basis.storedC[i]! }));
  const drafts = deviationRun(rulesOf(program, basis.settings), stored)(added);
  // The status integrates the whole record: stored readings first where times are equal (their ids are lower).
  const needsStatus = added.length > 0 && (program.p10GPerL !== null || drafts.some((d) => CORRECTABLE.has(d.draft.kind)));
  const status = needsStatus ? batchStatus(program, mergeByH(stored, added), 0, true) : null;
  return {
    total: parsed.total,
    encoding: parsed.encoding,
    atMs: Float64Array.from(accepted, (a) => a.ms),
    c: Float64Array.from(accepted, (a) => a.c),
    problems: problems.slice(0, MAX_PROBLEMS),
    skipped: problems.filter((p) => p.kind !== 'out_of_order').length,
    outOfOrder,
    drafts,
    status,
  };
}

function mergeByH(stored: readonly Point[], added: readonly Point[]): Point[] {
  const out: Point[] = new Array(stored.length + added.length);
  let i = 0;
  let j = 0;
  for (let k = 0; k < out.length; k++) out[k] = j >= added.length || (i < stored.length && stored[i]!.h <= added[j]!.h) ? stored[i++]! : added[j++]!;
  return out;
}
