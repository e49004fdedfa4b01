/**
 * Reading of the ordered bolus (topic 'order'): its volume, volume per kg, a plain estimate of how much
 * stays in the vessels and for how long, and the sepsis context figure. The order was parsed at the edge
 * (DraftOrder carries isFluid, fluidClass, volumeMl, durationMin).
 *
 * Rule ids: order.volume, order.volume-per-kg, order.intravascular-estimate, order.sepsis-context.
 */
import type { DraftOrder, FluidClass, PatientSnapshot } from '../../snapshot/types.js';
import {
  crystalloidIntravascularAfterDistributionMl,
  crystalloidPlasmaExpansionRangeMl,
  hyperOncoticAlbuminExpansionMl,
  isoOncoticAlbuminExpansionMl,
  roundToStep,
} from '../../physiology/volume-kinetics.js';
import type { Evidence, OrderFinding, OrderPart } from '../common/finding.js';
import { evidenceOfMeasurement as evidenceOf } from '../common/select.js';
import { fmt, round } from '../common/text.js';
import { weightForPerKg } from '../tolerance/weights.js';
import { sepsisContext } from './sepsis-context.js';
import type { OrderThresholds } from './thresholds.js';

export const ORDER_VOLUME = 'order.volume';
export const ORDER_VOLUME_PER_KG = 'order.volume-per-kg';
export const ORDER_INTRAVASCULAR = 'order.intravascular-estimate';

const KINETICS_SOURCE =
  'Crystalloid: about a quarter stays once distributed (saline PV:ISF ≈ 1:3, Ernest D et al., Crit Care Med 1999;27:46); rule of thumb a third, most gone within 4–6 h (common practice); ' +
  '50–60 % while infusing, 15–20 % 30 min after (Hahn RG, Acta Anaesthesiol Scand 2020, doi 10.1111/aas.13533); ' +
  'albumin 5 % ≈ volume infused; 20–25 % ≈ twice the volume (Crit Care 2020, doi 10.1186/s13054-020-02855-0)';

const CLASS_LABEL: Record<FluidClass, string> = {
  'balanced-crystalloid': 'balanced crystalloid',
  saline: 'saline 0.9 %',
  'albumin-iso': 'iso-oncotic albumin (4–5 %)',
  'albumin-hyper': 'hyper-oncotic albumin (20–25 %)',
  'other-colloid': 'colloid',
  other: 'IV fluid',
};

function orderEvidence(order: DraftOrder, now: Date): Evidence {
  return {
    ref: order.ref,
    kind: 'draftOrder',
    value: order.volumeMl ?? order.display ?? order.id,
    ...(order.volumeMl !== undefined ? { unit: 'mL' } : {}),
    effective: now.toISOString(),
    ageMinutes: 0,
  };
}

const PART: Record<string, OrderPart> = {
  [ORDER_VOLUME]: 'volume',
  [ORDER_VOLUME_PER_KG]: 'volume-per-kg',
  [ORDER_INTRAVASCULAR]: 'intravascular-estimate',
};

function notAssessed(ruleId: string, text: string, reason: string, evidence: Evidence[], source?: string): OrderFinding {
  return {
    ruleId,
    topic: 'order',
    part: PART[ruleId] ?? 'volume',
    status: 'not-assessed',
    gap: 'missing',
    text,
    reason,
    evidence,
    ...(source ? { source } : {}),
  };
}

function volumeFinding(order: DraftOrder, now: Date): OrderFinding {
  const ev = [orderEvidence(order, now)];
  if (order.volumeMl === undefined) {
    return notAssessed(ORDER_VOLUME, 'Ordered volume not read', order.volumeProblem ?? 'the order gives no volume in mL', ev);
  }
  const label = order.fluidClass ? CLASS_LABEL[order.fluidClass] : 'IV fluid';
  const rate = order.durationMin !== undefined && order.durationMin > 0 ? (order.volumeMl / order.durationMin) * 60 : undefined;
  return {
    ruleId: ORDER_VOLUME,
    topic: 'order',
    part: 'volume',
    status: 'assessed',
    fluidClass: order.fluidClass ?? 'other',
    text: `${fmt(order.volumeMl)} mL ${label}${order.durationMin !== undefined ? ` over ${fmt(order.durationMin)} min` : ''}${rate !== undefined ? ` (${fmt(rate)} mL/h)` : ''}`,
    values: {
      volumeMl: order.volumeMl,
      fluidClass: order.fluidClass ?? 'other',
      ...(order.durationMin !== undefined ? { durationMin: order.durationMin } : {}),
      ...(rate !== undefined ? { rateMlPerHour: round(rate, 0) } : {}),
    },
    evidence: ev,
  };
}

function perKgFinding(order: DraftOrder, snapshot: PatientSnapshot, now: Date, t: OrderThresholds): OrderFinding {
  const ev = [orderEvidence(order, now)];
  if (order.volumeMl === undefined) return notAssessed(ORDER_VOLUME_PER_KG, 'Volume per kg not given', 'no ordered volume', ev);
  const w = weightForPerKg(snapshot, now, t);
  if (!w) return notAssessed(ORDER_VOLUME_PER_KG, 'Volume per kg not given', 'no body weight recorded', ev);
  const perKg = order.volumeMl / w.m.value;
  const basis = { latest: 'latest weight', admission: 'admission weight', 'earliest-recorded': 'earliest recorded weight' }[w.basis];
  return {
    ruleId: ORDER_VOLUME_PER_KG,
    topic: 'order',
    part: 'volume-per-kg',
    status: 'assessed',
    text: `${fmt(perKg, 1)} mL/kg (${basis} ${fmt(w.m.value, 1)} kg)`,
    values: { volumeMlPerKg: round(perKg, 2), weightKg: w.m.value, weightBasis: w.basis },
    evidence: [...ev, evidenceOf(w.m, now)],
  };
}

