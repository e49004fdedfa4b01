/**
 * Rule 'responsiveness.tidal-volume-challenge': Vt 6 → 8 mL/kg PBW for 1 min; absolute PPV rise ≥ 3.5 points
 * (SVV ≥ 2.5 points). Made for low tidal volume, so the Vt condition does not apply; the result still needs
 * controlled ventilation without spontaneous effort and sinus rhythm (the PPV reading itself needs them).
 */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessDynamicTest, type DynamicTestSpec } from './dynamic-test.js';
import { checkRhythm, checkVentilation } from './heart-lung-validity.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export const TIDAL_VOLUME_CHALLENGE_RULE_ID = 'responsiveness.tidal-volume-challenge';
const SOURCE = 'Tidal volume challenge, absolute ΔPPV ≥ 3.5 points: Myatra SN et al., Crit Care Med 2017;45:415–421';

/** The test with its read-outs, thresholds and gate (what-if/ reads it too, to put a hypothetical result at the threshold). */
export function tidalVolumeChallengeSpec(t: ResponsivenessThresholds): DynamicTestSpec {
  return {
    ruleId: TIDAL_VOLUME_CHALLENGE_RULE_ID,
    marker: 'tidal-volume-challenge',
    kind: 'tidalVolumeChallenge',
    label: 'Tidal volume challenge',
    source: SOURCE,
    gate: (c) => [checkVentilation(c), checkRhythm(c)],
    readOuts: {
      ppv: { compare: 'absolute', threshold: t.tidalVolumeChallengePpvRisePoints, strict: false, tier: 'dynamic', source: SOURCE },
      svv: {
        compare: 'absolute',
        threshold: t.tidalVolumeChallengeSvvRisePoints,
        strict: false,
        tier: 'dynamic',
        source: 'Tidal volume challenge, absolute ΔSVV ≥ 2.5 points: Myatra SN et al., Crit Care Med 2017 (from memory)',
      },
    },
  };
}

export const tidalVolumeChallengeRule: ResponsivenessRule = {
  id: TIDAL_VOLUME_CHALLENGE_RULE_ID,
  onError: ruleErrorFinding(TIDAL_VOLUME_CHALLENGE_RULE_ID, 'tidal-volume-challenge'),
  run: (ctx) => assessDynamicTest(ctx, tidalVolumeChallengeSpec(ctx.t)),
};
