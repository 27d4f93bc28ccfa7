// Times in plant historian exports: ISO-8601 with or without a zone, day.month.year or day/month/year (or
// month/day/year) local times with optional AM/PM, and Unix epoch seconds or milliseconds. The file itself is
// read on the server (server/services/historian-csv.ts); these rules are pure so any caller reads times alike.

import { zoneOffsetMin } from './wall-clock';

export type DateOrder = 'dmy' | 'mdy';

/** True when the zone is known to this runtime. */
export function isTimeZone(tz: string): boolean {
  try {
    zoneOffsetMin(tz, 0);
    return true;
  } catch {
    return false;
  }
}

/** A wall-clock time in a zone as UTC ms; in the autumn overlap the earlier instant, in the spring gap the later. */
export function zonedToUtcMs(y: number, mo: number, d: number, h: number, mi: number, s: number, ms: number, timeZone: string): number {
  const wall = Date.UTC(y, mo - 1, d, h, mi, s, ms);
  // A day either side brackets any change of offset; a candidate is valid when the zone reads it back as the wall time.
  const offsets = [zoneOffsetMin(timeZone, wall - 86_400_000), zoneOffsetMin(timeZone, wall + 86_400_000)];
  const valid = offsets.map((o) => wall - o * 60_000).filter((t) => zoneOffsetMin(timeZone, t) * 60_000 === wall - t);
  return valid.length ? Math.min(...valid) : wall - Math.min(...offsets) * 60_000;
}

function validDate(y: number, mo: number, d: number, h: number, mi: number, s: number) {
  if (mo < 1 || mo > 12 || d < 1 || h > 23 || mi > 59 || s > 60) return false;
  return d <= new Date(Date.UTC(y, mo, 0)).getUTCDate();
}

const ISO = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;
const LOCAL = /^(\d{1,4})([./-])(\d{1,2})\2(\d{1,4})[ T,]+(\d{1,2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,3}))?)?\s*(AM|PM)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;

/** One time cell as an ISO UTC instant, or an error message. */
export function parseTime(raw: string, timeZone: string, dateOrder: DateOrder): string | { error: string } {
  const s = raw.trim().replace(/^"|"$/g, '');
  if (/^\d{10}(\.\d+)?$/.test(s)) return new Date(Math.round(Number(s) * 1000)).toISOString();
  if (/^\d{13}$/.test(s)) return new Date(Number(s)).toISOString();
  let y: number, mo: number, d: number, h: number, mi: number, sec: number, ms: number, zone: string | undefined;
  let m = ISO.exec(s);
  if (m) {
    [y, mo, d, h, mi] = [m[1], m[2], m[3], m[4], m[5]].map(Number);
    sec = Number(m[6] ?? 0);
    ms = m[7] ? Math.round(Number(`0.${m[7]}`) * 1000) : 0;
    zone = m[8];
  } else if ((m = LOCAL.exec(s))) {
    const [a, b, c] = [Number(m[1]), Number(m[3]), Number(m[4])];
    if (m[1].length === 4) [y, mo, d] = [a, b, c];
    else if (m[2] === '.' || dateOrder === 'dmy') [d, mo, y] = [a, b, c];
    else [mo, d, y] = [a, b, c];
    if (y < 100) y += 2000;
    h = Number(m[5]);
    mi = Number(m[6]);
    sec = Number(m[7] ?? 0);
    ms = m[8] ? Math.round(Number(`0.${m[8]}`) * 1000) : 0;
    const ampm = m[9]?.toUpperCase();
    if (ampm) {
      if (h < 1 || h > 12) return { error: `Hour ${h} does not go with ${ampm}` };
      h = (h % 12) + (ampm === 'PM' ? 12 : 0);
    }
    zone = m[10];
  } else {
    return { error: `Cannot read "${s.slice(0, 40)}" as a time` };
  }
  if (!validDate(y, mo, d, h, mi, sec)) return { error: `"${s.slice(0, 40)}" is not a calendar date and time` };
  let utc: number;
  if (zone) {
    const z = zone.toUpperCase() === 'Z' ? 0 : (zone[0] === '-' ? -1 : 1) * (Number(zone.slice(1, 3)) * 60 + Number(zone.slice(-2)));
    utc = Date.UTC(y, mo - 1, d, h, mi, sec, ms) - z * 60_000;
  } else {
    utc = zonedToUtcMs(y, mo, d, h, mi, sec, ms, timeZone);
  }
  return new Date(utc).toISOString();
}
