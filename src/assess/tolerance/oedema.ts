/**
 * Rule tolerance.oedema: recorded peripheral oedema grade (0–4). From grade 2 (common practice) oedema
 * shows that volume is already leaving the vessels: a moderate limit.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const OEDEMA = 'tolerance.oedema';
const SOURCE = 'Peripheral oedema grade 0–4, limiting from grade 2 (common practice)';

export function oedemaRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const pick = latestOf(snapshot, 'edemaGrade', now, t.oedemaFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(OEDEMA, 'oncotic', 'Oedema not assessed', unusableReason('oedema grade', pick, now, t.oedemaFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const g = pick.item.value;
  const limiting = g >= t.oedemaLimitingGrade;
  return [assessed({
    ruleId: OEDEMA, domain: 'oncotic', limit: limiting ? 'moderate' : 'none',
    text: g === 0 ? 'No peripheral oedema recorded (grade 0)' : `Peripheral oedema grade ${fmt(g)}${limiting ? '' : ' (slight)'}`,
    values: { oedemaGrade: g },
    evidence: [evidenceOf(pick.item, now)], source: SOURCE,
  })];
}
