/**
 * The one way every rule picks data from a snapshot: usable readings of a kind (newest first), the latest one
 * judged against its window (fresh, stale, missing, invalid), and set aside when an event since then (a fluid of
 * ≥ 100 mL, a vasoactive change) means it no longer describes the patient (docs/clinical-logic/index.md).
 * Age is computed from the injected `now`, never from the clock. Sorting is total (time, then reference, then
 * content) so that no result depends on the order of the snapshot arrays.
 */
import { KIND_UNITS, type CodedKind, type DynamicTestKind, type NumericKind } from '../../fhir/codes.js';
import { parseTimeMs } from '../../snapshot/time.js';
import type {
  CodedMeasurement,
  DynamicTestResult,
  FluidGiven,
  Measurement,
  PatientSnapshot,
  VasoactiveDrug,
} from '../../snapshot/types.js';
import type { Evidence, EvidenceEvent, Selection } from './evidence.js';
import { round } from './text.js';

export type { Selection, Unusable } from './evidence.js';

/** A time up to this far after `now` is clock skew and counts as age 0 (common practice). */
export const CLOCK_SKEW_MIN = 5;

export function timeMs(iso: string | undefined): number {
  return iso === undefined ? Number.NaN : parseTimeMs(iso);
}

/** Minutes from `iso` to `now` (never negative: clock skew within CLOCK_SKEW_MIN counts as 0). */
export function ageMinutes(iso: string, now: Date): number {
  return Math.max(0, (now.getTime() - timeMs(iso)) / 60_000);
}

/** A time that parses and is not in the future beyond clock skew. */
export function usableTime(iso: string | undefined, now: Date): boolean {
  const ms = timeMs(iso);
  return Number.isFinite(ms) && ms <= now.getTime() + CLOCK_SKEW_MIN * 60_000;
}

export function compareText(a: string, b: string): number {
  return Number(a > b) - Number(a < b);
}

/** Newest first; ties by reference, then by content, so the order is total. */
export function newestFirst<T extends { effective: string; ref: string }>(a: T, b: T): number {
  return timeMs(b.effective) - timeMs(a.effective) || compareText(a.ref, b.ref) || compareText(JSON.stringify(a), JSON.stringify(b));
}

export interface Readings {
  /** Usable readings (canonical unit, finite value, not in the future), newest first. */
  items: Measurement[];
  /** Readings whose unit is not the canonical unit of the kind: never used. */
  wrongUnit: Measurement[];
}

export function readings(s: PatientSnapshot, kind: NumericKind, now: Date): Readings {
  const items: Measurement[] = [];
  const wrongUnit: Measurement[] = [];
  for (const m of s.measurements) {
    if (m.kind !== kind || !usableTime(m.effective, now) || !Number.isFinite(m.value)) continue;
    if (m.unit !== KIND_UNITS[kind]) wrongUnit.push(m);
    else items.push(m);
  }
  items.sort(newestFirst);
  wrongUnit.sort(newestFirst);
  return { items, wrongUnit };
}

/** Usable readings of `kind`, oldest first (for rules that walk a series forwards in time). */
export function readingsOldestFirst(s: PatientSnapshot, kind: NumericKind, now: Date): Readings {
  const r = readings(s, kind, now);
  return { items: [...r.items].reverse(), wrongUnit: [...r.wrongUnit].reverse() };
}

/** Age in minutes rounded to 0.1, as evidence records carry it. */
export function ageMinutesRounded(iso: string, now: Date): number {
  return round(ageMinutes(iso, now), 1);
}

/** Usable readings of `kind` with fromMs ≤ time ≤ toMs, newest first. */
export function readingsBetween(s: PatientSnapshot, kind: NumericKind, now: Date, fromMs: number, toMs: number): Measurement[] {
  return readings(s, kind, now).items.filter((m) => {
    const ms = timeMs(m.effective);
    return ms >= fromMs && ms <= toMs;
  });
}

export interface PickOptions {
  /** Events after which a reading no longer describes the patient (see events.ts); the newest one after the reading sets it aside. */
  events?: readonly EvidenceEvent[];
}

function choose<T extends { effective: string }>(items: readonly T[], now: Date, windowMin: number, opts: PickOptions): Selection<T> {
  const first = items[0];
  if (first === undefined) return { state: 'missing', windowMin };
  const age = ageMinutes(first.effective, now);
  if (age > windowMin) return { state: 'stale', item: first, ageMinutes: age, windowMin };
  const atMs = timeMs(first.effective);
  const event = (opts.events ?? []).find((e) => e.atMs > atMs);
  if (event) return { state: 'set-aside', item: first, ageMinutes: age, windowMin, event };
  return { state: 'fresh', item: first, ageMinutes: age, windowMin };
}

