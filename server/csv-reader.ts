// The one reading path for uploaded CSV (assay tables and historian exports): the bytes' encoding is found from
// their BOM or the bytes themselves, csv-parse splits the text as a stream (RFC 4180 quoting, cells with line
// breaks), and the row limit is checked as records arrive, so an oversized file stops being read at the limit.
// Runs inside the import worker (server/import-worker.ts), never on the server's event loop.
import { parse, type CsvError } from 'csv-parse';
import { finished } from 'node:stream/promises';
import { HttpError } from './http-error';

export type CsvEncoding = 'UTF-8' | 'UTF-16LE' | 'UTF-16BE' | 'Windows-1252';
export type CsvLayout = { separator: ',' | ';' | '\t'; encoding: CsvEncoding };
export type CsvRecord = { line: number; cells: string[] };

const CHUNK_CHARS = 64 * 1024;
// A cell longer than this is not a measurement: most likely a quote that never closes.
const MAX_RECORD_CHARS = 64 * 1024;
const EXPORT_AS = 'Export the file again as "CSV UTF-8"';

/** The text encoding of an upload: its BOM, else UTF-8 if the bytes are valid UTF-8, else Windows-1252 (Latin-1). */
export function detectEncoding(bytes: Uint8Array): { encoding: CsvEncoding; bomBytes: number } {
  const [a, b, c] = [bytes[0], bytes[1], bytes[2]];
  if (a === 0xef && b === 0xbb && c === 0xbf) return { encoding: 'UTF-8', bomBytes: 3 };
  if (a === 0xff && b === 0xfe) return { encoding: 'UTF-16LE', bomBytes: 2 };
  if (a === 0xfe && b === 0xff) return { encoding: 'UTF-16BE', bomBytes: 2 };
  // UTF-16 without a BOM: ASCII text has a zero byte in every other place.
  const sample = bytes.subarray(0, 4096 & ~1);
  let zeroEven = 0;
  let zeroOdd = 0;
  for (let i = 0; i < sample.length; i++) if (sample[i] === 0) i % 2 ? zeroOdd++ : zeroEven++;
  const half = sample.length / 2;
  if (half >= 2 && zeroOdd > 0.4 * half && zeroEven === 0) return { encoding: 'UTF-16LE', bomBytes: 0 };
  if (half >= 2 && zeroEven > 0.4 * half && zeroOdd === 0) return { encoding: 'UTF-16BE', bomBytes: 0 };
  if (zeroEven + zeroOdd > 0) throw new HttpError(400, 'not_text', `The file is not a CSV text file. ${EXPORT_AS}.`);
  try {
    new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    return { encoding: 'UTF-8', bomBytes: 0 };
  } catch {
    // Bytes that Windows-1252 leaves undefined mean another legacy code page: refuse rather than garble.
    for (const x of bytes) {
      if (x === 0x81 || x === 0x8d || x === 0x8f || x === 0x90 || x === 0x9d) {
        throw new HttpError(400, 'not_text', `The file is neither UTF-8 nor Latin-1 (Windows-1252) text. ${EXPORT_AS}.`);
      }
    }
    return { encoding: 'Windows-1252', bomBytes: 0 };
  }
}

// Tab when the header line has one; semicolon when it has at least as many semicolons as commas (a spreadsheet
// set to a decimal-comma locale writes "12.05.2026 09:00;59,4"); comma otherwise.
function separatorOf(firstLine: string): CsvLayout['separator'] {
  if (firstLine.includes('\t')) return '\t';
  const count = (ch: string) => firstLine.split(ch).length - 1;
  const semicolons = count(';');
  return semicolons > 0 && semicolons >= count(',') ? ';' : ',';
}

