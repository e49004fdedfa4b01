/** Presentation helpers for card text. */
import { TZDate } from '@date-fns/tz';
import { format } from 'date-fns';

/** "12 min", "3 h 5 min", "2 d 4 h": ages as a prescriber reads them. */
export function formatAge(minutes: number): string {
  if (minutes < 60) return `${Math.max(0, Math.round(minutes))} min`;
  if (minutes < 48 * 60) {
    const h = Math.floor(minutes / 60);
    const m = Math.round(minutes - h * 60);
    return m ? `${h} h ${m} min` : `${h} h`;
  }
  const d = Math.floor(minutes / 1440);
  const h = Math.round((minutes - d * 1440) / 60);
  return h ? `${d} d ${h} h` : `${d} d`;
}

/**
 * Local clock time in the site's IANA time zone (configured, TIDEMARK_TIME_ZONE), never the server's own zone:
 * "14:05" on the day of `refIso`, else "19 Nov 14:05". date-fns with @date-fns/tz (the zone's offsets come from the
 * ICU data of Node.js, which follows the IANA tz database). The reasoning page formats the same way.
 */
export function localClock(iso: string, zone: string, refIso: string): string {
  const t = new TZDate(Date.parse(iso), zone);
  const sameDay = localDay(refIso, zone) === format(t, 'yyyy-MM-dd');
  return format(t, sameDay ? 'HH:mm' : 'd MMM HH:mm');
}

/** The local day of the advice's moment, remembered: every time on one card is compared with the same one. */
let lastDay: { key: string; day: string } | undefined;
function localDay(iso: string, zone: string): string {
  const key = `${zone}|${iso}`;
  if (lastDay?.key !== key) lastDay = { key, day: format(new TZDate(Date.parse(iso), zone), 'yyyy-MM-dd') };
  return lastDay.day;
}

/** "14:05, 18 min ago" (the age counted back from `atIso`, the moment of the advice). */
export function clockAndAge(iso: string, zone: string, atIso: string): string {
  const minutes = (Date.parse(atIso) - Date.parse(iso)) / 60_000;
  return `${localClock(iso, zone, atIso)}, ${minutes >= 0 ? `${formatAge(minutes)} ago` : `in ${formatAge(-minutes)}`}`;
}

/** "1 Dec": the day of a date-only time (kept as the start of that day in UTC, so shown in UTC). */
export function utcDay(iso: string): string {
  return format(new TZDate(Date.parse(iso), 'UTC'), 'd MMM');
}
