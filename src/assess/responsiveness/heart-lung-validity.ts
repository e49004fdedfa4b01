/**
 * Validity conditions of the heart–lung interaction indices (PPV, SVV; in part the tidal volume challenge).
 * Each condition is met, failed, or unknown (data missing or stale): unknown never counts as met.
 * Conditions and the direction of their error: Monnet X, Marik PE, Teboul JL, Ann Intensive Care 2016;6:111,
 * Table 2; Myatra SN, Monnet X, Teboul JL, Crit Care 2017;21:60, Table 2. Not checked for lack of data: low lung
 * compliance and right heart failure (listed in docs/clinical-logic/responsiveness.md as a limitation).
 */
import { heartRateRespiratoryRateRatio } from '../../physiology/heart-rate-respiratory-rate-ratio.js';
import { predictedBodyWeightKg, tidalVolumeMlPerKg } from '../../physiology/predicted-body-weight.js';
import type { Evidence } from '../types.js';
import type { RuleContext } from './context.js';
import { fmt, staleText, type Values } from './finding.js';
import { evidenceOfCoded, evidenceOfMeasurement, latestCoded, latestMeasurement, type Selection } from './select.js';

export type ConditionState = 'met' | 'failed' | 'unknown';
export type ConditionId = 'ventilation' | 'rhythm' | 'tidal-volume' | 'hr-rr' | 'chest' | 'iap';

export interface Condition {
  id: ConditionId;
  /** What must hold, e.g. "sinus rhythm". */
  label: string;
  state: ConditionState;
  /** What was found, e.g. "rhythm atrial-fibrillation", "tidal volume not recorded". */
  detail: string;
  evidence: Evidence[];
  values: Values;
}

function why<T>(sel: Selection<T>, what: string): string {
  switch (sel.state) {
    case 'missing': return `${what} not recorded`;
    case 'stale': return `${what} ${staleText(sel.ageMinutes, sel.windowMin)}`;
    case 'invalid': return `${what} invalid (${sel.detail})`;
    case 'fresh': return `${what} recorded`;
  }
}

export function checkVentilation(ctx: RuleContext): Condition {
  const label = 'controlled ventilation without spontaneous effort';
  const sel = latestCoded(ctx.snapshot, 'ventilationMode', ctx.now, ctx.t.ventilationStateMaxAgeMin);
  if (sel.state !== 'fresh') {
    return { id: 'ventilation', label, state: 'unknown', detail: why(sel, 'ventilation state'), evidence: sel.state === 'missing' ? [] : [evidenceOfCoded(sel.item, ctx.now)], values: {} };
  }
  const answer = sel.item.answer;
  const state: ConditionState = answer === 'controlled-no-effort' ? 'met' : 'failed';
  const detail = answer === 'controlled-no-effort' ? 'controlled ventilation, no spontaneous effort'
    : answer === 'controlled-with-effort' ? 'spontaneous breathing effort on the ventilator' : 'spontaneous breathing';
  return { id: 'ventilation', label, state, detail, evidence: [evidenceOfCoded(sel.item, ctx.now)], values: { ventilationMode: answer } };
}

export function checkRhythm(ctx: RuleContext): Condition {
  const label = 'sinus rhythm';
  const sel = latestCoded(ctx.snapshot, 'heartRhythm', ctx.now, ctx.t.heartRhythmMaxAgeMin);
  if (sel.state !== 'fresh') {
    return { id: 'rhythm', label, state: 'unknown', detail: why(sel, 'heart rhythm'), evidence: sel.state === 'missing' ? [] : [evidenceOfCoded(sel.item, ctx.now)], values: {} };
  }
  const answer = sel.item.answer;
  return {
    id: 'rhythm', label, state: answer === 'sinus' ? 'met' : 'failed', detail: `rhythm ${answer}`,
    evidence: [evidenceOfCoded(sel.item, ctx.now)], values: { heartRhythm: answer },
  };
}

/**
 * Vt ≥ minTidalVolumeMlPerKgPbw (default 8 mL/kg PBW). With sex not recorded, Vt/kg is bounded by the male PBW
 * (heavier, lower mL/kg) and the female PBW: met when even the lower bound reaches the threshold, failed when
 * even the upper bound does not, unknown in between.
 */
