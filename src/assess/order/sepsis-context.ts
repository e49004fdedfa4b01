/**
 * Rule order.sepsis-context: the Surviving Sepsis Campaign 2021 figure of at least 30 mL/kg crystalloid
 * within the first 3 h for sepsis-induced hypoperfusion (Evans L et al., Intensive Care Med 2021;47:1181;
 * weak recommendation, low-quality evidence), beside the IV fluid recorded in the last 3 h. Context only:
 * Tidemark does not know whether that situation applies, and the figure is not a target.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { volumeInWindowMl } from '../../physiology/fluid-balance.js';
import { sepsisInitialCrystalloidMl } from '../../physiology/sepsis-volume.js';
import type { Evidence, OrderFinding } from '../common/finding.js';
import { ageMinutesRounded as ageMinutesAt, evidenceOfMeasurement as evidenceOf, timeMs } from '../common/select.js';
import { fmt, round } from '../common/text.js';
import { admissionWeight } from '../tolerance/weights.js';
import type { OrderThresholds } from './thresholds.js';

export const SEPSIS_CONTEXT = 'order.sepsis-context';
const SOURCE =
  'Surviving Sepsis Campaign 2021 (Evans L et al., Intensive Care Med 2021;47:1181, doi 10.1007/s00134-021-06506-y): ≥ 30 mL/kg IV crystalloid within the first 3 h, weak recommendation, low-quality evidence';

/** SSC 2021 reference volume in mL for a weight in kg (70 kg → 2,100 mL). */
export function sepsisReferenceVolumeMl(weightKg: number, t: Pick<OrderThresholds, 'sepsisMlPerKg'>): number {
  return sepsisInitialCrystalloidMl(weightKg, t.sepsisMlPerKg);
}

/** IV fluid recorded as given in the last `hours` (administrations, spread over their periods), all and crystalloid only. */
export function fluidGivenWithin(
  snapshot: PatientSnapshot,
  now: Date,
  hours: number,
): { totalMl: number; crystalloidMl: number; evidence: Evidence[] } {
  const toMs = now.getTime();
  const fromMs = toMs - hours * 3_600_000;
  const recs = snapshot.fluids
    .filter((f) => Number.isFinite(timeMs(f.start)) && timeMs(f.start) <= toMs && f.volumeMl > 0)
    .map((f) => {
      const startMs = timeMs(f.start);
      const end = timeMs(f.end);
      return { f, id: f.ref, volumeMl: f.volumeMl, startMs, endMs: Number.isFinite(end) && end >= startMs ? end : startMs };
    })
    .sort((a, b) => a.endMs - b.endMs || Number(a.id > b.id) - Number(a.id < b.id));
  const inWin = recs.filter((r) => volumeInWindowMl([r], fromMs, toMs) > 0);
  const crystalloid = inWin.filter((r) => r.f.fluidClass === 'balanced-crystalloid' || r.f.fluidClass === 'saline');
  return {
    totalMl: volumeInWindowMl(inWin, fromMs, toMs),
    crystalloidMl: volumeInWindowMl(crystalloid, fromMs, toMs),
    evidence: inWin.map((r) => ({
      ref: r.f.ref,
      kind: `fluid:${r.f.fluidClass}`,
      value: r.f.volumeMl,
      unit: 'mL',
      effective: r.f.end,
      ageMinutes: ageMinutesAt(r.f.end, now),
    })),
  };
}

export function sepsisContext(snapshot: PatientSnapshot, now: Date, t: OrderThresholds, orderVolumeMl?: number): OrderFinding {
  // On the admission (dry) weight, not today's fluid-laden weight (docs/clinical-logic).
  const weight = admissionWeight(snapshot, now, t);
  if (!weight) {
    return {
      ruleId: SEPSIS_CONTEXT,
      topic: 'order',
      part: 'sepsis-context',
      status: 'not-assessed',
      gap: 'missing',
      text: 'Sepsis volume context not given',
      reason: 'no admission weight recorded',
      evidence: [],
      source: SOURCE,
    };
  }
  const kg = weight.m.value;
  const referenceMl = sepsisReferenceVolumeMl(kg, t);
  const given = fluidGivenWithin(snapshot, now, t.sepsisWindowHours);
  const withOrder = orderVolumeMl !== undefined ? given.totalMl + orderVolumeMl : undefined;
  const h = fmt(t.sepsisWindowHours);
  return {
    ruleId: SEPSIS_CONTEXT,
    topic: 'order',
    part: 'sepsis-context',
    status: 'assessed',
    text:
      `Context only, if sepsis-induced hypoperfusion: SSC 2021 suggests ≥ ${fmt(t.sepsisMlPerKg)} mL/kg crystalloid in the first ${h} h ` +
      `(${fmt(referenceMl)} mL for ${fmt(kg, 1)} kg ${weight.basis === 'admission' ? 'admission' : 'earliest recorded'} weight; weak recommendation, low-quality evidence). Recorded IV fluid in the last ${h} h: ${fmt(given.totalMl)} mL` +
      (withOrder !== undefined ? `; with this order ${fmt(withOrder)} mL (${fmt(withOrder / kg, 1)} mL/kg)` : ''),
    values: {
      referenceMl: round(referenceMl, 0),
      mlPerKg: t.sepsisMlPerKg,
      weightKg: kg,
      weightBasis: weight.basis,
      givenWindowMl: round(given.totalMl, 0),
      crystalloidWindowMl: round(given.crystalloidMl, 0),
      windowHours: t.sepsisWindowHours,
      ...(withOrder !== undefined ? { withOrderMl: round(withOrder, 0), withOrderMlPerKg: round(withOrder / kg, 1) } : {}),
    },
    evidence: [evidenceOf(weight.m, now), ...given.evidence],
    source: SOURCE,
  };
}
