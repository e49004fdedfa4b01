/**
 * Rule tolerance.oedema: recorded peripheral oedema grade (0–4). From grade 2 (common practice) oedema
 * shows that volume is already leaving the vessels: a moderate limit.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';

export const OEDEMA = 'tolerance.oedema';
const SOURCE = 'Peripheral oedema grade 0–4, limiting from grade 2 (common practice)';

export function oedemaRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const pick = latestReading(snapshot, 'edemaGrade', now, t.oedemaFreshMinutes);
  if (pick.state !== 'fresh') {
    return [unusableTolerance(pick, { ruleId: OEDEMA, domain: 'oncotic', label: 'Oedema', source: SOURCE, now })];
  }
  const g = pick.item.value;
  const limiting = g >= t.oedemaLimitingGrade;
  return [
    assessed({
      ruleId: OEDEMA,
      domain: 'oncotic',
      limit: limiting ? 'moderate' : 'none',
      text: g === 0 ? 'No peripheral oedema recorded (grade 0)' : `Peripheral oedema grade ${fmt(g)}${limiting ? '' : ' (slight)'}`,
      values: { oedemaGrade: g },
      evidence: [evidenceOfMeasurement(pick.item, now)],
      source: SOURCE,
    }),
  ];
}
