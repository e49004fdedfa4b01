/**
 * Vasoactive dose changes inside a time span: a start, a stop, or a new rate. Each VasoactiveDrug entry is one
 * administration period at one rate; a rate change is recorded as one entry ending and another of the same drug
 * starting. Two entries of the same drug that abut (within one minute) at the same rate are one continuous
 * infusion, not a change. A rate changed inside a single entry cannot be seen (limitation).
 */
import type { VasoactiveDrug } from '../../snapshot/types.js';
import { compareText, timeMs } from './select.js';

const ABUT_MS = 60_000;
const IGNORED_STATUS = new Set(['not-done', 'entered-in-error']);

export interface DoseChange {
  drug: VasoactiveDrug;
  kind: 'started' | 'stopped' | 'rate changed';
  /** For a rate change: the entry it follows (a rate change is read from the pair, so both are its evidence). */
  previous?: VasoactiveDrug;
  at: string;
  atMs: number;
}

function sameRate(a: VasoactiveDrug, b: VasoactiveDrug): boolean {
  if (!a.rate || !b.rate) return !a.rate && !b.rate;
  return a.rate.value === b.rate.value && a.rate.unit === b.rate.unit;
}

function sameDrug(a: VasoactiveDrug, b: VasoactiveDrug): boolean {
  return a.drug.trim().toLowerCase() === b.drug.trim().toLowerCase();
}

/**
 * Entries that a change check over [fromMs, toMs] looks at: every entry overlapping the span widened by the
 * abutting tolerance (running through it, starting or ending in it). They are the evidence of "no change" too.
 */
export function vasoactivesAround(all: readonly VasoactiveDrug[], fromMs: number, toMs: number): VasoactiveDrug[] {
  return all
    .filter((v) => {
      if (IGNORED_STATUS.has(v.status)) return false;
      const s = timeMs(v.start);
      const e = v.end === undefined ? Infinity : timeMs(v.end);
      return Number.isFinite(s) && s <= toMs + ABUT_MS && e >= fromMs - ABUT_MS;
    })
    .sort((a, b) => timeMs(a.start) - timeMs(b.start) || compareText(a.ref, b.ref));
}

/** Changes with fromMs ≤ time ≤ toMs, in time order (ties by reference). */
export function vasoactiveChangesBetween(all: readonly VasoactiveDrug[], fromMs: number, toMs: number): DoseChange[] {
  // An entry with no recorded start (an active order without authoredOn) shows no change: when it began is unknown.
  const drugs = all.filter(
    (v): v is VasoactiveDrug & { start: string } => !IGNORED_STATUS.has(v.status) && Number.isFinite(timeMs(v.start)),
  );
  const out: DoseChange[] = [];
  const inSpan = (ms: number) => ms >= fromMs && ms <= toMs;
  for (const v of drugs) {
    const startMs = timeMs(v.start);
    if (inSpan(startMs)) {
      const prev = drugs.filter((w) => w !== v && sameDrug(w, v) && w.end !== undefined && Math.abs(timeMs(w.end) - startMs) <= ABUT_MS);
      if (prev.length === 0) out.push({ drug: v, kind: 'started', at: v.start, atMs: startMs });
      else if (!prev.some((w) => sameRate(w, v))) {
        const before = [...prev].sort((a, b) => compareText(a.ref, b.ref))[0] as VasoactiveDrug;
        out.push({ drug: v, kind: 'rate changed', previous: before, at: v.start, atMs: startMs });
      }
    }
    if (v.end !== undefined) {
      const endMs = timeMs(v.end);
      if (Number.isFinite(endMs) && inSpan(endMs)) {
        const next = drugs.filter((w) => w !== v && sameDrug(w, v) && Math.abs(timeMs(w.start) - endMs) <= ABUT_MS);
        // A following entry at another rate is reported once, as its 'rate changed'.
        if (next.length === 0) out.push({ drug: v, kind: 'stopped', at: v.end, atMs: endMs });
      }
    }
  }
  return out.sort((a, b) => a.atMs - b.atMs || compareText(a.drug.ref, b.drug.ref) || compareText(a.kind, b.kind));
}