/**
 * The newest usable reading of `kind`: fresh if its age is ≤ windowMin and no event came after it.
 * Wrong-unit readings show as 'invalid' only when nothing else exists.
 */
export function latestReading(
  s: PatientSnapshot,
  kind: NumericKind,
  now: Date,
  windowMin: number,
  opts: PickOptions = {},
): Selection<Measurement> {
  const { items, wrongUnit } = readings(s, kind, now);
  const picked = choose(items, now, windowMin, opts);
  const bad = wrongUnit[0];
  if (picked.state === 'missing' && bad !== undefined) {
    return {
      state: 'invalid',
      item: bad,
      ageMinutes: ageMinutes(bad.effective, now),
      windowMin,
      detail: `unit '${bad.unit}' is not the expected '${KIND_UNITS[kind]}'`,
    };
  }
  return picked;
}

export function codedOf(s: PatientSnapshot, kind: CodedKind, now: Date): CodedMeasurement[] {
  return s.coded.filter((c) => c.kind === kind && usableTime(c.effective, now)).sort(newestFirst);
}

export function latestCoded(
  s: PatientSnapshot,
  kind: CodedKind,
  now: Date,
  windowMin: number,
  opts: PickOptions = {},
): Selection<CodedMeasurement> {
  return choose(codedOf(s, kind, now), now, windowMin, opts);
}

export function dynamicTestsOf(s: PatientSnapshot, kind: DynamicTestKind, now: Date): DynamicTestResult[] {
  return s.dynamicTests
    .filter((d) => d.kind === kind && usableTime(d.effective, now) && Number.isFinite(d.before) && Number.isFinite(d.after))
    .sort(newestFirst);
}

/** Judge one chosen item against a window and events (for rules that choose among several, e.g. the best read-out). */
export function judge<T extends { effective: string }>(
  item: T | undefined,
  now: Date,
  windowMin: number,
  opts: PickOptions = {},
): Selection<T> {
  return choose(item === undefined ? [] : [item], now, windowMin, opts);
}

export function evidenceOfMeasurement(m: Measurement, now: Date): Evidence {
  return {
    ref: m.ref,
    kind: m.kind,
    value: m.value,
    unit: m.unit,
    effective: m.effective,
    ageMinutes: round(ageMinutes(m.effective, now), 1),
  };
}

export function evidenceOfCoded(c: CodedMeasurement, now: Date): Evidence {
  return { ref: c.ref, kind: c.kind, value: c.answer, effective: c.effective, ageMinutes: round(ageMinutes(c.effective, now), 1) };
}

export function evidenceOfDynamicTest(d: DynamicTestResult, now: Date): Evidence {
  return {
    ref: d.ref,
    kind: `${d.kind}:${d.measured}`,
    value: `${d.before} → ${d.after}`,
    unit: d.unit,
    effective: d.effective,
    ageMinutes: round(ageMinutes(d.effective, now), 1),
  };
}

export function evidenceOfFluid(f: FluidGiven, now: Date): Evidence {
  return {
    ref: f.ref,
    kind: `fluid:${f.fluidClass}`,
    value: f.volumeMl,
    unit: 'mL',
    effective: f.end,
    ageMinutes: round(ageMinutes(f.end, now), 1),
  };
}

/**
 * A vasoactive as evidence, at its start; one running with no recorded start (an active order without authoredOn) is evidence as of `now`.
 */
export function evidenceOfVasoactive(v: VasoactiveDrug, now: Date): Evidence {
  const value = v.rate ? `${v.drug} ${v.rate.value} ${v.rate.unit}` : v.drug;
  const at = v.start ?? now.toISOString();
  return { ref: v.ref, kind: 'vasoactive', value, effective: at, ageMinutes: round(ageMinutes(at, now), 1) };
}

/** Evidence in one total order (newest first, then reference, then kind) with duplicates removed. */
export function sortEvidence(list: readonly Evidence[]): Evidence[] {
  const seen = new Set<string>();
  const out: Evidence[] = [];
  for (const e of list) {
    const key = `${e.ref}|${e.kind}`;
    if (seen.has(key)) continue;
    seen.add(key);
    out.push(e);
  }
  return out.sort((a, b) => timeMs(b.effective) - timeMs(a.effective) || compareText(a.ref, b.ref) || compareText(a.kind, b.kind));
}
