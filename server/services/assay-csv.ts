// Reading residual-activity CSVs and typed tables into checked points, and writing points back out as CSV.
// The CSV is split by server/csv-reader.ts; this file knows what an assay's columns and values mean.
import { MAX_ASSAY_ROWS, type AssayRowInput, type ResidualScale } from '../../src/contracts/assays';
import { residualScale } from '../../src/model';
import { toCsv } from '../csv';
import { csvNumber, readCsv, type CsvLayout } from '../csv-reader';
import { HttpError } from '../http-error';

export type CheckedPoint = { line: number; tempC: number; timeH: number; residual: number; note: string | null };
export type CheckedAssay = { points: CheckedPoint[]; scale: ResidualScale; scaleNote: string };

// The residual column's header states its unit (fraction of the activity at time 0, or per cent), so the
// uploader says which rather than the server guessing from the values.
export const ASSAY_TEMPLATE_CSV =
  'temperature_c,time_h,residual_activity_fraction,note\r\n' +
  '60,0,1.00,reference at t = 0\r\n60,4,0.87,\r\n60,8,0.76,\r\n65,0,1.00,\r\n65,2,0.71,\r\n65,4,0.52,\r\n70,0,1.00,\r\n70,1,0.58,\r\n70,2,0.34,\r\n';

// Limits on a plausible enzyme assay: outside them a value is a unit slip (kelvin, minutes, per cent) or a typo.
const TEMP_RANGE_C: [number, number] = [-20, 150];
const MAX_TIME_H = 10_000;
const MAX_FRACTION = 1.5;
const MAX_NOTE = 200;
const MAX_REPORTED = 50;

type Columns = { temp: number; time: number; residual: number; note: number | null; headerScale: ResidualScale | null };

