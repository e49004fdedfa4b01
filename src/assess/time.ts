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