export function checkTidalVolume(ctx: RuleContext): Condition {
  const min = ctx.t.minTidalVolumeMlPerKgPbw;
  const label = `tidal volume ≥ ${fmt(min)} mL/kg predicted body weight`;
  const vt = latestMeasurement(ctx.snapshot, 'tidalVolume', ctx.now, ctx.t.tidalVolumeMaxAgeMin);
  const ht = latestMeasurement(ctx.snapshot, 'bodyHeight', ctx.now, ctx.t.bodyHeightMaxAgeMin);
  const evidence: Evidence[] = [];
  if (vt.state !== 'missing') evidence.push(evidenceOfMeasurement(vt.item, ctx.now));
  if (ht.state !== 'missing') evidence.push(evidenceOfMeasurement(ht.item, ctx.now));
  const unknown = (detail: string, values: Values = {}): Condition => ({ id: 'tidal-volume', label, state: 'unknown', detail, evidence, values });
  if (vt.state !== 'fresh') return unknown(why(vt, 'tidal volume'));
  if (ht.state !== 'fresh') return unknown(why(ht, 'body height (for predicted body weight)'));
  const vtMl = vt.item.value;
  const heightCm = ht.item.value;
  const sex = ctx.snapshot.patient.sex;
  let pbwMale: number;
  let pbwFemale: number;
  try {
    pbwMale = predictedBodyWeightKg(heightCm, 'male');
    pbwFemale = predictedBodyWeightKg(heightCm, 'female');
  } catch {
    return unknown(`height ${fmt(heightCm)} cm gives no usable predicted body weight`);
  }
  if (sex === 'male' || sex === 'female') {
    const pbw = sex === 'male' ? pbwMale : pbwFemale;
    const perKg = tidalVolumeMlPerKg(vtMl, pbw);
    return {
      id: 'tidal-volume', label, state: perKg >= min ? 'met' : 'failed',
      detail: `tidal volume ${fmt(vtMl, 0)} mL = ${fmt(perKg, 2)} mL/kg PBW (PBW ${fmt(pbw, 1)} kg, ${sex}, ${fmt(heightCm)} cm)`,
      evidence, values: { tidalVolumeMl: vtMl, pbwKg: Math.round(pbw * 100) / 100, tidalVolumeMlPerKgPbw: Math.round(perKg * 100) / 100 },
    };
  }
  const low = tidalVolumeMlPerKg(vtMl, pbwMale);
  const high = tidalVolumeMlPerKg(vtMl, pbwFemale);
  const range = `${fmt(low, 2)}–${fmt(high, 2)} mL/kg PBW (sex not recorded)`;
  const values: Values = { tidalVolumeMl: vtMl, tidalVolumeMlPerKgPbwLow: Math.round(low * 100) / 100, tidalVolumeMlPerKgPbwHigh: Math.round(high * 100) / 100 };
  if (low >= min) return { id: 'tidal-volume', label, state: 'met', detail: `tidal volume ${fmt(vtMl, 0)} mL = ${range}`, evidence, values };
  if (high < min) return { id: 'tidal-volume', label, state: 'failed', detail: `tidal volume ${fmt(vtMl, 0)} mL = ${range}`, evidence, values };
  return unknown(`tidal volume ${fmt(vtMl, 0)} mL = ${range}: sex needed for predicted body weight`, values);
}

/** HR/RR strictly > minHeartRateRespiratoryRateRatio (default 3.6; De Backer 2009). */
export function checkHeartRateRespiratoryRate(ctx: RuleContext): Condition {
  const min = ctx.t.minHeartRateRespiratoryRateRatio;
  const label = `heart rate / respiratory rate > ${fmt(min)}`;
  const hr = latestMeasurement(ctx.snapshot, 'heartRate', ctx.now, ctx.t.vitalsMaxAgeMin);
  const rr = latestMeasurement(ctx.snapshot, 'respiratoryRate', ctx.now, ctx.t.vitalsMaxAgeMin);
  const evidence: Evidence[] = [];
  if (hr.state !== 'missing') evidence.push(evidenceOfMeasurement(hr.item, ctx.now));
  if (rr.state !== 'missing') evidence.push(evidenceOfMeasurement(rr.item, ctx.now));
  if (hr.state !== 'fresh') return { id: 'hr-rr', label, state: 'unknown', detail: why(hr, 'heart rate'), evidence, values: {} };
  if (rr.state !== 'fresh') return { id: 'hr-rr', label, state: 'unknown', detail: why(rr, 'respiratory rate'), evidence, values: {} };
  if (rr.item.value <= 0) return { id: 'hr-rr', label, state: 'unknown', detail: `respiratory rate ${fmt(rr.item.value)}/min gives no ratio`, evidence, values: {} };
  const ratio = heartRateRespiratoryRateRatio(hr.item.value, rr.item.value);
  return {
    id: 'hr-rr', label, state: ratio > min ? 'met' : 'failed',
    detail: `HR ${fmt(hr.item.value, 0)} / RR ${fmt(rr.item.value, 0)} = ${fmt(ratio, 2)}`,
    evidence, values: { hrRrRatio: Math.round(ratio * 100) / 100 },
  };
}

