import { afterAll, describe, expect, it } from 'vitest';
import { migrateDb, openDb, first } from '../../db/client';
import { batches } from '../../db/tables';
import { seedDemo } from '../../db/seed';
import { DEFAULT_BATCH_SETTINGS } from '../../src/contracts/batches';
import { readCsv } from '../../server/csv-reader';
import { HttpError } from '../../server/http-error';
import { runImport, stopImports } from '../../server/imports';
import { readAssayCsv } from '../../server/services/assay-csv';
import { readHistorianCsv } from '../../server/services/historian-csv';

const records = async (bytes: Uint8Array) => {
  const out: [number, string[]][] = [];
  const layout = await readCsv(bytes, {
    maxRecords: 100,
    tooMany: () => new HttpError(400, 'too_many', 'too many'),
    onRecord: (r) => void out.push([r.line, r.cells]),
  });
  return { ...layout, out };
};
const utf16 = (text: string, bom: 'le' | 'be') => {
  const le = Buffer.from(text, 'utf16le');
  return bom === 'le' ? Buffer.concat([Buffer.from([0xff, 0xfe]), le]) : Buffer.concat([Buffer.from([0xfe, 0xff]), le.swap16()]);
};
const opts = { timeZone: 'UTC', dateOrder: 'dmy' as const };

afterAll(() => stopImports());

describe('readCsv', () => {
  it('keeps a quoted cell with line breaks whole and numbers later rows by the line they start on', async () => {
    const r = await records(Buffer.from('a,b\r\n1,"two\r\nlines"\r\n\r\n3,4\n'));
    expect(r.out).toEqual([
      [1, ['a', 'b']],
      [2, ['1', 'two\nlines']],
      [5, ['3', '4']],
    ]);
  });

  it.each([
    ['UTF-16LE', 'le'],
    ['UTF-16BE', 'be'],
  ] as const)('reads %s with its BOM', async (encoding, bom) => {
    const r = await records(utf16('Zeit;Temperatur °C\n01.12.2026 09:00;59,4\n', bom));
    expect(r.encoding).toBe(encoding);
    expect(r.out).toEqual([
      [1, ['Zeit', 'Temperatur °C']],
      [2, ['01.12.2026 09:00', '59,4']],
    ]);
  });

  it('reads Latin-1 (Windows-1252) bytes as the characters they stand for', async () => {
    const r = await records(Buffer.from('temperature_c;note\n60;Probe \xe4 \xb5\n', 'latin1'));
    expect(r.encoding).toBe('Windows-1252');
    expect(r.out[1]).toEqual([2, ['60', 'Probe ä µ']]);
  });

  it('refuses bytes that are neither UTF-8 nor Windows-1252, naming the encoding to export', async () => {
    await expect(records(Buffer.from([0x61, 0x2c, 0x81, 0x0a]))).rejects.toThrow(/CSV UTF-8/);
    await expect(records(Buffer.from([0x41, 0x00, 0x42, 0x43, 0x00, 0x00, 0x01]))).rejects.toMatchObject({ code: 'not_text' });
  });

  it('stops at the row limit instead of reading on', async () => {
    let seen = 0;
    const read = readCsv(Buffer.from('a\n'.repeat(1000)), {
      maxRecords: 10,
      tooMany: (n) => new HttpError(400, 'too_many', `${n}`),
      onRecord: () => void seen++,
    });
    await expect(read).rejects.toMatchObject({ code: 'too_many', message: '11' });
    expect(seen).toBe(10);
  });

  it('names the line after which a quote never closes', async () => {
    await expect(records(Buffer.from('a,b\n1,2\n3,"open\n4,5\n'))).rejects.toMatchObject({ code: 'bad_csv', fields: { 'line 3': expect.any(String) } });
  });
});

describe('decimal commas', () => {
  it('reads "59,4" as 59.4 in a semicolon assay file, with the line of each bad row', async () => {
    const a = await readAssayCsv(Buffer.from('\uFEFFtemperature_c;time_h;residual_activity_percent\n59,4;0;100\n59,4;2,5;81,2\n'));
    expect(a.points.map((p) => [p.line, p.tempC, p.timeH, p.residual])).toEqual([
      [2, 59.4, 0, 1],
      [3, 59.4, 2.5, 0.812],
    ]);
    await expect(readAssayCsv(Buffer.from('temperature_c;time_h;residual_activity_fraction\n60;0;1\n60;x;0,9\n'))).rejects.toMatchObject({
      fields: { 'line 3': 'time "x" is not a number' },
    });
  });

  it('keeps a comma a separator in a comma file', async () => {
    const r = await readHistorianCsv(Buffer.from('time,degC\n2026-12-01T08:00:00Z,"59,4"\n'), opts);
    expect(r.problems).toEqual([{ line: 2, message: 'Cannot read "59,4" as a temperature in °C' }]);
  });
});

describe('import worker', () => {
  it('reads a 300,000-row historian file while the event loop keeps turning', async () => {
    const start = Date.UTC(2026, 11, 1, 8);
    let csv = 'time,degC\n';
    for (let i = 0; i < 300_000; i++) csv += `${new Date(start + 1000 * i).toISOString()},${(37 + (i % 10) / 10).toFixed(1)}\n`;
    const bytes = Buffer.from(csv);
    // A timer that fires every 10 ms counts turns of this thread's event loop while the worker reads.
    let ticks = 0;
    const timer = setInterval(() => ticks++, 10);
    const progress: number[] = [];
    // The worker also checks the rows and runs the deviation rules: against a demo batch's program, started at `start`.
    const db = openDb(':memory:');
    await migrateDb(db);
    await seedDemo(db, { bcryptCost: 4 });
    const program = (await db.select().from(batches).then(first))!.program;
    const basis = {
      startedAt: new Date(start).toISOString(),
      program,
      settings: DEFAULT_BATCH_SETTINGS,
      nowMs: start + 1000 * 300_000,
      storedKeys: [],
      storedH: new Float64Array(0),
      storedC: new Float64Array(0),
    };
    const read = await runImport({ kind: 'historian', bytes, ...opts, basis }, (n) => progress.push(n)).finally(() => clearInterval(timer));
    expect(read.total).toBe(300_000);
    expect(read.atMs.length).toBe(300_000);
    expect([read.atMs[0], read.c[0]]).toEqual([start, 37]);
    expect(read.atMs[299_999]).toBe(start + 1000 * 299_999);
    expect(read.skipped).toBe(0);
    expect(ticks).toBeGreaterThan(10);
    expect(progress.length).toBeGreaterThan(0);
    // The worker now also checks the rows and runs the deviation rules and the batch status over them.
  }, 120_000);
});
