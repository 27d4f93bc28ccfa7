// Plant historian exports: a time column and a degC column. Exports differ by site and tool, so the reader
// accepts the common shapes: comma, semicolon or tab separators (semicolon files may use a decimal comma), an
// optional header naming the columns, and the time formats of src/batches/historian-csv.ts. The CSV itself is
// split by server/csv-reader.ts, inside the import worker.
import { parseTime, type DateOrder } from '../../src/batches';
import { MAX_IMPORT_ROWS } from '../../src/contracts/batches';
import { csvNumber, readCsv, type CsvEncoding, type CsvLayout } from '../csv-reader';
import { HttpError } from '../http-error';

export type ParsedRow = { line: number; at: string; c: number };
export type RowProblem = { line: number; message: string };
export type ParsedCsv = { rows: ParsedRow[]; problems: RowProblem[]; total: number; encoding: CsvEncoding };

const TIME_HEADER = /^(time|timestamp|date ?time|datetime|date|ts|zeit)$/i;
const TEMP_HEADER = /(deg ?c|°c|temp|temperature|value|pv)/i;

type Columns = { time: number; temp: number };

const tooMany = () =>
  new HttpError(400, 'too_many_rows', `The file has more than ${MAX_IMPORT_ROWS.toLocaleString('en')} readings, the limit for one import. Split it by time.`);

// The first record is a header when its first cell is no time and its second does not start like a number.
function columnsOf(head: string[], opts: { timeZone: string; dateOrder: DateOrder }): Columns | null {
  const cells = head.map((h) => h.trim());
  if (typeof parseTime(cells[0] ?? '', opts.timeZone, opts.dateOrder) === 'string' || /^-?\d/.test(cells[1] ?? '')) return null;
  const t = cells.findIndex((h) => TIME_HEADER.test(h));
  const c = cells.findIndex((h, i) => i !== t && TEMP_HEADER.test(h));
  return { time: t >= 0 ? t : 0, temp: c >= 0 ? c : t > 0 ? 0 : 1 };
}

/** Reads a historian export; rows that cannot be read are reported by line (1-based, header included). */
export async function readHistorianCsv(
  bytes: Uint8Array,
  opts: { timeZone: string; dateOrder: DateOrder; onProgress?: (bytesRead: number) => void },
): Promise<ParsedCsv> {
  const rows: ParsedRow[] = [];
  const problems: RowProblem[] = [];
  let cols: Columns | null = null;
  let total = 0;
  let separator: CsvLayout['separator'] = ',';
  const { encoding } = await readCsv(bytes, {
    onLayout: (layout) => (separator = layout.separator),
    // The header and one reading past the limit: enough to refuse an oversized file without reading the rest.
    maxRecords: MAX_IMPORT_ROWS + 2,
    tooMany,
    onProgress: opts.onProgress,
    onRecord: ({ line, cells }) => {
      if (!cols) {
        const header = columnsOf(cells, opts);
        cols = header ?? { time: 0, temp: 1 };
        if (header) return;
      }
      if (++total > MAX_IMPORT_ROWS) throw tooMany();
      const { time, temp } = cols!;
      const at = parseTime(cells[time] ?? '', opts.timeZone, opts.dateOrder);
      if (typeof at !== 'string') {
        problems.push({ line, message: at.error });
        return;
      }
      const raw = (cells[temp] ?? '').trim();
      const c = csvNumber(raw, separator);
      if (c === null || !Number.isFinite(c)) {
        problems.push({ line, message: `Cannot read "${raw.slice(0, 20)}" as a temperature in °C` });
        return;
      }
      rows.push({ line, at, c });
    },
  });
  return { rows, problems, total, encoding };
}
