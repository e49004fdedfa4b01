/**
 * Rule tolerance.evlwi: extravascular lung water index (transpulmonary thermodilution, per predicted body
 * weight). ≥ 10 mL/kg is pulmonary oedema (Tagami T et al., Crit Care 2010; Jozwiak M et al., Ann Intensive
 * Care 2015): severe, and a sign that more volume is likely to harm.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { isPulmonaryOedema } from '../../physiology/evlwi.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';

export const EVLWI = 'tolerance.evlwi';
const SOURCE =
  'EVLWI ≥ 10 mL/kg = pulmonary oedema: Tagami T et al., Crit Care 2010 (doi 10.1186/cc9250); Jozwiak M et al., Ann Intensive Care 2015 (doi 10.1186/s13613-015-0081-9)';

export function evlwiRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const pick = latestReading(snapshot, 'evlwi', now, t.evlwiFreshMinutes);
  if (pick.state !== 'fresh') {
    return [unusableTolerance(pick, { ruleId: EVLWI, domain: 'lungs', label: 'EVLWI', source: SOURCE, now })];
  }
  const v = pick.item.value;
  const oedema = isPulmonaryOedema(v, t.evlwiOedemaMlPerKg);
  return [
    assessed({
      ruleId: EVLWI,
      domain: 'lungs',
      limit: oedema ? 'severe' : 'none',
      congestionSign: oedema,
      text: `EVLWI ${fmt(v, 1)} mL/kg${oedema ? ` (≥ ${t.evlwiOedemaMlPerKg}: pulmonary oedema)` : ''}`,
      values: { evlwiMlPerKg: v, pulmonaryOedema: oedema },
      evidence: [evidenceOfMeasurement(pick.item, now)],
      source: SOURCE,
    }),
  ];
}
