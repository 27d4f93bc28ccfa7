// A site's wall clock through Intl (the ICU time-zone data the runtime ships with), so no zone table is kept here.
// One formatter per zone, kept: building one costs far more than using it, and a 300,000-row import or a long
// list on a phone asks for the same zone each time.

export type WallClock = { y: number; mo: number; d: number; h: number; mi: number; s: number; zone: string };

const formatters = new Map<string, Intl.DateTimeFormat>();
function formatter(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-GB', {
      timeZone,
      hourCycle: 'h23',
      year: 'numeric',
      month: 'numeric',
      day: 'numeric',
      hour: 'numeric',
      minute: 'numeric',
      second: 'numeric',
      timeZoneName: 'short',
    });
    formatters.set(timeZone, f);
  }
  return f;
}

/** The instant `t` (ms since the epoch) as the zone's clock reads it, with the zone's short name (`CET`, `GMT+5:30`). */
export function wallClock(t: number, timeZone: string): WallClock {
  const w: WallClock = { y: 0, mo: 0, d: 0, h: 0, mi: 0, s: 0, zone: '' };
  for (const p of formatter(timeZone).formatToParts(new Date(t))) {
    if (p.type === 'year') w.y = Number(p.value);
    else if (p.type === 'month') w.mo = Number(p.value);
    else if (p.type === 'day') w.d = Number(p.value);
    else if (p.type === 'hour') w.h = Number(p.value);
    else if (p.type === 'minute') w.mi = Number(p.value);
    else if (p.type === 'second') w.s = Number(p.value);
    else if (p.type === 'timeZoneName') w.zone = p.value;
  }
  return w;
}

/** Offset of a time zone from UTC at an instant, minutes (positive east); throws on an unknown zone. */
export function zoneOffsetMin(timeZone: string, utcMs: number): number {
  const w = wallClock(utcMs, timeZone);
  return Math.round((Date.UTC(w.y, w.mo - 1, w.d, w.h, w.mi, w.s) - Math.floor(utcMs / 1000) * 1000) / 60_000);
}
