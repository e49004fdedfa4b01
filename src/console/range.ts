/**
 * The console's date range: whole UTC days, `from` and `to` inclusive, given as YYYY-MM-DD; by default the 30 days
 * ending today. At most MAX_RANGE_DAYS days, so that one page never asks the store for years of aggregates.
 */
export const DEFAULT_RANGE_DAYS = 30;
export const MAX_RANGE_DAYS = 366;

const DAY_MS = 86_400_000;
const DATE = /^\d{4}-\d{2}-\d{2}$/;

export interface DayRange {
  from: string;
  to: string;
  /** Every day of the range, oldest first. */
  days: string[];
  /** The Monday of every ISO week the range touches, oldest first. */
  weeks: string[];
  /** The range as the store's inclusive instants. */
  fromInstant: string;
  toInstant: string;
}

const isDate = (v: unknown): v is string =>
  typeof v === 'string' &&
  DATE.test(v) &&
  !Number.isNaN(Date.parse(`${v}T00:00:00Z`)) &&
  new Date(`${v}T00:00:00Z`).toISOString().startsWith(v);
const dayOf = (ms: number): string => new Date(ms).toISOString().slice(0, 10);

/** The Monday (YYYY-MM-DD) of the ISO week of a day. */
export function weekOf(day: string): string {
  const t = Date.parse(`${day}T00:00:00Z`);
  const dow = (new Date(t).getUTCDay() + 6) % 7; // Monday 0 … Sunday 6
  return dayOf(t - dow * DAY_MS);
}

/** The range asked for, or why it cannot be used. Missing ends default to today and 29 days before. */
export function dayRange(fromQ: unknown, toQ: unknown, now: Date): { ok: true; range: DayRange } | { ok: false; message: string } {
  const today = dayOf(now.getTime());
  if (fromQ !== undefined && fromQ !== '' && !isDate(fromQ))
    return { ok: false, message: 'The start date must be a date such as 2031-03-01.' };
  if (toQ !== undefined && toQ !== '' && !isDate(toQ)) return { ok: false, message: 'The end date must be a date such as 2031-03-30.' };
  // No end: the default span after the start, not past today; neither: the span up to today.
  let to = today;
  if (isDate(toQ)) to = toQ;
  else if (isDate(fromQ))
    to = dayOf(Math.min(Date.parse(`${fromQ}T00:00:00Z`) + (DEFAULT_RANGE_DAYS - 1) * DAY_MS, Date.parse(`${today}T00:00:00Z`)));
  const from = isDate(fromQ) ? fromQ : dayOf(Date.parse(`${to}T00:00:00Z`) - (DEFAULT_RANGE_DAYS - 1) * DAY_MS);
  const a = Date.parse(`${from}T00:00:00Z`);
  const b = Date.parse(`${to}T00:00:00Z`);
  if (a > b) return { ok: false, message: 'The start date is after the end date.' };
  const n = Math.round((b - a) / DAY_MS) + 1;
  if (n > MAX_RANGE_DAYS) return { ok: false, message: `The range is ${n} days; at most ${MAX_RANGE_DAYS} days can be shown at once.` };
  const days = Array.from({ length: n }, (_, i) => dayOf(a + i * DAY_MS));
  const weeks = [...new Set(days.map(weekOf))];
  return { ok: true, range: { from, to, days, weeks, fromInstant: `${from}T00:00:00.000Z`, toInstant: `${to}T23:59:59.999Z` } };
}
