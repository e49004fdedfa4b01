/**
 * Which body weight a rule uses: the admission weight (for %FO and weight gain) or the latest recent
 * weight (for per-kg rates), each with its basis named.
 */
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import { ageMinutesRounded, readingsOldestFirst, timeMs } from '../common/select.js';

/** Admission time from the encounter, when it has a usable start not after now. */
export function encounterStartMs(snapshot: PatientSnapshot, now: Date): number | undefined {
  const ms = timeMs(snapshot.encounter?.start);
  return Number.isFinite(ms) && ms <= now.getTime() ? ms : undefined;
}

/**
 * Admission weight: the earliest weight from `admissionWeightWindowHours` before the admission time on;
 * without an admission time, the earliest weight within `balanceFallbackLookbackHours`.
 */
export function admissionWeight(
  snapshot: PatientSnapshot,
  now: Date,
  t: { admissionWeightWindowHours: number; balanceFallbackLookbackHours: number },
): { m: Measurement; basis: 'admission' | 'earliest-recorded' } | undefined {
  const start = encounterStartMs(snapshot, now);
  const fromMs =
    start !== undefined ? start - t.admissionWeightWindowHours * 3_600_000 : now.getTime() - t.balanceFallbackLookbackHours * 3_600_000;
  const first = readingsOldestFirst(snapshot, 'bodyWeight', now).items.find((m) => timeMs(m.effective) >= fromMs);
  if (!first) return undefined;
  return { m: first, basis: start !== undefined ? 'admission' : 'earliest-recorded' };
}

/** Latest weight no older than `maxAgeHours`. */
export function latestWeight(snapshot: PatientSnapshot, now: Date, maxAgeHours: number): Measurement | undefined {
  const last = readingsOldestFirst(snapshot, 'bodyWeight', now).items.at(-1);
  return last && ageMinutesRounded(last.effective, now) <= maxAgeHours * 60 ? last : undefined;
}

/** Weight for per-kg figures: the latest recent weight, else the admission weight. */
export function weightForPerKg(
  snapshot: PatientSnapshot,
  now: Date,
  t: { weightMaxAgeHours: number; admissionWeightWindowHours: number; balanceFallbackLookbackHours: number },
): { m: Measurement; basis: 'latest' | 'admission' | 'earliest-recorded' } | undefined {
  const latest = latestWeight(snapshot, now, t.weightMaxAgeHours);
  if (latest) return { m: latest, basis: 'latest' };
  return admissionWeight(snapshot, now, t);
}
