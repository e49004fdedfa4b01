/** Rule tolerance.cvp: CVP ≥ 12 mmHg a moderate venous limit, from the one CVP reading of ../common/cvp.ts. */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { CVP_TOLERANCE_SOURCE as SOURCE, cvpEvidence, latestCvp } from '../common/cvp.js';
import type { ToleranceFinding } from '../common/finding.js';
import { fmt } from '../common/text.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import { assessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';

export const CVP = 'tolerance.cvp';

export function cvpRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds, w: Windows = DEFAULT_WINDOWS): ToleranceFinding[] {
  const { sel, label } = latestCvp(snapshot, now, w);
  if (sel.state !== 'fresh') return [unusableTolerance(sel, { ruleId: CVP, domain: 'venous', label, source: SOURCE, now })];
  const v = sel.item.value;
  const high = v >= t.cvpHighMmHg;
  return [
    assessed({
      ruleId: CVP,
      domain: 'venous',
      limit: high ? 'moderate' : 'none',
      uses: ['cvp'],
      text: `${label} ${fmt(v, 1)} mmHg${high ? ` (high, ≥ ${fmt(t.cvpHighMmHg)})` : ''}`,
      values: { cvpMmHg: v, high },
      evidence: [cvpEvidence(sel.item, now)],
      source: SOURCE,
    }),
  ];
}
