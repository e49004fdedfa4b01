/**
 * Validity conditions of the heart–lung interaction indices (PPV, SVV; in part the tidal volume challenge), each
 * with the direction of the error it causes when not met (docs/clinical-logic/index.md; Michard F, Chemla D, Teboul JL,
 * Crit Care 2015;19:144; Monnet X, Marik PE, Teboul JL, Ann Intensive Care 2016;6:111, Table 2):
 *   void            — spontaneous effort, arrhythmia: the index means nothing either way;
 *   false-negative  — tidal volume < 8 mL/kg PBW, HR/RR ≤ 3.6 (De Backer D et al., Anesthesiology 2009;110:1092),
 *                     open chest: a LOW value cannot be read, a HIGH value still argues for responsiveness;
 *   false-positive  — raised intra-abdominal pressure (Jacques D et al., Crit Care 2011;15:R33 [M]), right-ventricular
 *                     failure or pulmonary hypertension (Mahjoub Y et al., Crit Care Med 2009;37:2570 [M]): a HIGH
 *                     value is doubtful, a LOW value still argues against.
 * Ventilation and rhythm that are not charted void the index (they cannot be assumed). Tidal volume and HR/RR that
 * cannot be checked are treated as a possible false negative. Chest status and IAP that are not charted are
 * assumed closed and normal, and the finding says so (docs/clinical-logic).
 */
import { heartRateRespiratoryRateRatio } from '../../physiology/heart-rate-respiratory-rate-ratio.js';
import { predictedBodyWeightKg, tidalVolumeMlPerKg } from '../../physiology/predicted-body-weight.js';
import type { Evidence, Figures } from '../common/finding.js';
import { codedOf, evidenceOfCoded, evidenceOfMeasurement, latestCoded, latestReading, type Selection } from '../common/select.js';
import { fmt, staleText } from '../common/text.js';
import { activeConditionGroups } from '../tolerance/conditions.js';
import type { RuleContext } from './context.js';

export type ConditionState = 'met' | 'failed' | 'unknown' | 'assumed';
export type ConditionId = 'ventilation' | 'rhythm' | 'tidal-volume' | 'hr-rr' | 'chest' | 'iap' | 'right-ventricle';
export type ErrorDirection = 'void' | 'false-negative' | 'false-positive';

export interface Condition {
  id: ConditionId;
  /** What must hold, e.g. "sinus rhythm". */
  label: string;
  state: ConditionState;
  /** The error the index carries when this condition is failed (or unknown, for the conditions that cannot be assumed). */
  error: ErrorDirection;
  /** What was found, e.g. "rhythm atrial-fibrillation", "tidal volume not recorded". */
  detail: string;
  evidence: Evidence[];
  values: Figures;
}

function why<T>(sel: Selection<T>, what: string): string {
  switch (sel.state) {
    case 'missing':
      return `${what} not recorded`;
    case 'stale':
      return `${what} ${staleText(sel.ageMinutes, sel.windowMin)}`;
    case 'invalid':
      return `${what} invalid (${sel.detail})`;
    case 'set-aside':
      return `${what} set aside`;
    case 'fresh':
      return `${what} recorded`;
  }
}

function seen<T>(sel: Selection<T>, ev: (x: T) => Evidence): Evidence[] {
  return sel.state === 'missing' ? [] : [ev(sel.item)];
}

export function checkVentilation(ctx: RuleContext): Condition {
  const label = 'controlled ventilation without spontaneous effort';
  const sel = latestCoded(ctx.snapshot, 'ventilationMode', ctx.now, ctx.w.ventilationStateMin);
  const ev = (c: Parameters<typeof evidenceOfCoded>[0]) => evidenceOfCoded(c, ctx.now);
  if (sel.state !== 'fresh')
    return {
      id: 'ventilation',
      label,
      state: 'unknown',
      error: 'void',
      detail: why(sel, 'ventilation state'),
      evidence: seen(sel, ev),
      values: {},
    };
  const answer = sel.item.answer;
  const details: Record<string, string> = {
    'controlled-no-effort': 'controlled ventilation, no spontaneous effort',
    'controlled-with-effort': 'spontaneous breathing effort on the ventilator',
  };
  const detail = details[answer] ?? 'spontaneous breathing';
  return {
    id: 'ventilation',
    label,
    state: answer === 'controlled-no-effort' ? 'met' : 'failed',
    error: 'void',
    detail,
    evidence: [ev(sel.item)],
    values: { ventilationMode: answer },
  };
}

