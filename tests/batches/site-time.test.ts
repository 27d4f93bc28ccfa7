import { describe, expect, it } from 'vitest';
import { parseSiteInput, siteInputValue, siteStamp, siteTime, zoneLabel } from '../../src/batches/local-time';

// Offsets from the IANA time zone database (as shipped in ICU): Europe/Berlin is UTC+1 (CET) in winter and
// UTC+2 (CEST) from the last Sunday of March to the last Sunday of October; Asia/Kolkata is UTC+5:30 all year.
describe('site time: the site clock, whatever the device zone', () => {
  it('reads an instant on the site clock with its zone name', () => {
    const now = new Date('2026-12-03T12:00:00Z');
    expect(siteTime('2026-12-03T08:05:00Z', 'Europe/Berlin', now)).toBe('09:05 CET');
    expect(siteTime('2026-11-28T05:00:00Z', 'Europe/Berlin', now)).toBe('28 Nov 06:00 CET');
    expect(siteTime('2026-07-01T05:00:00Z', 'Europe/Berlin', now)).toBe('1 Jul 07:00 CEST');
    expect(siteTime('2025-12-31T23:30:00Z', 'Europe/Berlin', now)).toBe('1 Jan 00:30 CET');
    expect(siteTime('2025-12-31T10:00:00Z', 'Europe/Berlin', now)).toBe('31 Dec 2025 11:00 CET');
    expect(siteStamp('2026-12-03T08:45:18.250Z', 'Europe/Berlin')).toBe('2026-12-03 09:45:18 CET');
    expect(siteStamp('2026-12-03T08:45:18Z', 'Asia/Kolkata')).toBe('2026-12-03 14:15:18 GMT+5:30');
    expect(zoneLabel('Asia/Kolkata')).toBe('GMT+5:30');
    expect(zoneLabel('UTC')).toBe('UTC');
  });

  it('takes "today" from the site clock, not the device: 23:30 UTC is already the next day in Berlin', () => {
    expect(siteTime('2026-12-03T23:30:00Z', 'Europe/Berlin', new Date('2026-12-04T06:00:00Z'))).toBe('00:30 CET');
  });

  it('writes and reads back a time field on the site clock', () => {
    const at = new Date('2026-12-03T08:05:00Z');
    expect(siteInputValue(at, 'Europe/Berlin')).toBe('2026-12-03 09:05');
    expect(parseSiteInput('2026-12-03 09:05', 'Europe/Berlin')?.toISOString()).toBe('2026-12-03T08:05:00.000Z');
    expect(parseSiteInput('2026-07-01T07:00', 'Europe/Berlin')?.toISOString()).toBe('2026-07-01T05:00:00.000Z');
    expect(parseSiteInput('2026-12-03 14:35', 'Asia/Kolkata')?.toISOString()).toBe('2026-12-03T09:05:00.000Z');
    expect(parseSiteInput('2026-02-30 09:00', 'Europe/Berlin')).toBeNull();
    expect(parseSiteInput('09:00', 'Europe/Berlin')).toBeNull();
  });
});
