/**
 * Picking measurements for the tolerance rules: usable values of one kind in time order, the latest one
 * with its freshness, and evidence records. Age is computed from the injected `now`, never from the clock.
 * Sorting is total (time, then reference, then value) so that results never depend on input order.
 */
import { KIND_UNITS, type CodedKind, type NumericKind } from '../../fhir/codes.js';
import type { CodedMeasurement, Measurement, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence } from '../types.js';
import { parseTimeMs } from '../../snapshot/time.js';

/** A time this far after `now` is clock skew, not a future value (common practice). */
const SKEW_MINUTES = 5;

export function timeMs(iso: string | undefined): number {
  return iso === undefined ? Number.NaN : parseTimeMs(iso);
}

export function ageMinutesAt(effective: string, now: Date): number {
  return Math.max(0, Math.round(((now.getTime() - timeMs(effective)) / 60_000) * 10) / 10);
}

function compareText(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Oldest first; ties by reference, then value. */
export function byTime<T extends { effective: string; ref: string }>(a: T, b: T): number {
  return timeMs(a.effective) - timeMs(b.effective) || compareText(a.ref, b.ref);
}

function usableTime(effective: string, now: Date): boolean {
  const ms = timeMs(effective);
  return Number.isFinite(ms) && ms <= now.getTime() + SKEW_MINUTES * 60_000;
}

export interface Series {
  /** Usable values, oldest first. */
  items: Measurement[];
  /** Values whose unit is not the canonical unit of the kind: never used, reported. */
  wrongUnit: Measurement[];
}

export function seriesOf(snapshot: PatientSnapshot, kind: NumericKind, now: Date): Series {
  const items: Measurement[] = [];
  const wrongUnit: Measurement[] = [];
  for (const m of snapshot.measurements) {
    if (m.kind !== kind || !usableTime(m.effective, now) || !Number.isFinite(m.value)) continue;
    if (m.unit !== KIND_UNITS[kind]) wrongUnit.push(m);
    else items.push(m);
  }
  items.sort((a, b) => byTime(a, b) || a.value - b.value);
  wrongUnit.sort(byTime);
  return { items, wrongUnit };
}

export function codedSeriesOf(snapshot: PatientSnapshot, kind: CodedKind, now: Date): CodedMeasurement[] {
  return snapshot.coded
    .filter((c) => c.kind === kind && usableTime(c.effective, now))
    .sort((a, b) => byTime(a, b) || compareText(a.answer, b.answer));
}

export type Pick<T> =
  | { state: 'fresh'; item: T }
  | { state: 'stale'; item: T }
  | { state: 'missing'; wrongUnit: Measurement[] };

/** Latest usable value and whether it is within `maxAgeMinutes` of now. */
export function latestOf(snapshot: PatientSnapshot, kind: NumericKind, now: Date, maxAgeMinutes: number): Pick<Measurement> {
  const s = seriesOf(snapshot, kind, now);
  const last = s.items.at(-1);
  if (!last) return { state: 'missing', wrongUnit: s.wrongUnit };
  return { state: ageMinutesAt(last.effective, now) <= maxAgeMinutes ? 'fresh' : 'stale', item: last };
}

export function latestCodedOf(snapshot: PatientSnapshot, kind: CodedKind, now: Date, maxAgeMinutes: number): Pick<CodedMeasurement> {
  const last = codedSeriesOf(snapshot, kind, now).at(-1);
  if (!last) return { state: 'missing', wrongUnit: [] };
  return { state: ageMinutesAt(last.effective, now) <= maxAgeMinutes ? 'fresh' : 'stale', item: last };
}

export function evidenceOf(m: Measurement, now: Date): Evidence {
  return { ref: m.ref, kind: m.kind, value: m.value, unit: m.unit, effective: m.effective, ageMinutes: ageMinutesAt(m.effective, now) };
}

export function codedEvidenceOf(c: CodedMeasurement, now: Date): Evidence {
  return { ref: c.ref, kind: c.kind, value: c.answer, effective: c.effective, ageMinutes: ageMinutesAt(c.effective, now) };
}

/** Plain age for text: "40 min", "5 h", "3 d". */
export function ageText(minutes: number): string {
  if (minutes < 90) return `${Math.round(minutes)} min`;
  if (minutes < 48 * 60) return `${Math.round(minutes / 60)} h`;
  return `${Math.round(minutes / 1440)} d`;
}

/** The not-assessed reason for a missing, stale or wrong-unit pick. */
export function unusableReason(label: string, pick: Pick<Measurement | CodedMeasurement>, now: Date, maxAgeMinutes: number): string {
  if (pick.state === 'stale') {
    return `latest ${label} is ${ageText(ageMinutesAt(pick.item.effective, now))} old; older than ${ageText(maxAgeMinutes)} does not count`;
  }
  if (pick.state === 'missing' && pick.wrongUnit.length > 0) {
    const w = pick.wrongUnit.at(-1)!;
    return `${label} recorded only in unit '${w.unit}', not '${KIND_UNITS[w.kind]}'; not used`;
  }
  return `no ${label} recorded`;
}

export function round(value: number, decimals: number): number {
  const f = 10 ** decimals;
  return Math.round(value * f) / f;
}

/** One formatter per number of decimals: Number.toLocaleString builds a new Intl.NumberFormat on every call. */
const numberFormats = new Map<number, Intl.NumberFormat>();

/** Number for text with thousands separators, e.g. 2,100. */
export function fmt(value: number, decimals = 0): string {
  let nf = numberFormats.get(decimals);
  if (!nf) {
    nf = new Intl.NumberFormat('en-US', { maximumFractionDigits: decimals, minimumFractionDigits: 0 });
    numberFormats.set(decimals, nf);
  }
  const r = round(value, decimals);
  // Below 1,000 there is no separator to place: the shortest decimal form of r is what the formatter prints, when
  // it has no more than `decimals` decimals and no exponent (checked, else the formatter decides). -0 prints "-0".
  if (r > -1000 && r < 1000 && !Object.is(r, -0)) {
    const s = String(r);
    const dot = s.indexOf('.');
    if (!s.includes('e') && (dot < 0 || s.length - dot - 1 <= decimals)) return s;
  }
  return nf.format(r);
}