function findColumns(header: string[]): Columns {
  const h = header.map((c) => c.trim().toLowerCase());
  const find = (re: RegExp) => h.findIndex((c) => re.test(c));
  const temp = find(/^(temp|temperature|t\b|t_c|t \(|°c)/);
  const time = find(/^(time|hours?\b|h\b|t_h|duration)/);
  const residual = find(/(residual|activity|remaining)/);
  const noteAt = find(/^(note|notes|sample|comment|remark)/);
  const missing = [temp < 0 && 'temperature (°C)', time < 0 && 'time (h)', residual < 0 && 'residual activity'].filter(Boolean);
  if (missing.length) {
    throw new HttpError(400, 'missing_columns', `The header row lacks ${missing.join(', ')}. Start from the template CSV.`, {
      columns: `Found: ${header.map((c) => c.trim()).join(', ') || 'nothing'}; missing: ${missing.join(', ')}`,
    });
  }
  const unit = h[residual]!;
  const headerScale = /%|percent|pct/.test(unit) ? 'percent' : /fraction/.test(unit) ? 'fraction' : null;
  return { temp, time, residual, note: noteAt < 0 ? null : noteAt, headerScale };
}

type RawRow = { label: string; line: number; temp: unknown; time: unknown; residual: unknown; note: unknown };
type Scale = { scale: ResidualScale; note: string };

const num = (v: unknown, separator: CsvLayout['separator']): number | null => {
  if (typeof v === 'number') return Number.isFinite(v) ? v : null;
  return typeof v === 'string' ? csvNumber(v, separator) : null;
};

// Shown in a reason; cut so a huge or hostile cell cannot flood the message.
const shown = (v: unknown) => JSON.stringify(String(v).slice(0, 24));

const tooManyRows = (n: number, atLeast: boolean) =>
  new HttpError(
    400,
    'too_many_rows',
    `The ${atLeast ? 'file has at least' : 'assay has'} ${n.toLocaleString('en')} data rows; the limit is ${MAX_ASSAY_ROWS.toLocaleString('en')}. Split it or thin it out.`,
  );

const SCALE_NOTES = {
  chosen: { percent: 'Residual activity read as per cent, as chosen.', fraction: 'Residual activity read as fractions of the activity at time 0, as chosen.' },
  header: {
    percent: 'Residual activity read as per cent: the column header says so.',
    fraction: 'Residual activity read as fractions of the activity at time 0: the column header says so.',
  },
} as const;

/** Checks every row against the stated scale (or, for typed rows without one, the detected scale) and throws one 400 listing bad rows: nothing partial gets through. */
function checkRows(rows: RawRow[], stated: Scale | null, separator: CsvLayout['separator']): CheckedAssay {
  if (rows.length === 0) throw new HttpError(400, 'no_rows', 'There are no data rows under the header');
  if (rows.length > MAX_ASSAY_ROWS) throw tooManyRows(rows.length, false);
  const problems: [string, string][] = [];
  const parsed = rows.map((r) => {
    const reasons: string[] = [];
    const tempC = num(r.temp, separator);
    const timeH = num(r.time, separator);
    const residual = num(r.residual, separator);
    if (tempC === null) reasons.push(`temperature ${shown(r.temp)} is not a number`);
    else if (tempC < TEMP_RANGE_C[0] || tempC > TEMP_RANGE_C[1])
      reasons.push(`temperature ${tempC} °C is outside ${TEMP_RANGE_C[0]} to ${TEMP_RANGE_C[1]} °C (kelvin?)`);
    if (timeH === null) reasons.push(`time ${shown(r.time)} is not a number`);
    else if (timeH < 0 || timeH > MAX_TIME_H) reasons.push(`time ${timeH} h is outside 0 to ${MAX_TIME_H} h`);
    if (residual === null) reasons.push(`residual activity ${shown(r.residual)} is not a number`);
    else if (residual <= 0) reasons.push('residual activity must be above 0 (a log fit cannot use 0)');
    const note = r.note == null ? null : String(r.note);
    if (note !== null && note.length > MAX_NOTE) reasons.push(`note is longer than ${MAX_NOTE} characters`);
    if (reasons.length) problems.push([r.label, reasons.join('; ')]);
    return { line: r.line, tempC: tempC ?? NaN, timeH: timeH ?? NaN, residual: residual ?? NaN, note: note === null || note.trim() === '' ? null : note };
  });
  let scale: ResidualScale;
  let scaleNote: string;
  if (stated) ({ scale, note: scaleNote } = stated);
  else {
    scale = residualScale(parsed.map((p) => p.residual).filter(Number.isFinite));
    scaleNote =
      scale === 'percent'
        ? 'Residual activity read as per cent: values above 1.5 were found.'
        : 'Residual activity read as fractions of the activity at time 0: every value is 1.5 or below.';
  }
  const max = scale === 'percent' ? MAX_FRACTION * 100 : MAX_FRACTION;
  parsed.forEach((p, i) => {
    if (Number.isFinite(p.residual) && p.residual > max) {
      const label = rows[i]!.label;
      const prev = problems.find(([l]) => l === label);
      const reason = `residual activity ${p.residual} is above ${max}${scale === 'percent' ? ' %' : ''}${scale === 'fraction' && p.residual > 1.5 ? ' (per cent? the file says fraction)' : ''}`;
      if (prev) prev[1] += `; ${reason}`;
      else problems.push([label, reason]);
    }
  });
  if (problems.length) {
    const order = new Map(rows.map((r, i) => [r.label, i]));
    problems.sort((a, b) => order.get(a[0])! - order.get(b[0])!);
    const fields = Object.fromEntries(problems.slice(0, MAX_REPORTED));
    const more = problems.length > MAX_REPORTED ? ` (first ${MAX_REPORTED} listed)` : '';
    throw new HttpError(400, 'invalid_rows', `${problems.length} row${problems.length === 1 ? ' has' : 's have'} problems${more}; nothing was saved.`, fields);
  }
  const factor = scale === 'percent' ? 0.01 : 1;
  return { points: parsed.map((p) => ({ ...p, residual: p.residual * factor })), scale, scaleNote };
}

/** The residual unit of a CSV: chosen at upload or named by the column header; they must agree, and one must say. */
function csvScale(chosen: ResidualScale | undefined, header: ResidualScale | null): Scale {
  if (chosen && header && chosen !== header) {
    throw new HttpError(
      400,
      'scale_conflict',
      `The residual column's header says ${header === 'percent' ? 'per cent' : 'fraction'} but ${chosen === 'percent' ? 'per cent' : 'fraction'} was chosen. Fix one of them.`,
      { scale: 'Does not match the column header' },
    );
  }
  if (chosen) return { scale: chosen, note: SCALE_NOTES.chosen[chosen] };
  if (header) return { scale: header, note: SCALE_NOTES.header[header] };
  throw new HttpError(
    400,
    'scale_missing',
    'Say whether residual activity is a fraction of the activity at time 0 or per cent: name the column residual_activity_fraction or residual_activity_percent (as the template does), or choose the unit when uploading.',
    {
      scale: 'Fraction or per cent?',
    },
  );
}

/**
 * A CSV upload: header row with temperature, time and residual activity columns (any order), optional note;
 * `scale` is the unit chosen at upload, else the residual column's header must name it.
 */
export async function readAssayCsv(bytes: Uint8Array, scale?: ResidualScale): Promise<CheckedAssay> {
  let cols: Columns | null = null;
  const rows: RawRow[] = [];
  const layout = await readCsv(bytes, {
    // The header and one row past the limit: enough to refuse an oversized file without reading the rest.
    maxRecords: MAX_ASSAY_ROWS + 1,
    tooMany: (n) => tooManyRows(n - 1, true),
    onRecord: ({ line, cells }) => {
      if (!cols) {
        cols = findColumns(cells);
        return;
      }
      const c: Columns = cols;
      rows.push({
        label: `line ${line}`,
        line,
        temp: cells[c.temp] ?? '',
        time: cells[c.time] ?? '',
        residual: cells[c.residual] ?? '',
        note: c.note === null ? null : (cells[c.note] ?? null),
      });
    },
  });
  if (!cols) throw new HttpError(400, 'no_rows', 'The file is empty');
  return checkRows(rows, csvScale(scale, (cols as Columns).headerScale), layout.separator);
}

/** Rows typed into the editable table; `scale` forces how residuals are read, else it is detected. */
export function readAssayTable(rows: AssayRowInput[], scale?: ResidualScale): CheckedAssay {
  return checkRows(
    rows.map((r, i) => ({ label: `row ${i + 1}`, line: i + 1, temp: r.tempC, time: r.timeH, residual: r.residual, note: r.note ?? null })),
    scale ? { scale, note: SCALE_NOTES.chosen[scale] } : null,
    ',',
  );
}

/** All points of one assay as CSV, residuals as fractions; text cells escaped against spreadsheet formulas. */
export function assayPointsCsv(points: readonly { tempC: number; timeH: number; residual: number; note: string | null }[]): string {
  return toCsv(
    ['temperature_c', 'time_h', 'residual_activity_fraction', 'note'],
    points.map((p) => [p.tempC, p.timeH, p.residual, p.note]),
  );
}