/**
 * Sinus rhythm in the latest record, and no other rhythm recorded within the rhythm window (docs/clinical-logic: void on any irregular
 * record).
 */
export function checkRhythm(ctx: RuleContext): Condition {
  const label = 'sinus rhythm';
  const sel = latestCoded(ctx.snapshot, 'heartRhythm', ctx.now, ctx.w.rhythmMin);
  const ev = (c: Parameters<typeof evidenceOfCoded>[0]) => evidenceOfCoded(c, ctx.now);
  if (sel.state !== 'fresh')
    return { id: 'rhythm', label, state: 'unknown', error: 'void', detail: why(sel, 'heart rhythm'), evidence: seen(sel, ev), values: {} };
  const span = codedOf(ctx.snapshot, 'heartRhythm', ctx.now).filter(
    (c) => ctx.now.getTime() - Date.parse(c.effective) <= ctx.w.rhythmMin * 60_000,
  );
  const other = span.find((c) => c.answer !== 'sinus');
  if (other) {
    return {
      id: 'rhythm',
      label,
      state: 'failed',
      error: 'void',
      detail:
        other === sel.item
          ? `rhythm ${other.answer}`
          : `rhythm ${other.answer} recorded at ${other.effective} (within ${fmt(ctx.w.rhythmMin / 60)} h)`,
      evidence: [ev(sel.item), ev(other)],
      values: { heartRhythm: other.answer },
    };
  }
  return {
    id: 'rhythm',
    label,
    state: 'met',
    error: 'void',
    detail: 'rhythm sinus',
    evidence: span.map(ev),
    values: { heartRhythm: 'sinus' },
  };
}

/**
 * Vt ≥ minTidalVolumeMlPerKgPbw (default 8 mL/kg PBW). With sex not recorded, Vt/kg is bounded by the male PBW
 * (heavier, lower mL/kg) and the female PBW: met when even the lower bound reaches the threshold, failed when
 * even the upper bound does not, unknown in between.
 */
export function checkTidalVolume(ctx: RuleContext): Condition {
  const min = ctx.t.minTidalVolumeMlPerKgPbw;
  const label = `tidal volume ≥ ${fmt(min, 1)} mL/kg predicted body weight`;
  const vt = latestReading(ctx.snapshot, 'tidalVolume', ctx.now, ctx.w.tidalVolumeMin);
  const ht = latestReading(ctx.snapshot, 'bodyHeight', ctx.now, ctx.w.bodyHeightMin);
  const evidence: Evidence[] = [];
  if (vt.state !== 'missing') evidence.push(evidenceOfMeasurement(vt.item, ctx.now));
  if (ht.state !== 'missing') evidence.push(evidenceOfMeasurement(ht.item, ctx.now));
  const base = { id: 'tidal-volume' as const, label, error: 'false-negative' as const, evidence };
  const unknown = (detail: string, values: Figures = {}): Condition => ({ ...base, state: 'unknown', detail, values });
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
    return unknown(`height ${fmt(heightCm, 1)} cm gives no usable predicted body weight`);
  }
  if (sex === 'male' || sex === 'female') {
    const pbw = sex === 'male' ? pbwMale : pbwFemale;
    const perKg = tidalVolumeMlPerKg(vtMl, pbw);
    return {
      ...base,
      state: perKg >= min ? 'met' : 'failed',
      detail: `tidal volume ${fmt(vtMl, 0)} mL = ${fmt(perKg, 2)} mL/kg PBW (PBW ${fmt(pbw, 1)} kg, ${sex}, ${fmt(heightCm, 1)} cm)`,
      values: { tidalVolumeMl: vtMl, pbwKg: Math.round(pbw * 100) / 100, tidalVolumeMlPerKgPbw: Math.round(perKg * 100) / 100 },
    };
  }
  const low = tidalVolumeMlPerKg(vtMl, pbwMale);
  const high = tidalVolumeMlPerKg(vtMl, pbwFemale);
  const range = `${fmt(low, 2)}–${fmt(high, 2)} mL/kg PBW (sex not recorded)`;
  const values: Figures = {
    tidalVolumeMl: vtMl,
    tidalVolumeMlPerKgPbwLow: Math.round(low * 100) / 100,
    tidalVolumeMlPerKgPbwHigh: Math.round(high * 100) / 100,
  };
  if (low >= min) return { ...base, state: 'met', detail: `tidal volume ${fmt(vtMl, 0)} mL = ${range}`, values };
  if (high < min) return { ...base, state: 'failed', detail: `tidal volume ${fmt(vtMl, 0)} mL = ${range}`, values };
  return unknown(`tidal volume ${fmt(vtMl, 0)} mL = ${range}: sex needed for predicted body weight`, values);
}

