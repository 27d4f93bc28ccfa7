// CSV written for spreadsheets: RFC 4180 quoting, and cells that a spreadsheet would run as a formula
// (leading = + - @, tab or carriage return; OWASP "CSV injection") prefixed with a quote so they stay text.
const FORMULA_START = /^[=+\-@\t\r]/;

/** One cell, safe to open in a spreadsheet. */
export function csvCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  let s = typeof value === 'string' ? value : typeof value === 'object' ? JSON.stringify(value) : String(value);
  if (typeof value === 'string' && FORMULA_START.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Rows as CSV lines, each ending CRLF (a part of a document written in pieces). */
export function csvLines(rows: readonly unknown[][]): string {
  return rows.map((r) => r.map(csvCell).join(',') + '\r\n').join('');
}

/** A whole CSV document with a header row and CRLF line ends. */
export function toCsv(header: string[], rows: unknown[][]): string {
  return csvLines([header, ...rows]);
}
