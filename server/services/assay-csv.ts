// Reading residual-activity CSVs and typed tables into checked points, and writing points back out as CSV.
import { MAX_ASSAY_ROWS, type AssayRowInput, type ResidualScale } from '../../src/contracts/assays';
import { residualScale } from '../../src/model';
import { HttpError } from '../http-error';

export type CheckedPoint = { line: number; tempC: number; timeH: number; residual: number; note: string | null };
export type CheckedAssay = { points: CheckedPoint[]; scale: ResidualScale; scaleNote: string };

export const ASSAY_TEMPLATE_CSV =
  'temperature_c,time_h,residual_activity,note\r\n' +
  '60,0,1.00,reference at t = 0\r\n60,4,0.87,\r\n60,8,0.76,\r\n65,0,1.00,\r\n65,2,0.71,\r\n65,4,0.52,\r\n70,0,1.00,\r\n70,1,0.58,\r\n70,2,0.34,\r\n';

// Limits on a plausible enzyme assay: outside them a value is a unit slip (kelvin, minutes, per cent) or a typo.
const TEMP_RANGE_C: [number, number] = [-20, 150];
const MAX_TIME_H = 10_000;
const MAX_FRACTION = 1.5;
const MAX_NOTE = 200;
const MAX_REPORTED = 50;
const NUMBER = /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/;

