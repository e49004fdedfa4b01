/**
 * Rule tolerance.cvp: central venous pressure ≥ 12 mmHg as a sign of high venous pressure that volume
 * would raise further (common practice; Boyd JH et al., Crit Care Med 2011: CVP > 12 mmHg at 12 h with the
 * highest mortality). A moderate limit: CVP alone says little about volume status (Marik PE et al.,
 * Chest 2008).
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const CVP = 'tolerance.cvp';
const SOURCE = 'High CVP ≥ 12 mmHg (common practice; Boyd JH et al., Crit Care Med 2011;39:259); limits of CVP: Marik PE et al., Chest 2008;134:172';

export function cvpRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const pick = latestOf(snapshot, 'cvp', now, t.cvpFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(CVP, 'venous', 'CVP not assessed', unusableReason('CVP', pick, now, t.cvpFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const v = pick.item.value;
  const high = v >= t.cvpHighMmHg;
  return [assessed({
    ruleId: CVP, domain: 'venous', limit: high ? 'moderate' : 'none',
    text: `CVP ${fmt(v)} mmHg${high ? ` (high, ≥ ${t.cvpHighMmHg})` : ''}`,
    values: { cvpMmHg: v, high }, evidence: [evidenceOf(pick.item, now)], source: SOURCE,
  })];
}
