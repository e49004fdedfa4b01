/**
 * FHIR R4 dateTime and instant, parsed strictly by their published grammar (FHIR R4 Datatypes, "dateTime" and
 * "instant", https://hl7.org/fhir/R4/datatypes.html):
 *
 *   dateTime  YYYY | YYYY-MM | YYYY-MM-DD | YYYY-MM-DDThh:mm:ss(.s+)?(Z|±hh:mm)   ("If hours and minutes are
 *             specified, a time zone SHALL be populated"; seconds are required; "Dates SHALL be valid dates")
 *   instant   the full form only.
 *
 * Anything else is not a time: `Date.parse` also takes "December 1, 2026" and reads "2026-12-01T14:05:00"
 * (no offset) in the server's own zone, so it is never used here. The value never depends on the process's time
 * zone, so every result is remembered (the rules compare the same few hundred timestamps of one snapshot many
 * times over: the memo was a measured gain); the memos are emptied when they grow past a bound.
 */

/** The FHIR R4 dateTime regex (Datatypes page), with groups for the parts. */
const FHIR_DATE_TIME =
  /^([0-9]([0-9]([0-9][1-9]|[1-9]0)|[1-9]00)|[1-9]000)(?:-(0[1-9]|1[0-2])(?:-(0[1-9]|[1-2][0-9]|3[0-1])(?:T([01][0-9]|2[0-3]):([0-5][0-9]):([0-5][0-9]|60)(\.[0-9]+)?(Z|[+-](?:(?:0[0-9]|1[0-3]):[0-5][0-9]|14:00)))?)?)?$/;

/** How much of a dateTime was given: a partial date (year, month, day) or a full time with its offset. */
export type TimePrecision = 'year' | 'month' | 'day' | 'second';

export interface FhirTime {
  /** Milliseconds since the epoch; for a partial date, the start of that year, month or day in UTC. */
  ms: number;
  /** The same instant as a UTC ISO string (toISOString). */
  iso: string;
  precision: TimePrecision;
}

const MEMO_LIMIT = 20_000;
const memo = new Map<string, FhirTime | null>();

function daysIn(year: number, month: number): number {
  return new Date(Date.UTC(year, month, 0)).getUTCDate();
}

function parse(raw: string): FhirTime | undefined {
  const m = FHIR_DATE_TIME.exec(raw);
  if (!m) return undefined;
  const year = Number(m[1]);
  const month = m[4] !== undefined ? Number(m[4]) : undefined;
  const day = m[5] !== undefined ? Number(m[5]) : undefined;
  if (month !== undefined && day !== undefined && day > daysIn(year, month)) return undefined; // "Dates SHALL be valid dates"
  let ms: number;
  let precision: TimePrecision;
  if (m[6] === undefined) {
    const d = new Date(0);
    d.setUTCFullYear(year, (month ?? 1) - 1, day ?? 1); // setUTCFullYear: years 0–99 are not shifted to 19xx
    ms = d.getTime();
    precision = month !== undefined ? 'month' : 'year';
    if (day !== undefined) precision = 'day';
  } else {
    const frac = m[9] ? Math.floor(Number(`0${m[9]}`) * 1000) : 0;
    const d = new Date(0);
    d.setUTCFullYear(year, (month as number) - 1, day as number);
    // A leap second (:60) counts as the first instant of the next minute.
    d.setUTCHours(Number(m[6]), Number(m[7]), Number(m[8]), frac);
    const zone = m[10] as string;
    const offsetMin = zone === 'Z' ? 0 : (zone.startsWith('-') ? -1 : 1) * (Number(zone.slice(1, 3)) * 60 + Number(zone.slice(4, 6)));
    ms = d.getTime() - offsetMin * 60_000;
    precision = 'second';
  }
  if (!Number.isFinite(ms)) return undefined;
  return { ms, iso: new Date(ms).toISOString(), precision };
}

/** A FHIR R4 dateTime (full or partial), or undefined when the text does not follow the grammar. */
export function fhirDateTime(raw: string): FhirTime | undefined {
  const hit = memo.get(raw);
  if (hit !== undefined) return hit ?? undefined;
  const t = typeof raw === 'string' ? parse(raw) : undefined;
  if (memo.size >= MEMO_LIMIT) memo.clear();
  memo.set(raw, t ?? null);
  return t;
}

/**
 * Milliseconds of a FHIR dateTime, for the rules' sorting and windowing (the snapshot stores UTC instants);
 * NaN when it is not one. A partial date gives the start of its period.
 */
export function parseTimeMs(iso: string): number {
  return fhirDateTime(iso)?.ms ?? Number.NaN;
}

/**
 * A FHIR instant or full dateTime (date, time and offset) as the snapshot stores it: milliseconds and the UTC ISO
 * string; undefined for anything else, partial dates included (see `fhirDateTime` where those may be used).
 */
export function isoInstant(raw: string): { ms: number; iso: string } | undefined {
  const t = fhirDateTime(raw);
  return t && t.precision === 'second' ? { ms: t.ms, iso: t.iso } : undefined;
}
