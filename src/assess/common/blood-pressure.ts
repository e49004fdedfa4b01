/**
 * One series of MAP values: measured MAP where there is one; otherwise MAP computed from a systolic and a
 * diastolic reading with the same time (DBP + (SBP − DBP)/3). Used by the last-bolus and MAP rules.
 */
import { meanArterialPressureMmHg } from '../../physiology/mean-arterial-pressure.js';
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence } from './finding.js';
import { compareText, evidenceOfMeasurement, readings, timeMs } from './select.js';

export interface MapPoint {
  mapMmHg: number;
  effective: string;
  effectiveMs: number;
  /** True for a measured MAP, false for one computed from SBP/DBP. */
  measured: boolean;
  /** The readings it came from (one measured MAP, or the SBP and DBP). */
  sources: Measurement[];
}

/** All MAP points, newest first (ties by the first source reference). */
export function mapSeries(s: PatientSnapshot, now: Date): MapPoint[] {
  const points: MapPoint[] = [];
  const measuredAt = new Set<number>();
  for (const m of readings(s, 'meanBp', now).items) {
    const ms = timeMs(m.effective);
    measuredAt.add(ms);
    points.push({ mapMmHg: m.value, effective: m.effective, effectiveMs: ms, measured: true, sources: [m] });
  }
  // measurementsOf sorts newest first with ties by reference, so the first reading at a time is well defined.
  const firstAt = (items: Measurement[]): Map<number, Measurement> => {
    const byTime = new Map<number, Measurement>();
    for (const m of items) {
      const ms = timeMs(m.effective);
      if (!byTime.has(ms)) byTime.set(ms, m);
    }
    return byTime;
  };
  const dbpAt = firstAt(readings(s, 'diastolicBp', now).items);
  for (const [ms, sbp] of firstAt(readings(s, 'systolicBp', now).items)) {
    const dbp = dbpAt.get(ms);
    if (dbp === undefined || measuredAt.has(ms) || sbp.value < dbp.value) continue;
    points.push({
      mapMmHg: meanArterialPressureMmHg(sbp.value, dbp.value),
      effective: sbp.effective,
      effectiveMs: ms,
      measured: false,
      sources: [sbp, dbp],
    });
  }
  return points.sort((a, b) => b.effectiveMs - a.effectiveMs || compareText(a.sources[0]?.ref ?? '', b.sources[0]?.ref ?? ''));
}

export function mapPointEvidence(p: MapPoint, now: Date): Evidence[] {
  return p.sources.map((m) => evidenceOfMeasurement(m, now));
}
