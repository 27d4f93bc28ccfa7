import { z } from 'zod';

/** Whether `s` is YYYY-MM-DD naming a day that exists (no month 13, no 30 February): round-tripped through Date.UTC. */
export function isCalendarDay(s: string): boolean {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

/** A calendar date field; the shape and the day are checked separately so the message says which is wrong. */
export const calendarDay = (example: string) =>
  z
    .string()
    .regex(/^\d{4}-\d{2}-\d{2}$/, `Use a date like ${example}`)
    .refine(isCalendarDay, 'Not a calendar date (month 01-12, a day that month has)');
