// Times as people type and read them on the floor: the site's clock, labelled with its zone, minutes only. The
// device's own zone plays no part, so phones in three zones show one batch the same way.
import { zonedToUtcMs } from './historian-csv';
import { wallClock as wall } from './wall-clock';

const p2 = (n: number) => String(n).padStart(2, '0');
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** The zone's short name at an instant as the site's clock shows it: `CET`, `CEST`, `UTC`, `GMT+5:30`. */
export const zoneLabel = (timeZone: string, at = Date.now()) => wall(at, timeZone).zone;

/** `2026-12-01 09:05` on the site's clock (what a time field shows and reads back). */
export function siteInputValue(d: Date, timeZone: string): string {
  const w = wall(d.getTime(), timeZone);
  return `${w.y}-${p2(w.mo)}-${p2(w.d)} ${p2(w.h)}:${p2(w.mi)}`;
}

/** Reads `YYYY-MM-DD HH:mm[:ss]` (or with a T) on the site's clock; null when it is not a real date and time. */
export function parseSiteInput(s: string, timeZone: string): Date | null {
  const m = /^\s*(\d{4})-(\d{2})-(\d{2})[T ](\d{1,2}):(\d{2})(?::(\d{2}))?\s*$/.exec(s);
  if (!m) return null;
  const [y, mo, d, h, mi, sec] = [m[1], m[2], m[3], m[4], m[5], m[6] ?? '0'].map(Number) as [number, number, number, number, number, number];
  const check = new Date(Date.UTC(y, mo - 1, d, h, mi, sec));
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d || check.getUTCHours() !== h || check.getUTCMinutes() !== mi)
    return null;
  return new Date(zonedToUtcMs(y, mo, d, h, mi, sec, 0, timeZone));
}

/** `09:05 CET` (the site's today) or `28 Nov 09:05 CET`, on the site's clock. */
export function siteTime(iso: string, timeZone: string, now = new Date()): string {
  const w = wall(Date.parse(iso), timeZone);
  const today = wall(now.getTime(), timeZone);
  const hm = `${p2(w.h)}:${p2(w.mi)} ${w.zone}`;
  if (w.y === today.y && w.mo === today.mo && w.d === today.d) return hm;
  return `${w.d} ${MONTHS[w.mo - 1]}${w.y === today.y ? '' : ` ${w.y}`} ${hm}`;
}

/** `2026-12-03 09:45:18 CET`: a full stamp on the site's clock, for records (seconds are the same in every zone). */
export function siteStamp(iso: string, timeZone: string): string {
  const t = Date.parse(iso);
  const w = wall(t, timeZone);
  return `${w.y}-${p2(w.mo)}-${p2(w.d)} ${p2(w.h)}:${p2(w.mi)}:${p2(new Date(t).getUTCSeconds())} ${w.zone}`;
}

/** `25 min`, `3.5 h` or `2.1 d` for a duration in ms. */
export function durationText(ms: number): string {
  const min = ms / 60_000;
  if (min < 90) return `${Math.max(0, Math.round(min))} min`;
  if (min < 48 * 60) return `${(min / 60).toFixed(1)} h`;
  return `${(min / 1440).toFixed(1)} d`;
}