/** HR/RR strictly > minHeartRateRespiratoryRateRatio (default 3.6; De Backer 2009): ≤ 3.6 gives false negatives. */
export function checkHeartRateRespiratoryRate(ctx: RuleContext): Condition {
  const min = ctx.t.minHeartRateRespiratoryRateRatio;
  const label = `heart rate / respiratory rate > ${fmt(min, 1)}`;
  const hr = latestReading(ctx.snapshot, 'heartRate', ctx.now, ctx.w.vitalsMin);
  const rr = latestReading(ctx.snapshot, 'respiratoryRate', ctx.now, ctx.w.vitalsMin);
  const evidence: Evidence[] = [];
  if (hr.state !== 'missing') evidence.push(evidenceOfMeasurement(hr.item, ctx.now));
  if (rr.state !== 'missing') evidence.push(evidenceOfMeasurement(rr.item, ctx.now));
  const base = { id: 'hr-rr' as const, label, error: 'false-negative' as const, evidence };
  if (hr.state !== 'fresh') return { ...base, state: 'unknown', detail: why(hr, 'heart rate'), values: {} };
  if (rr.state !== 'fresh') return { ...base, state: 'unknown', detail: why(rr, 'respiratory rate'), values: {} };
  if (rr.item.value <= 0)
    return { ...base, state: 'unknown', detail: `respiratory rate ${fmt(rr.item.value, 1)}/min gives no ratio`, values: {} };
  const ratio = heartRateRespiratoryRateRatio(hr.item.value, rr.item.value);
  return {
    ...base,
    state: ratio > min ? 'met' : 'failed',
    detail: `HR ${fmt(hr.item.value, 0)} / RR ${fmt(rr.item.value, 0)} = ${fmt(ratio, 2)}`,
    values: { hrRrRatio: Math.round(ratio * 100) / 100 },
  };
}

export function checkChest(ctx: RuleContext): Condition {
  const label = 'closed chest';
  const sel = latestCoded(ctx.snapshot, 'chestStatus', ctx.now, ctx.w.chestStatusMin);
  const ev = (c: Parameters<typeof evidenceOfCoded>[0]) => evidenceOfCoded(c, ctx.now);
  if (sel.state !== 'fresh')
    return {
      id: 'chest',
      label,
      state: 'assumed',
      error: 'false-negative',
      detail: `${why(sel, 'chest status')}: assumed closed`,
      evidence: seen(sel, ev),
      values: {},
    };
  const open = sel.item.answer === 'open';
  return {
    id: 'chest',
    label,
    state: open ? 'failed' : 'met',
    error: 'false-negative',
    detail: open ? 'open chest' : 'chest closed',
    evidence: [ev(sel.item)],
    values: { chestStatus: sel.item.answer },
  };
}

