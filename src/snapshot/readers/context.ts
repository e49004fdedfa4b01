/**
 * What every resource reader is given and gives back. A reader is a pure function
 * `(resource, ref, context) → Read`: the snapshot items it found and the exclusions (with reasons) of what it
 * read but could not use. `buildSnapshot` (../normalize.ts) only dispatches, merges and sorts.
 */
import type { SiteMap } from '../../fhir/site-map.js';
import { fhirDateTime } from '../time.js';
import type {
  CodedMeasurement,
  ConditionEntry,
  DynamicTestResult,
  Exclusion,
  FluidGiven,
  Measurement,
  PatientSnapshot,
  VasoactiveDrug,
} from '../types.js';

/** A time this far past `now` is taken as clock skew between systems, not as a future time (common practice). */
const FUTURE_SKEW_MS = 5 * 60_000;
/** Longest reason kept for a left-out resource (our own bound): a reason may quote client text, and the audit record keeps it. */
const MAX_DETAIL_LENGTH = 300;

export interface ReadContext {
  now: Date;
  nowMs: number;
  /** "Patient/{id}" of the patient in context. */
  patientRef: string;
  /** The site's ConceptMaps and unit hints (src/fhir/site-map.ts). */
  siteMap: SiteMap;
}

/** What one reader found in one resource. */
export interface Read {
  measurements?: Measurement[];
  coded?: CodedMeasurement[];
  dynamicTests?: DynamicTestResult[];
  fluids?: FluidGiven[];
  vasoactives?: VasoactiveDrug[];
  conditions?: ConditionEntry[];
  patient?: PatientSnapshot['patient'];
  encounter?: NonNullable<PatientSnapshot['encounter']>;
  excluded?: Exclusion[];
}

/** Nothing found, nothing left out (a resource that is not ours to read). */
export const NOTHING: Read = Object.freeze({});

export function exclusion(ref: string, reason: Exclusion['reason'], detail: string, kind?: string): Exclusion {
  const d = detail.length > MAX_DETAIL_LENGTH ? `${detail.slice(0, MAX_DETAIL_LENGTH)}…` : detail;
  return kind ? { ref, reason, detail: d, kind } : { ref, reason, detail: d };
}

/** A Read of one exclusion. */
export const left = (ref: string, reason: Exclusion['reason'], detail: string, kind?: string): Read => ({
  excluded: [exclusion(ref, reason, detail, kind)],
});

/**
 * A usable time (UTC ISO instant, its milliseconds, its age in whole minutes at `now`, and whether only its date was
 * given), or why it is not usable.
 */
export type TimeRead = { ok: true; iso: string; ms: number; ageMinutes: number; dateOnly: boolean } | { ok: false; excluded: Exclusion };

/**
 * A FHIR R4 dateTime read strictly (src/snapshot/time.ts): a clock time needs its offset. A date alone is accepted only
 * when `dateOk` (where a day's precision is enough), taken as the start of that day (UTC).
 */
export function readTime(ctx: ReadContext, ref: string, raw: string | undefined, kind?: string, dateOk = false): TimeRead {
  if (!raw) return { ok: false, excluded: exclusion(ref, 'no-time', 'no effective time', kind) };
  const t = fhirDateTime(raw);
  if (!t)
    return {
      ok: false,
      excluded: exclusion(
        ref,
        'no-time',
        `"${raw}" is not a FHIR date-time (a date, or a date and time with seconds and an offset Z or ±hh:mm)`,
        kind,
      ),
    };
  if (t.precision !== 'second' && !(dateOk && t.precision === 'day'))
    return { ok: false, excluded: exclusion(ref, 'no-time', `"${raw}" has no clock time and offset`, kind) };
  if (t.ms > ctx.nowMs + FUTURE_SKEW_MS) return { ok: false, excluded: exclusion(ref, 'future-time', `${raw} is in the future`, kind) };
  return { ok: true, iso: t.iso, ms: t.ms, ageMinutes: Math.round((ctx.nowMs - t.ms) / 60_000), dateOnly: t.precision === 'day' };
}

/** Volumes to 0.1 mL: unit conversion leaves binary fractions (249.99999…) that mean nothing clinically. */
export function roundMl(v: number): number {
  return Math.round(v * 10) / 10;
}

export function round2(v: number): number {
  return Math.round(v * 100) / 100;
}
