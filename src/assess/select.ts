/** Picking measurements from a snapshot by kind and freshness. Pure. */
import type { NumericKind } from '../fhir/codes.js';
import type { Measurement, PatientSnapshot } from '../snapshot/types.js';
import type { Evidence, Freshness } from './types.js';

export interface Picked {
  freshness: Freshness;
  /** The newest measurement of the kind, fresh or not (undefined when missing). */
  latest?: Measurement;
}

/** The newest measurement of `kind` and whether it is within `windowMinutes` of now. */
export function pickLatest(s: PatientSnapshot, kind: NumericKind, windowMinutes: number): Picked {
  let latest: Measurement | undefined;
  for (const m of s.measurements) {
    if (m.kind === kind && (!latest || Date.parse(m.effective) > Date.parse(latest.effective))) latest = m;
  }
  if (!latest) return { freshness: 'missing' };
  return { freshness: latest.ageMinutes <= windowMinutes ? 'fresh' : 'stale', latest };
}

export function evidenceOf(m: Measurement): Evidence {
  return { ref: m.ref, kind: m.kind, value: roundTo(m.value, 2), unit: m.unit, effective: m.effective, ageMinutes: m.ageMinutes };
}

export function roundTo(v: number, digits: number): number {
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}

/** "12 min", "3 h 5 min", "2 d 4 h": ages as a prescriber reads them. */
export function formatAge(minutes: number): string {
  if (minutes < 60) return `${Math.max(0, Math.round(minutes))} min`;
  if (minutes < 48 * 60) {
    const h = Math.floor(minutes / 60);
    const m = Math.round(minutes - h * 60);
    return m ? `${h} h ${m} min` : `${h} h`;
  }
  const d = Math.floor(minutes / 1440);
  const h = Math.round((minutes - d * 1440) / 60);
  return h ? `${d} d ${h} h` : `${d} d`;
}
