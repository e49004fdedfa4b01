/**
 * Fluid balance over a time window from charted amounts.
 * Times are epoch milliseconds so this file needs nothing outside physiology/.
 */

/** A charted amount. A point amount (no known period) has startMs === endMs. */
export interface VolumeRecord {
  /** Stable identifier, used only to break ties deterministically. */
  id: string;
  volumeMl: number;
  startMs: number;
  endMs: number;
}

/**
 * Volume of the records that falls in (fromMs, toMs]. An amount over a period is spread evenly over it
 * and only the overlapping share counts (uniform rate: common practice for hourly charting); a point
 * amount counts when its time lies in the window.
 */
export function volumeInWindowMl(records: readonly VolumeRecord[], fromMs: number, toMs: number): number {
  let total = 0;
  for (const r of records) {
    if (r.endMs <= r.startMs) {
      if (r.endMs > fromMs && r.endMs <= toMs) total += r.volumeMl;
      continue;
    }
    const overlap = Math.min(r.endMs, toMs) - Math.max(r.startMs, fromMs);
    if (overlap > 0) total += (r.volumeMl * overlap) / (r.endMs - r.startMs);
  }
  return total;
}

/** Time (ms) of (fromMs, toMs] covered by at least one record period (point amounts cover nothing). */
export function coveredMs(records: readonly VolumeRecord[], fromMs: number, toMs: number): number {
  const spans = records
    .filter((r) => r.endMs > r.startMs)
    .map((r) => [Math.max(r.startMs, fromMs), Math.min(r.endMs, toMs)] as const)
    .filter(([s, e]) => e > s)
    .sort((a, b) => a[0] - b[0]);
  let covered = 0;
  let cursor = -Infinity;
  for (const [s, e] of spans) {
    const start = Math.max(s, cursor);
    if (e > start) covered += e - start;
    cursor = Math.max(cursor, e);
  }
  return covered;
}

function overlaps(a: VolumeRecord, b: VolumeRecord): boolean {
  const aPoint = a.endMs <= a.startMs;
  const bPoint = b.endMs <= b.startMs;
  // Two totals at the same instant with the same value are one amount charted twice.
  if (aPoint && bPoint) return a.endMs === b.endMs && a.volumeMl === b.volumeMl;
  // A point amount ends an unknown period: it overlaps a period that contains its time.
  if (aPoint) return a.endMs > b.startMs && a.endMs <= b.endMs;
  if (bPoint) return b.endMs > a.startMs && b.endMs <= a.endMs;
  return a.startMs < b.endMs && b.startMs < a.endMs;
}

/**
 * Keeps records of one kind of total that do not overlap in time, so that no volume is counted twice
 * (for example a shift total charted beside the hourly amounts it sums). Latest end first; at the same end
 * the longer period wins; ties by id. The result does not depend on the input order.
 */
export function withoutOverlaps<T extends VolumeRecord>(records: readonly T[]): { kept: T[]; dropped: T[] } {
  const sorted = [...records].sort(
    (a, b) =>
      b.endMs - a.endMs ||
      b.endMs - b.startMs - (a.endMs - a.startMs) ||
      Number(a.id > b.id) - Number(a.id < b.id) ||
      a.volumeMl - b.volumeMl,
  );
  const kept: T[] = [];
  const dropped: T[] = [];
  for (const r of sorted) {
    if (kept.some((k) => overlaps(k, r))) dropped.push(r);
    else kept.push(r);
  }
  return { kept, dropped };
}

/** Net balance in mL: intake − output. */
export function netBalanceMl(intakeMl: number, outputMl: number): number {
  return intakeMl - outputMl;
}
