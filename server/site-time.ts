// Site clocks via Intl (the ICU time-zone data Node ships with), so no zone table is kept here.

function wallParts(t: number, timeZone: string) {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
    timeZoneName: 'short',
  }).formatToParts(new Date(t));
  const get = (type: string) => parts.find((p) => p.type === type)?.value ?? '';
  return { y: get('year'), mo: get('month'), d: get('day'), h: get('hour'), mi: get('minute'), s: get('second'), zone: get('timeZoneName') };
}

/** "2026-12-01 09:00:00 CET (Europe/Berlin)": the instant as read on the site's clock. */
export function formatSiteTime(iso: string, timeZone: string): string {
  const p = wallParts(Date.parse(iso), timeZone);
  return `${p.y}-${p.mo}-${p.d} ${p.h}:${p.mi}:${p.s} ${p.zone} (${timeZone})`;
}

/** The site's calendar date (YYYY-MM-DD) at an instant. */
export function siteDay(at: Date, timeZone: string): string {
  const p = wallParts(at.getTime(), timeZone);
  return `${p.y}-${p.mo}-${p.d}`;
}

// Minutes the site's clock is ahead of UTC at instant t.
function offsetMs(t: number, timeZone: string): number {
  const p = wallParts(t, timeZone);
  return Date.UTC(+p.y, +p.mo - 1, +p.d, +p.h, +p.mi, +p.s) - Math.floor(t / 1000) * 1000;
}

/** The UTC instant (ISO) at which a site-local date begins. */
export function startOfSiteDay(day: string, timeZone: string): string {
  const [y, m, d] = day.split('-').map(Number) as [number, number, number];
  const guess = Date.UTC(y, m - 1, d);
  // Second pass: the offset at the answer, not at the guess, in case a clock change falls between them.
  const first = guess - offsetMs(guess, timeZone);
  return new Date(guess - offsetMs(first, timeZone)).toISOString();
}
