/**
 * Picking data from a snapshot for the responsiveness rules: usable readings of one kind, newest first, the
 * newest one with its freshness against a window, readings inside a time span, and evidence records.
 * Age is computed from the injected `now`, never from the clock. Sorting is total (time, then reference, then
 * content) so that no result depends on the order of the snapshot arrays.
 * General enough to move to src/assess/ if other rule groups want it.
 */
import { KIND_UNITS, type CodedKind, type DynamicTestKind, type NumericKind } from '../../fhir/codes.js';
import type { CodedMeasurement, DynamicTestResult, FluidGiven, Measurement, PatientSnapshot, VasoactiveDrug } from '../../snapshot/types.js';
import type { Evidence } from '../types.js';
import { parseTimeMs } from '../../snapshot/time.js';

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
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Newest first; ties by reference, then by content, so the order is total. */
export function newestFirst<T extends { effective: string; ref: string }>(a: T, b: T): number {
  return timeMs(b.effective) - timeMs(a.effective) || compareText(a.ref, b.ref) || compareText(JSON.stringify(a), JSON.stringify(b));
}

export function round1(v: number): number {
  return Math.round(v * 10) / 10;
}

export type Selection<T> =
  | { state: 'fresh'; item: T; ageMinutes: number; windowMin: number }
  | { state: 'stale'; item: T; ageMinutes: number; windowMin: number }
  | { state: 'invalid'; item: T; ageMinutes: number; windowMin: number; detail: string }
  | { state: 'missing'; windowMin: number };

export interface MeasurementSeries {
  /** Usable readings (canonical unit, finite value, not in the future), newest first. */
  items: Measurement[];
  /** Readings whose unit is not the canonical unit of the kind: never used. */
  wrongUnit: Measurement[];
}

export function measurementsOf(s: PatientSnapshot, kind: NumericKind, now: Date): MeasurementSeries {
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

function choose<T extends { effective: string }>(items: readonly T[], now: Date, windowMin: number): Selection<T> {
  const first = items[0];
  if (first === undefined) return { state: 'missing', windowMin };
  const age = ageMinutes(first.effective, now);
  return { state: age <= windowMin ? 'fresh' : 'stale', item: first, ageMinutes: age, windowMin };
}

/** The newest usable reading of `kind`, fresh if its age is ≤ windowMin. Wrong-unit readings only show as 'invalid' when nothing else exists. */
export function latestMeasurement(s: PatientSnapshot, kind: NumericKind, now: Date, windowMin: number): Selection<Measurement> {
  const { items, wrongUnit } = measurementsOf(s, kind, now);
  const picked = choose(items, now, windowMin);
  const bad = wrongUnit[0];
  if (picked.state === 'missing' && bad !== undefined) {
    return {
      state: 'invalid', item: bad, ageMinutes: ageMinutes(bad.effective, now), windowMin,
      detail: `unit '${bad.unit}' is not the expected '${KIND_UNITS[kind]}'`,
    };
  }
  return picked;
}

/** Usable readings of `kind` with fromMs ≤ time ≤ toMs, newest first. */
export function measurementsBetween(s: PatientSnapshot, kind: NumericKind, now: Date, fromMs: number, toMs: number): Measurement[] {
  return measurementsOf(s, kind, now).items.filter((m) => {
    const ms = timeMs(m.effective);
    return ms >= fromMs && ms <= toMs;
  });
}

export function codedOf(s: PatientSnapshot, kind: CodedKind, now: Date): CodedMeasurement[] {
  return s.coded.filter((c) => c.kind === kind && usableTime(c.effective, now)).sort(newestFirst);
}

export function latestCoded(s: PatientSnapshot, kind: CodedKind, now: Date, windowMin: number): Selection<CodedMeasurement> {
  return choose(codedOf(s, kind, now), now, windowMin);
}

export function dynamicTestsOf(s: PatientSnapshot, kind: DynamicTestKind, now: Date): DynamicTestResult[] {
  return s.dynamicTests
    .filter((d) => d.kind === kind && usableTime(d.effective, now) && Number.isFinite(d.before) && Number.isFinite(d.after))
    .sort(newestFirst);
}

export function evidenceOfMeasurement(m: Measurement, now: Date): Evidence {
  return { ref: m.ref, kind: m.kind, value: m.value, unit: m.unit, effective: m.effective, ageMinutes: round1(ageMinutes(m.effective, now)) };
}

export function evidenceOfCoded(c: CodedMeasurement, now: Date): Evidence {
  return { ref: c.ref, kind: c.kind, value: c.answer, effective: c.effective, ageMinutes: round1(ageMinutes(c.effective, now)) };
}

export function evidenceOfDynamicTest(d: DynamicTestResult, now: Date): Evidence {
  return {
    ref: d.ref, kind: `${d.kind}:${d.measured}`, value: `${d.before} → ${d.after}`, unit: d.unit,
    effective: d.effective, ageMinutes: round1(ageMinutes(d.effective, now)),
  };
}

export function evidenceOfFluid(f: FluidGiven, now: Date): Evidence {
  return { ref: f.ref, kind: 'fluid', value: f.volumeMl, unit: 'mL', effective: f.end, ageMinutes: round1(ageMinutes(f.end, now)) };
}

export function evidenceOfVasoactive(v: VasoactiveDrug, now: Date): Evidence {
  const value = v.rate ? `${v.drug} ${v.rate.value} ${v.rate.unit}` : v.drug;
  return { ref: v.ref, kind: 'vasoactive', value, effective: v.start, ageMinutes: round1(ageMinutes(v.start, now)) };
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
