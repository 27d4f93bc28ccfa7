import { describe, expect, it } from 'vitest';
import { readHistorianCsv } from '../../server/services/historian-csv';
import { parseTime, zonedToUtcMs } from '../../src/batches';

const parseHistorianCsv = (text: string, opts: { timeZone: string; dateOrder: 'dmy' | 'mdy' }) => readHistorianCsv(Buffer.from(text), opts);

describe('parseTime', () => {
  // Europe/Berlin is UTC+1 in winter and UTC+2 in summer (EU summer time: last Sunday of March to last Sunday of October).
  it.each([
    ['2026-12-01T08:00:00Z', 'UTC', '2026-12-01T08:00:00.000Z'],
    ['2026-12-01T09:00:00+01:00', 'UTC', '2026-12-01T08:00:00.000Z'],
    ['2026-12-01 09:00:00+0100', 'UTC', '2026-12-01T08:00:00.000Z'],
    ['2026-12-01 09:00', 'Europe/Berlin', '2026-12-01T08:00:00.000Z'],
    ['2026-07-01 09:00:30.250', 'Europe/Berlin', '2026-07-01T07:00:30.250Z'],
    ['01.12.2026 09:00:00', 'Europe/Berlin', '2026-12-01T08:00:00.000Z'],
    ['12/01/2026 3:15 PM', 'America/Chicago', '2026-12-01T21:15:00.000Z'],
    ['1796112000', 'UTC', '2026-12-01T08:00:00.000Z'],
    ['1796112000000', 'UTC', '2026-12-01T08:00:00.000Z'],
  ])('%s in %s', (raw, tz, iso) => {
    expect(parseTime(raw, tz, raw.includes('PM') ? 'mdy' : 'dmy')).toBe(iso);
  });

  it('reads day/month/year or month/day/year as told', () => {
    expect(parseTime('02/03/2026 10:00', 'UTC', 'dmy')).toBe('2026-03-02T10:00:00.000Z');
    expect(parseTime('02/03/2026 10:00', 'UTC', 'mdy')).toBe('2026-02-03T10:00:00.000Z');
  });

  it.each(['yesterday', '2026-13-01 10:00', '31.02.2026 10:00', '13:00 PM 01/02/2026', ''])('refuses %j', (raw) => {
    expect(typeof parseTime(raw, 'UTC', 'dmy')).toBe('object');
  });

  it('takes the earlier instant in the autumn overlap and skips the spring gap', () => {
    // 2026-10-25 02:30 happens twice in Berlin (CEST then CET); 2026-03-29 02:30 never happens.
    expect(new Date(zonedToUtcMs(2026, 10, 25, 2, 30, 0, 0, 'Europe/Berlin')).toISOString()).toBe('2026-10-25T00:30:00.000Z');
    expect(new Date(zonedToUtcMs(2026, 3, 29, 2, 30, 0, 0, 'Europe/Berlin')).toISOString()).toBe('2026-03-29T01:30:00.000Z');
  });
});

describe('readHistorianCsv', () => {
  it('finds the columns by header and reports bad lines by number', async () => {
    const text = [
      'Tag,Timestamp,Temperature degC',
      'R1,2026-12-01T08:00:00Z,50.1',
      'R1,not a time,50',
      'R1,2026-12-01T08:01:00Z,warm',
      'R1,2026-12-01T08:02:00Z,50.3',
      '',
    ].join('\r\n');
    const r = await parseHistorianCsv(text, { timeZone: 'UTC', dateOrder: 'dmy' });
    expect(r.total).toBe(4);
    expect(r.rows).toEqual([
      { line: 2, at: '2026-12-01T08:00:00.000Z', c: 50.1 },
      { line: 5, at: '2026-12-01T08:02:00.000Z', c: 50.3 },
    ]);
    expect(r.problems.map((p) => p.line)).toEqual([3, 4]);
  });

  it('reads semicolon files with a decimal comma and local times', async () => {
    const r = await parseHistorianCsv('Zeit;°C\n01.12.2026 09:00;50,5\n01.12.2026 09:30;51,25\n', { timeZone: 'Europe/Berlin', dateOrder: 'dmy' });
    expect(r.rows.map((x) => [x.at, x.c])).toEqual([
      ['2026-12-01T08:00:00.000Z', 50.5],
      ['2026-12-01T08:30:00.000Z', 51.25],
    ]);
  });

  it('reads a file without a header', async () => {
    const r = await parseHistorianCsv('2026-12-01T08:00:00Z,50\n2026-12-01T08:10:00Z,51\n', { timeZone: 'UTC', dateOrder: 'dmy' });
    expect(r.rows).toHaveLength(2);
    expect(r.problems).toEqual([]);
  });
});