/** A number cell; where the separator is ";" a decimal comma is read too ("59,4" is 59.4). Null when not a number. */
export function csvNumber(cell: string, separator: CsvLayout['separator']): number | null {
  let s = cell.trim();
  if (separator === ';' && /^[+-]?\d*,\d+([eE][+-]?\d+)?$/.test(s)) s = s.replace(',', '.');
  return /^[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?$/.test(s) ? Number(s) : null;
}

const LINE_BREAK = /\r\n?|\n/g;
const lineBreaks = (cells: string[]) => cells.reduce((n, c) => n + (c.includes('\n') ? c.split('\n').length - 1 : 0), 0);

function csvProblem(err: CsvError, lastLine: number): HttpError {
  const after = lastLine > 0 ? `after line ${lastLine}` : 'at the start of the file';
  if (err.code === 'CSV_QUOTE_NOT_CLOSED' || err.code === 'CSV_MAX_RECORD_SIZE') {
    return new HttpError(400, 'bad_csv', `A quoted cell that starts ${after} is never closed. Check the quote marks (") there.`, {
      [`line ${lastLine + 1}`]: 'a quote mark opens a cell that never closes',
    });
  }
  const at = (err as unknown as { lines?: number }).lines;
  const where = at ? `line ${at}` : `line ${lastLine + 1}`;
  return new HttpError(400, 'bad_csv', `The CSV cannot be read at ${where}: ${err.message.split(':')[0]}.`, {
    [where]: 'the quote marks (") around a cell do not match',
  });
}

/**
 * Reads CSV bytes record by record. `onLayout` hears the separator and encoding before the first record;
 * `onRecord` gets every non-blank record with the line it starts on (1-based, header included) and answers false
 * to stop reading. More than `maxRecords` records throws `tooMany(n)` as soon as record n arrives.
 */
export async function readCsv(
  bytes: Uint8Array,
  opts: {
    maxRecords: number;
    tooMany: (n: number) => HttpError;
    onLayout?: (layout: CsvLayout) => void;
    onRecord: (record: CsvRecord) => boolean | void;
    onProgress?: (bytesRead: number) => void;
  },
): Promise<CsvLayout & { records: number }> {
  const { encoding, bomBytes } = detectEncoding(bytes);
  const decoder = new TextDecoder(encoding === 'Windows-1252' ? 'windows-1252' : encoding.toLowerCase());
  const body = bytes.subarray(bomBytes);
  // Line ends become "\n" before parsing, so csv-parse counts one line per break whatever the file used
  // (it counts a quoted CR LF as two). A CR at the end of a chunk waits for the next one.
  let pendingCr = false;
  let first = true;
  const unit = encoding.startsWith('UTF-16') ? 2 : 1;
  const chunkBytes = CHUNK_CHARS * unit;
  let offset = 0;
  const nextText = (): string | null => {
    if (offset >= body.length) {
      const tail = decoder.decode() + (pendingCr ? '\n' : '');
      pendingCr = false;
      offset = Infinity;
      return tail || null;
    }
    let text = decoder.decode(body.subarray(offset, offset + chunkBytes), { stream: true });
    offset += chunkBytes;
    if (first && text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    first = false;
    if (pendingCr) text = `\r${text}`;
    pendingCr = text.endsWith('\r');
    if (pendingCr) text = text.slice(0, -1);
    return text.replace(LINE_BREAK, '\n');
  };
  const head = nextText() ?? '';
  const firstLine = head.trimStart().split('\n', 1)[0] ?? '';
  const layout: CsvLayout = { separator: separatorOf(firstLine), encoding };
  opts.onLayout?.(layout);
  let records = 0;
  let lastLine = 0;
  let failure: unknown = null;
  let stopped = false;
  // Records are handled in on_record, as csv-parse splits them, so a structural error later in the file
  // still knows the last good line and nothing is buffered.
  const parser = parse({
    delimiter: layout.separator,
    record_delimiter: '\n',
    relax_column_count: true,
    relax_quotes: true,
    skip_empty_lines: true,
    max_record_size: MAX_RECORD_CHARS,
    on_record: (record: string[], { lines }: { lines: number }) => {
      if (stopped) return null;
      lastLine = lines;
      if (record.every((c) => c.trim() === '')) return null;
      try {
        records++;
        if (records > opts.maxRecords) throw opts.tooMany(records);
        if (opts.onRecord({ line: lines - lineBreaks(record), cells: record }) === false) stopped = true;
      } catch (err) {
        failure = err;
        stopped = true;
      }
      return null;
    },
  });
  parser.on('error', (err) => {
    failure ??= err;
    stopped = true;
  });
  parser.resume();
  const done = finished(parser).catch(() => undefined);
  for (let text: string | null = head; text !== null && !stopped; text = nextText()) {
    if (text) parser.write(text);
    opts.onProgress?.(Math.min(offset, body.length) + bomBytes);
    // Lets the worker answer its port (progress, cancel) between chunks.
    await new Promise((resolve) => setImmediate(resolve));
  }
  if (stopped) parser.destroy();
  else parser.end();
  await done;
  if (failure instanceof HttpError) throw failure;
  if (failure && typeof failure === 'object' && 'code' in failure && String(failure.code).startsWith('CSV_')) throw csvProblem(failure as CsvError, lastLine);
  if (failure) throw failure;
  return { ...layout, records };
}