/** IAP strictly below iahThresholdMmHg (default 12; IAH is ≥ 12 mmHg, WSACS 2013); raised IAP gives false positives. */
export function checkIntraAbdominalPressure(ctx: RuleContext): Condition {
  const limit = ctx.t.iahThresholdMmHg;
  const label = `no intra-abdominal hypertension (IAP < ${fmt(limit, 1)} mmHg)`;
  const sel = latestReading(ctx.snapshot, 'intraAbdominalPressure', ctx.now, ctx.w.intraAbdominalPressureMin);
  const ev = (m: Parameters<typeof evidenceOfMeasurement>[0]) => evidenceOfMeasurement(m, ctx.now);
  if (sel.state !== 'fresh')
    return {
      id: 'iap',
      label,
      state: 'assumed',
      error: 'false-positive',
      detail: `${why(sel, 'intra-abdominal pressure')}: assumed normal`,
      evidence: seen(sel, ev),
      values: {},
    };
  const iap = sel.item.value;
  return {
    id: 'iap',
    label,
    state: iap < limit ? 'met' : 'failed',
    error: 'false-positive',
    detail: iap < limit ? `IAP ${fmt(iap, 1)} mmHg` : `intra-abdominal hypertension, IAP ${fmt(iap, 1)} mmHg`,
    evidence: [ev(sel.item)],
    values: { iapMmHg: iap },
  };
}

/**
 * No active condition in a value-set group whose effect is `high-ppv-doubtful` (right-ventricular failure, pulmonary
 * hypertension: src/fhir/value-sets/conditions.json, read through activeConditionGroups).
 */
export function checkRightVentricle(ctx: RuleContext): Condition {
  const label = 'no right-ventricular failure or pulmonary hypertension recorded';
  const groups = activeConditionGroups(ctx.snapshot.conditions).filter((g) => g.effects.includes('high-ppv-doubtful'));
  if (groups.length === 0)
    return { id: 'right-ventricle', label, state: 'met', error: 'false-positive', detail: 'none recorded', evidence: [], values: {} };
  const byRef = new Map(ctx.snapshot.conditions.map((c) => [c.ref, c]));
  const evidence: Evidence[] = groups.flatMap((g) =>
    g.refs.map((ref, i) => {
      const when = byRef.get(ref)?.onset ?? ctx.snapshot.now;
      return { ref, kind: 'condition', value: g.codings[i] ?? '', effective: when, ageMinutes: 0 };
    }),
  );
  return {
    id: 'right-ventricle',
    label,
    state: 'failed',
    error: 'false-positive',
    detail: groups.map((g) => g.label).join('; '),
    evidence,
    values: { rightHeartGroups: groups.map((g) => g.id).join(',') },
  };
}

/** All conditions for PPV and SVV, in a fixed order. */
export function ppvSvvConditions(ctx: RuleContext): Condition[] {
  return [
    checkVentilation(ctx),
    checkRhythm(ctx),
    checkTidalVolume(ctx),
    checkHeartRateRespiratoryRate(ctx),
    checkChest(ctx),
    checkIntraAbdominalPressure(ctx),
    checkRightVentricle(ctx),
  ];
}

export interface ValiditySummary {
  /** Conditions that void the index (failed or unknown ventilation/rhythm). */
  voiding: Condition[];
  /** Failed or unknown conditions that make a low value unreadable. */
  falseNegative: Condition[];
  /** Failed conditions that make a high value doubtful. */
  falsePositive: Condition[];
  /** Conditions assumed because they were not charted. */
  assumed: Condition[];
  evidence: Evidence[];
  values: Figures;
}

export function summarizeValidity(conditions: readonly Condition[]): ValiditySummary {
  const notMet = conditions.filter((c) => c.state === 'failed' || c.state === 'unknown');
  const values: Figures = {};
  for (const c of conditions) Object.assign(values, c.values);
  return {
    voiding: notMet.filter((c) => c.error === 'void'),
    falseNegative: notMet.filter((c) => c.error === 'false-negative'),
    falsePositive: notMet.filter((c) => c.error === 'false-positive'),
    assumed: conditions.filter((c) => c.state === 'assumed'),
    evidence: conditions.flatMap((c) => c.evidence),
    values,
  };
}

export function conditionText(cs: readonly Condition[]): string {
  return cs.map((c) => c.detail).join('; ');
}
