/**
 * Rule tolerance.lung-ultrasound: regions (of 8) with a B-pattern (≥ 3 B-lines per intercostal space). Diffuse
 * interstitial syndrome (lung water) needs a bilateral B-pattern, ≥ 2 positive regions on each side (Volpicelli G et
 * al., Intensive Care Med 2012;38:577 [M]; §12). The chart gives the count without the side, so a diffuse pattern
 * cannot be shown: from `bLineModerateRegions` (2) regions the finding is a moderate limit, capped there with the
 * side unknown, and never a harm sign. Not specific for hydrostatic oedema (pneumonia, ARDS, fibrosis give B-lines).
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { ToleranceFinding } from '../common/finding.js';
import { assessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { evidenceOfMeasurement, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';

export const LUNG_ULTRASOUND = 'tolerance.lung-ultrasound';
const SOURCE = 'Lung ultrasound B-pattern; diffuse interstitial syndrome needs ≥ 2 positive regions on each side: Volpicelli G et al., Intensive Care Med 2012;38:577 (from memory)';

export function lungUltrasoundRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const pick = latestReading(snapshot, 'bLineRegions', now, t.ultrasoundFreshMinutes);
  if (pick.state !== 'fresh') {
    return [unusableTolerance(pick, { ruleId: LUNG_ULTRASOUND, domain: 'lungs', label: 'Lung ultrasound', source: SOURCE, now })];
  }
  const n = pick.item.value;
  const limiting = n >= t.bLineModerateRegions;
  const couldBeBilateral = n >= 2 * t.bLineBilateralPerSide;
  const text = n === 0 ? 'Lung ultrasound: no region with B-pattern'
    : !limiting ? `Lung ultrasound: B-pattern in ${fmt(n)} of 8 regions (focal)`
      : `Lung ultrasound: B-pattern in ${fmt(n)} of 8 regions, side not recorded: ${couldBeBilateral ? `diffuse lung water needs ≥ ${fmt(t.bLineBilateralPerSide)} regions on each side, so ` : ''}read as a moderate limit`;
  return [assessed({
    ruleId: LUNG_ULTRASOUND, domain: 'lungs', limit: limiting ? 'moderate' : 'none', congestionSign: false, text,
    values: { bLineRegions: n, sideRecorded: false }, evidence: [evidenceOfMeasurement(pick.item, now)], source: SOURCE,
  })];
}
