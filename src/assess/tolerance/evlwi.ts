/**
 * Rule tolerance.evlwi: extravascular lung water index (transpulmonary thermodilution, per predicted body
 * weight). ≥ 10 mL/kg is pulmonary oedema (Tagami T et al., Crit Care 2010; Jozwiak M et al., Ann Intensive
 * Care 2015): severe, and a sign that more volume is likely to harm.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { isPulmonaryOedema } from '../../physiology/evlwi.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const EVLWI = 'tolerance.evlwi';
const SOURCE = 'EVLWI ≥ 10 mL/kg = pulmonary oedema: Tagami T et al., Crit Care 2010 (doi 10.1186/cc9250); Jozwiak M et al., Ann Intensive Care 2015 (doi 10.1186/s13613-015-0081-9)';

export function evlwiRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const pick = latestOf(snapshot, 'evlwi', now, t.evlwiFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(EVLWI, 'lungs', 'EVLWI not assessed', unusableReason('EVLWI', pick, now, t.evlwiFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const v = pick.item.value;
  const oedema = isPulmonaryOedema(v, t.evlwiOedemaMlPerKg);
  return [assessed({
    ruleId: EVLWI, domain: 'lungs', limit: oedema ? 'severe' : 'none', congestionSign: oedema,
    text: `EVLWI ${fmt(v, 1)} mL/kg${oedema ? ` (≥ ${t.evlwiOedemaMlPerKg}: pulmonary oedema)` : ''}`,
    values: { evlwiMlPerKg: v, pulmonaryOedema: oedema }, evidence: [evidenceOf(pick.item, now)], source: SOURCE,
  })];
}
