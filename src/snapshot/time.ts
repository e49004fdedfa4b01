/**
 * Date.parse with a small memo, for the rules' sorting and windowing: they compare the same few hundred
 * timestamps of one snapshot many times over (a sort calls its comparator n·log n times). Only UTC times
 * (ending in Z, as the snapshot stores them) are remembered, since their value does not depend on the process's
 * time zone; the memo is emptied when it grows past a bound, so it cannot grow with traffic.
 */
const MEMO_LIMIT = 20_000;
const memo = new Map<string, number>();

export function parseTimeMs(iso: string): number {
  const hit = memo.get(iso);
  if (hit !== undefined) return hit;
  const ms = Date.parse(iso);
  if (iso.endsWith('Z')) {
    if (memo.size >= MEMO_LIMIT) memo.clear();
    memo.set(iso, ms);
  }
  return ms;
}

const isoMemo = new Map<string, string>();

/**
 * A FHIR dateTime or instant as the snapshot stores it: milliseconds and the UTC ISO string (toISOString), or
 * undefined when it is not a date-time. UTC inputs are remembered as parseTimeMs remembers them: the same
 * observations arrive on every call for a patient, and parsing and formatting their times is costly
 * (docs/benchmarks.md).
 */
export function isoInstant(raw: string): { ms: number; iso: string } | undefined {
  const ms = parseTimeMs(raw);
  if (Number.isNaN(ms)) return undefined;
  let iso = isoMemo.get(raw);
  if (iso === undefined) {
    iso = new Date(ms).toISOString();
    if (raw.endsWith('Z')) {
      if (isoMemo.size >= MEMO_LIMIT) isoMemo.clear();
      isoMemo.set(raw, iso);
    }
  }
  return { ms, iso };
}
