// Calendar days and printed instants on a site's clock (the wall clock itself is src/batches/wall-clock.ts).
import { zonedToUtcMs } from '../src/batches/historian-csv';
import { wallClock } from '../src/batches/wall-clock';

const p2 = (n: number) => String(n).padStart(2, '0');

/** "2026-12-01 09:00:00 CET (Europe/Berlin)": the instant as read on the site's clock. */
export function formatSiteTime(iso: string, timeZone: string): string {
  const p = wallClock(Date.parse(iso), timeZone);
  return `${p.y}-${p2(p.mo)}-${p2(p.d)} ${p2(p.h)}:${p2(p.mi)}:${p2(p.s)} ${p.zone} (${timeZone})`;
}

/** The site's calendar date (YYYY-MM-DD) at an instant. */
export function siteDay(at: Date, timeZone: string): string {
  const p = wallClock(at.getTime(), timeZone);
  return `${p.y}-${p2(p.mo)}-${p2(p.d)}`;
}

/** The UTC instant (ISO) at which a site-local date begins. */
export function startOfSiteDay(day: string, timeZone: string): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  return new Date(zonedToUtcMs(y, m, d, 0, 0, 0, 0, timeZone)).toISOString();
}
