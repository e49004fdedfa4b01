/**
 * Rule tolerance.lung-ultrasound: regions (of 8) with a B-pattern (≥ 3 B-lines per intercostal space).
 * ≥ 2 positive regions per side is diffuse interstitial syndrome (Volpicelli G et al., Intensive Care Med
 * 2012;38:577 — from memory). The marker counts regions without the side, so ≥ 4 of 8 (the least count
 * that can be bilateral) is read as the diffuse pattern: severe, and a sign of lung water. 2–3 regions:
 * moderate. Not specific for hydrostatic oedema (pneumonia, ARDS, fibrosis give B-lines too).
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { evidenceOf, fmt, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const LUNG_ULTRASOUND = 'tolerance.lung-ultrasound';
const SOURCE = 'Lung ultrasound B-pattern, diffuse interstitial syndrome ≥ 2 regions per side: Volpicelli G et al., Intensive Care Med 2012;38:577 (from memory)';

export function lungUltrasoundRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const pick = latestOf(snapshot, 'bLineRegions', now, t.ultrasoundFreshMinutes);
  if (pick.state !== 'fresh') {
    return [notAssessed(LUNG_ULTRASOUND, 'lungs', 'Lung ultrasound not assessed', unusableReason('lung ultrasound', pick, now, t.ultrasoundFreshMinutes), SOURCE,
      pick.state === 'stale' ? [evidenceOf(pick.item, now)] : [])];
  }
  const n = pick.item.value;
  const diffuse = n >= t.bLineSevereRegions;
  const limit = diffuse ? 'severe' : n >= t.bLineModerateRegions ? 'moderate' : 'none';
  const text = diffuse
    ? `Lung ultrasound: B-pattern in ${fmt(n)} of 8 regions, compatible with diffuse interstitial syndrome (lung water)`
    : n === 0 ? 'Lung ultrasound: no region with B-pattern' : `Lung ultrasound: B-pattern in ${fmt(n)} of 8 regions (focal)`;
  return [assessed({
    ruleId: LUNG_ULTRASOUND, domain: 'lungs', limit, congestionSign: diffuse, text,
    values: { bLineRegions: n, diffuse }, evidence: [evidenceOf(pick.item, now)], source: SOURCE,
  })];
}