/** The intravascular estimate for a volume of one fluid class, or undefined when Tidemark has none for the class. */
export function intravascularEstimate(
  volumeMl: number,
  fluidClass: FluidClass,
  t: OrderThresholds,
  durationMin?: number,
): { text: string; values: Record<string, number | string | boolean> } | undefined {
  const r = (ml: number) => roundToStep(ml, t.estimateRoundingMl);
  if (fluidClass === 'balanced-crystalloid' || fluidClass === 'saline') {
    const after = r(crystalloidIntravascularAfterDistributionMl(volumeMl, t.crystalloidRetainedFraction));
    const thumb = r(crystalloidIntravascularAfterDistributionMl(volumeMl, t.crystalloidRuleOfThumbFraction));
    const fr = {
      duringInfusion: [t.crystalloidDuringInfusionLowFraction, t.crystalloidDuringInfusionHighFraction] as const,
      thirtyMinutesAfter: [t.crystalloidThirtyMinutesAfterLowFraction, t.crystalloidThirtyMinutesAfterHighFraction] as const,
    };
    const [dLo, dHi] = crystalloidPlasmaExpansionRangeMl(volumeMl, 'during-infusion', fr).map(r) as [number, number];
    const [aLo, aHi] = crystalloidPlasmaExpansionRangeMl(volumeMl, 'thirty-minutes-after', fr).map(r) as [number, number];
    const saline = fluidClass === 'saline' ? ' Saline leaves the plasma about half as fast as balanced solutions (Hahn 2020).' : '';
    return {
      text:
        `About ${fmt(after)} mL of ${fmt(volumeMl)} mL stays in the vessels once distributed (about a quarter, Ernest 1999; the bedside rule of thumb of a third would say ${fmt(thumb)} mL); ` +
        `about ${fmt(dLo)}–${fmt(dHi)} mL while it runs${durationMin !== undefined ? ` (${fmt(durationMin)} min)` : ''}, ${fmt(aLo)}–${fmt(aHi)} mL 30 min after; ` +
        `most has left the circulation within ${fmt(t.crystalloidMostGoneLowHours)}–${fmt(t.crystalloidMostGoneHighHours)} h.${saline}`,
      values: {
        intravascularAfterDistributionMl: after,
        ruleOfThumbMl: thumb,
        duringInfusionLowMl: dLo,
        duringInfusionHighMl: dHi,
        thirtyMinutesAfterLowMl: aLo,
        thirtyMinutesAfterHighMl: aHi,
        mostGoneLowHours: t.crystalloidMostGoneLowHours,
        mostGoneHighHours: t.crystalloidMostGoneHighHours,
      },
    };
  }
  if (fluidClass === 'albumin-iso') {
    const ml = r(isoOncoticAlbuminExpansionMl(volumeMl, t.albuminIsoOncoticFactor));
    return {
      text: `Iso-oncotic albumin: plasma expands by about ${fmt(ml)} mL (about the volume infused, no distribution phase); intravascular half-life about ${fmt(t.colloidHalfLifeLowHours)}–${fmt(t.colloidHalfLifeHighHours)} h, shorter when capillaries leak.`,
      values: { plasmaExpansionMl: ml, halfLifeLowHours: t.colloidHalfLifeLowHours, halfLifeHighHours: t.colloidHalfLifeHighHours },
    };
  }
  if (fluidClass === 'albumin-hyper') {
    const ml = r(hyperOncoticAlbuminExpansionMl(volumeMl, t.albuminHyperOncoticFactor));
    return {
      text: `Hyper-oncotic albumin: plasma expands by about ${fmt(ml)} mL, about ${fmt(ml - volumeMl)} mL of it drawn from the interstitial space.`,
      values: { plasmaExpansionMl: ml, drawnFromInterstitiumMl: r(ml - volumeMl) },
    };
  }
  return undefined;
}

function estimateFinding(order: DraftOrder, now: Date, t: OrderThresholds): OrderFinding {
  const ev = [orderEvidence(order, now)];
  const title = 'Intravascular estimate not given';
  if (order.volumeMl === undefined) return notAssessed(ORDER_INTRAVASCULAR, title, 'no ordered volume', ev, KINETICS_SOURCE);
  if (!order.fluidClass) return notAssessed(ORDER_INTRAVASCULAR, title, 'the kind of fluid is not known', ev, KINETICS_SOURCE);
  const est = intravascularEstimate(order.volumeMl, order.fluidClass, t, order.durationMin);
  if (!est) return notAssessed(ORDER_INTRAVASCULAR, title, `no estimate for ${CLASS_LABEL[order.fluidClass]}`, ev, KINETICS_SOURCE);
  return {
    ruleId: ORDER_INTRAVASCULAR,
    topic: 'order',
    part: 'intravascular-estimate',
    status: 'assessed',
    text: est.text,
    values: est.values,
    evidence: ev,
    source: KINETICS_SOURCE,
  };
}

/** Order findings for one draft fluid order. A non-fluid order yields one not-assessed finding. */
export function describeOrder(order: DraftOrder, snapshot: PatientSnapshot, now: Date, t: OrderThresholds): OrderFinding[] {
  if (!order.isFluid) {
    return [notAssessed(ORDER_VOLUME, 'Not an IV fluid order', 'the draft order is not an intravenous fluid', [orderEvidence(order, now)])];
  }
  return [
    volumeFinding(order, now),
    perKgFinding(order, snapshot, now, t),
    estimateFinding(order, now, t),
    sepsisContext(snapshot, now, t, order.volumeMl),
  ];
}
