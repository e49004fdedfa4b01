/**
 * Times on the reasoning page: local clock time in the site's IANA time zone with the age, "14:05, 18 min ago".
 * Formatted with date-fns and @date-fns/tz (the zone's offsets come from the ICU data of Node.js, which follows
 * the IANA tz database), never with the server's own zone.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { clockAndAge, localClock } from '../cards/format.js';

/** "14:05" (same day as `ref`) or "19 Nov 14:05" in `zone`: the card's clock (src/cards/format.ts); no `ref`, always the day. */
export function clock(iso: string, zone: string, refIso?: string): string {
  return refIso === undefined ? format(new TZDate(Date.parse(iso), zone), 'd MMM HH:mm') : localClock(iso, zone, refIso);
}

/** "Friday 20 November 2026, 14:05 (Europe/Berlin, UTC+01:00)". */
export function fullClock(iso: string, zone: string): string {
  const t = new TZDate(Date.parse(iso), zone);
  return `${format(t, 'EEEE d MMMM yyyy, HH:mm')} (${zone}, UTC${format(t, 'xxx')})`;
}

/** "14:05, 18 min ago", the age counted back from `atIso` (the moment of the advice): as on the card. */
export const clockWithAge = clockAndAge;

/** Milliseconds to add to a UTC instant so that a UTC-based scale shows the zone's wall-clock time. */
export function zoneOffsetMs(ms: number, zone: string): number {
  return new TZDate(ms, zone).getTimezoneOffset() * -60_000;
}
