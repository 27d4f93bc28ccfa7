import { useMemo } from 'react';
import { parseSiteInput, siteInputValue, siteStamp, siteTime, zoneLabel } from '../batches/local-time';
import { money } from '../format';
import { useSession } from './use-session';

/**
 * How this site writes what a person reads: times on the site's clock with its zone, amounts in its currency.
 * From the session, so every screen agrees without a request of its own.
 */
export function useSiteFormat() {
  const { session } = useSession();
  const timeZone = session?.user.siteTimeZone ?? 'UTC';
  const currency = session?.user.siteCurrency ?? 'EUR';
  return useMemo(
    () => ({
      timeZone,
      currency,
      /** `09:05 CET` today, else `28 Nov 09:05 CET`. */
      time: (iso: string, now?: Date) => siteTime(iso, timeZone, now),
      /** `2026-12-03 09:45:18 CET`, for records. */
      stamp: (iso: string) => siteStamp(iso, timeZone),
      /** The zone's short name now, for a label ("Time, CET"). */
      zone: () => zoneLabel(timeZone),
      inputValue: (d: Date) => siteInputValue(d, timeZone),
      parseInput: (s: string) => parseSiteInput(s, timeZone),
      money: (x: number, digits = 2) => money(x, currency, digits),
    }),
    [timeZone, currency],
  );
}
