/**
 * Times on the reasoning page: local clock time in the site's IANA time zone with the age, "14:05, 18 min ago".
 * Formatted with date-fns and @date-fns/tz (the zone's offsets come from the ICU data of Node.js, which follows
 * the IANA tz database), never with the server's own zone.
 */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';
import { formatAge } from '../cards/format.js';

/** "14:05" (same day as `ref`) or "19 Nov 14:05" in `zone`. */
export function clock(iso: string, zone: string, refIso?: string): string {
  const t = new TZDate(Date.parse(iso), zone);
  const sameDay = refIso !== undefined && format(new TZDate(Date.parse(refIso), zone), 'yyyy-MM-dd') === format(t, 'yyyy-MM-dd');
  return format(t, sameDay ? 'HH:mm' : 'd MMM HH:mm');
}

/** "Friday 20 November 2026, 14:05 (Europe/Berlin, UTC+01:00)". */
export function fullClock(iso: string, zone: string): string {
  const t = new TZDate(Date.parse(iso), zone);
  return `${format(t, 'EEEE d MMMM yyyy, HH:mm')} (${zone}, UTC${format(t, 'xxx')})`;
}

/** "14:05, 18 min ago", the age counted back from `atIso` (the moment of the advice). */
export function clockWithAge(iso: string, zone: string, atIso: string): string {
  const minutes = (Date.parse(atIso) - Date.parse(iso)) / 60_000;
  return `${clock(iso, zone, atIso)}, ${minutes >= 0 ? `${formatAge(minutes)} ago` : `in ${formatAge(-minutes)}`}`;
}

/** Milliseconds to add to a UTC instant so that a UTC-based scale shows the zone's wall-clock time. */
export function zoneOffsetMs(ms: number, zone: string): number {
  return new TZDate(ms, zone).getTimezoneOffset() * -60_000;
}