export function checkChest(ctx: RuleContext): Condition {
  const label = 'closed chest';
  const sel = latestCoded(ctx.snapshot, 'chestStatus', ctx.now, ctx.t.chestStatusMaxAgeMin);
  if (sel.state !== 'fresh') {
    return { id: 'chest', label, state: 'unknown', detail: why(sel, 'chest status'), evidence: sel.state === 'missing' ? [] : [evidenceOfCoded(sel.item, ctx.now)], values: {} };
  }
  const open = sel.item.answer === 'open';
  return { id: 'chest', label, state: open ? 'failed' : 'met', detail: open ? 'open chest' : 'chest closed', evidence: [evidenceOfCoded(sel.item, ctx.now)], values: { chestStatus: sel.item.answer } };
}

/** IAP strictly below iahThresholdMmHg (default 12; IAH is ≥ 12 mmHg, WSACS 2013). */
export function checkIntraAbdominalPressure(ctx: RuleContext): Condition {
  const limit = ctx.t.iahThresholdMmHg;
  const label = `no intra-abdominal hypertension (IAP < ${fmt(limit)} mmHg)`;
  const sel = latestMeasurement(ctx.snapshot, 'intraAbdominalPressure', ctx.now, ctx.t.intraAbdominalPressureMaxAgeMin);
  if (sel.state !== 'fresh') {
    return { id: 'iap', label, state: 'unknown', detail: why(sel, 'intra-abdominal pressure'), evidence: sel.state === 'missing' ? [] : [evidenceOfMeasurement(sel.item, ctx.now)], values: {} };
  }
  const iap = sel.item.value;
  return {
    id: 'iap', label, state: iap < limit ? 'met' : 'failed',
    detail: iap < limit ? `IAP ${fmt(iap)} mmHg` : `intra-abdominal hypertension, IAP ${fmt(iap)} mmHg`,
    evidence: [evidenceOfMeasurement(sel.item, ctx.now)], values: { iapMmHg: iap },
  };
}

/** All six conditions for PPV and SVV, in a fixed order. */
export function ppvSvvConditions(ctx: RuleContext): Condition[] {
  return [
    checkVentilation(ctx), checkRhythm(ctx), checkTidalVolume(ctx),
    checkHeartRateRespiratoryRate(ctx), checkChest(ctx), checkIntraAbdominalPressure(ctx),
  ];
}

export interface ValiditySummary {
  state: ConditionState;
  failed: Condition[];
  unknown: Condition[];
  evidence: Evidence[];
  values: Values;
  /** "outside validity: …; could not check: …", empty when all are met. */
  reason: string;
}

export function summarizeValidity(conditions: readonly Condition[]): ValiditySummary {
  const failed = conditions.filter((c) => c.state === 'failed');
  const unknown = conditions.filter((c) => c.state === 'unknown');
  const parts: string[] = [];
  if (failed.length) parts.push(`outside validity: ${failed.map((c) => `${c.label} not met (${c.detail})`).join('; ')}`);
  if (unknown.length) parts.push(`validity unknown: could not check ${unknown.map((c) => `${c.label} (${c.detail})`).join('; ')}`);
  const values: Values = {};
  for (const c of conditions) Object.assign(values, c.values);
  return {
    state: failed.length ? 'failed' : unknown.length ? 'unknown' : 'met',
    failed, unknown, evidence: conditions.flatMap((c) => c.evidence), values, reason: parts.join('; '),
  };
}
