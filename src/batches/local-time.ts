// Times as the operator types and reads them: the device's own clock and zone, minutes only.

const p2 = (n: number) => String(n).padStart(2, '0');
// A table, not toLocaleString: building an Intl formatter per call cost a phone tens of ms on a long list.
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/** `2026-12-01 09:05` in the device's zone. */
export const localInputValue = (d: Date) => `${d.getFullYear()}-${p2(d.getMonth() + 1)}-${p2(d.getDate())} ${p2(d.getHours())}:${p2(d.getMinutes())}`;

/** Reads `YYYY-MM-DD HH:mm[:ss]` (or with a T) in the device's zone; null when it is not a real date and time. */
export function parseLocalInput(s: string): Date | null {
  const m = /^\s*(\d{4})-(\d{2})-(\d{2})[T ](\d{1,2}):(\d{2})(?::(\d{2}))?\s*$/.exec(s);
  if (!m) return null;
  const [y, mo, d, h, mi, sec] = [m[1], m[2], m[3], m[4], m[5], m[6] ?? '0'].map(Number);
  const date = new Date(y, mo - 1, d, h, mi, sec);
  if (date.getFullYear() !== y || date.getMonth() !== mo - 1 || date.getDate() !== d || date.getHours() !== h || date.getMinutes() !== mi) return null;
  return date;
}

/** `09:05` (today) or `28 Nov 09:05` in the device's zone. */
export function shortTime(iso: string, now = new Date()): string {
  const d = new Date(iso);
  const hm = `${p2(d.getHours())}:${p2(d.getMinutes())}`;
  if (d.toDateString() === now.toDateString()) return hm;
  return `${d.getDate()} ${MONTHS[d.getMonth()]} ${hm}`;
}

/** `25 min`, `3.5 h` or `2.1 d` for a duration in ms. */
export function durationText(ms: number): string {
  const min = ms / 60_000;
  if (min < 90) return `${Math.max(0, Math.round(min))} min`;
  if (min < 48 * 60) return `${(min / 60).toFixed(1)} h`;
  return `${(min / 1440).toFixed(1)} d`;
}