/** Splits CSV text into rows of cells (RFC 4180 quoting), keeping each row's line number in the file. */
export function parseCsv(text: string): { line: number; cells: string[] }[] {
  const src = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const firstLine = src.slice(0, src.search(/\r?\n|$/));
  const sep = !firstLine.includes(',') && firstLine.includes(';') ? ';' : ',';
  const rows: { line: number; cells: string[] }[] = [];
  let cells: string[] = [];
  let cell = '';
  let inQuotes = false;
  let line = 1;
  let rowLine = 1;
  for (let i = 0; i < src.length; i++) {
    const ch = src[i]!;
    if (inQuotes) {
      if (ch === '"' && src[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') inQuotes = false;
      else {
        if (ch === '\n') line++;
        cell += ch;
      }
    } else if (ch === '"' && cell === '') inQuotes = true;
    else if (ch === sep) {
      cells.push(cell);
      cell = '';
    } else if (ch === '\n' || ch === '\r') {
      if (ch === '\r' && src[i + 1] === '\n') i++;
      cells.push(cell);
      rows.push({ line: rowLine, cells });
      cells = [];
      cell = '';
      line++;
      rowLine = line;
    } else cell += ch;
  }
  if (cell !== '' || cells.length) {
    cells.push(cell);
    rows.push({ line: rowLine, cells });
  }
  return rows.filter((r) => r.cells.some((c) => c.trim() !== ''));
}

type Columns = { temp: number; time: number; residual: number; note: number | null; isPercentHeader: boolean };

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
  return { temp, time, residual, note: noteAt < 0 ? null : noteAt, isPercentHeader: /%|percent|pct/.test(h[residual]!) };
}

type RawRow = { label: string; line: number; temp: unknown; time: unknown; residual: unknown; note: unknown };

const num = (v: unknown): number | null => {
  if (typeof v === 'number') return Number.isFinite(v) ? v : null;
  if (typeof v !== 'string') return null;
  const s = v.trim();
  return NUMBER.test(s) ? Number(s) : null;
};

// Shown in a reason; cut so a huge or hostile cell cannot flood the message.
const shown = (v: unknown) => JSON.stringify(String(v).slice(0, 24));

function checkRowCount(n: number): void {
  if (n > MAX_ASSAY_ROWS) {
    throw new HttpError(400, 'too_many_rows', `The assay has ${n.toLocaleString('en')} data rows; the limit is ${MAX_ASSAY_ROWS.toLocaleString('en')}. Split it or thin it out.`);
  }
}

/** Checks every row, detects fraction vs per cent, and throws one 400 listing bad rows: nothing partial gets through. */
function checkRows(rows: RawRow[], forced: ResidualScale | undefined, isPercentHeader: boolean): CheckedAssay {
  if (rows.length === 0) throw new HttpError(400, 'no_rows', 'There are no data rows under the header');
  checkRowCount(rows.length);
  const problems: [string, string][] = [];
  const parsed = rows.map((r) => {
    const reasons: string[] = [];
    const tempC = num(r.temp);
    const timeH = num(r.time);
    const residual = num(r.residual);
    if (tempC === null) reasons.push(`temperature ${shown(r.temp)} is not a number`);
    else if (tempC < TEMP_RANGE_C[0] || tempC > TEMP_RANGE_C[1]) reasons.push(`temperature ${tempC} °C is outside ${TEMP_RANGE_C[0]} to ${TEMP_RANGE_C[1]} °C (kelvin?)`);
    if (timeH === null) reasons.push(`time ${shown(r.time)} is not a number`);
    else if (timeH < 0 || timeH > MAX_TIME_H) reasons.push(`time ${timeH} h is outside 0 to ${MAX_TIME_H} h`);
    if (residual === null) reasons.push(`residual activity ${shown(r.residual)} is not a number`);
    else if (residual <= 0) reasons.push('residual activity must be above 0 (a log fit cannot use 0)');
    const note = r.note == null ? null : String(r.note);
    if (note !== null && note.length > MAX_NOTE) reasons.push(`note is longer than ${MAX_NOTE} characters`);
    if (reasons.length) problems.push([r.label, reasons.join('; ')]);
    return { line: r.line, tempC: tempC ?? NaN, timeH: timeH ?? NaN, residual: residual ?? NaN, note: note === null || note.trim() === '' ? null : note };
  });
  const values = parsed.map((p) => p.residual).filter(Number.isFinite);
  const scale: ResidualScale = forced ?? (isPercentHeader ? 'percent' : residualScale(values));
  const scaleNote =
    forced === 'percent'
      ? 'Residual activity read as per cent, as chosen.'
      : forced === 'fraction'
        ? 'Residual activity read as fractions of the activity at time 0, as chosen.'
        : isPercentHeader
          ? 'Residual activity read as per cent: the column header says so.'
          : scale === 'percent'
            ? 'Residual activity read as per cent: values above 1.5 were found.'
            : 'Residual activity read as fractions of the activity at time 0: every value is 1.5 or below.';
  const max = scale === 'percent' ? MAX_FRACTION * 100 : MAX_FRACTION;
  parsed.forEach((p, i) => {
    if (Number.isFinite(p.residual) && p.residual > max) {
      const label = rows[i]!.label;
      const prev = problems.find(([l]) => l === label);
      const reason = `residual activity ${p.residual} is above ${max}${scale === 'percent' ? ' %' : ''}`;
      if (prev) prev[1] += `; ${reason}`;
      else problems.push([label, reason]);
    }
  });
  if (problems.length) {
    problems.sort((a, b) => rows.findIndex((r) => r.label === a[0]) - rows.findIndex((r) => r.label === b[0]));
    const fields = Object.fromEntries(problems.slice(0, MAX_REPORTED));
    const more = problems.length > MAX_REPORTED ? ` (first ${MAX_REPORTED} listed)` : '';
    throw new HttpError(400, 'invalid_rows', `${problems.length} row${problems.length === 1 ? ' has' : 's have'} problems${more}; nothing was saved.`, fields);
  }
  const factor = scale === 'percent' ? 0.01 : 1;
  return { points: parsed.map((p) => ({ ...p, residual: p.residual * factor })), scale, scaleNote };
}

/** A CSV upload: header row with temperature, time and residual activity columns (any order), optional note. */
export function readAssayCsv(buf: Buffer): CheckedAssay {
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(buf);
  } catch {
    throw new HttpError(400, 'not_text', 'The file is not UTF-8 text; save it as CSV (UTF-8)');
  }
  if (text.includes('\u0000')) throw new HttpError(400, 'not_text', 'The file is not a CSV text file');
  const table = parseCsv(text);
  if (!table.length) throw new HttpError(400, 'no_rows', 'The file is empty');
  const cols = findColumns(table[0]!.cells);
  const data = table.slice(1);
  // Counted before any row is checked, so an oversized file is refused quickly and for the right reason.
  checkRowCount(data.length);
  return checkRows(
    data.map((r) => ({
      label: `line ${r.line}`,
      line: r.line,
      temp: r.cells[cols.temp] ?? '',
      time: r.cells[cols.time] ?? '',
      residual: r.cells[cols.residual] ?? '',
      note: cols.note === null ? null : (r.cells[cols.note] ?? null),
    })),
    undefined,
    cols.isPercentHeader,
  );
}

/** Rows typed into the editable table; `scale` forces how residuals are read, else it is detected. */
export function readAssayTable(rows: AssayRowInput[], scale?: ResidualScale): CheckedAssay {
  return checkRows(
    rows.map((r, i) => ({ label: `row ${i + 1}`, line: i + 1, temp: r.tempC, time: r.timeH, residual: r.residual, note: r.note ?? null })),
    scale,
    false,
  );
}

// A spreadsheet runs a cell that starts with one of these as a formula (OWASP CSV injection).
const FORMULA_START = /^[=+\-@\t\r]/;

/** One CSV cell: text that a spreadsheet would run is prefixed with a quote mark; quoting per RFC 4180. */
export function csvCell(v: string | number | null): string {
  if (v === null) return '';
  if (typeof v === 'number') return String(v);
  const safe = FORMULA_START.test(v) ? `'${v}` : v;
  return /[",\r\n;]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

export function assayPointsCsv(points: readonly { tempC: number; timeH: number; residual: number; note: string | null }[]): string {
  const lines = ['temperature_c,time_h,residual_activity,note'];
  for (const p of points) lines.push([p.tempC, p.timeH, p.residual, p.note].map(csvCell).join(','));
  return `${lines.join('\r\n')}\r\n`;
}
