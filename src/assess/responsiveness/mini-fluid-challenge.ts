/** Rule 'responsiveness.mini-fluid-challenge': 100 mL over 1 min; subaortic VTI (or SV, CO, CI) rise ≥ 10 %. */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessDynamicTest, type DynamicTestSpec, type ReadOut } from './dynamic-test.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export const MINI_FLUID_CHALLENGE_RULE_ID = 'responsiveness.mini-fluid-challenge';
const SOURCE = 'Mini fluid challenge, ΔVTI ≥ 10 %: Muller L et al., Anesthesiology 2011;115:541–547';

/** The test with its read-outs and thresholds (what-if/ reads it too, to put a hypothetical result at the threshold). */
export function miniFluidChallengeSpec(t: ResponsivenessThresholds): DynamicTestSpec {
  const flow: ReadOut = { compare: 'relative', threshold: t.miniFluidChallengeRisePercent, strict: false, tier: 'dynamic', source: SOURCE };
  return {
    ruleId: MINI_FLUID_CHALLENGE_RULE_ID,
    marker: 'mini-fluid-challenge',
    kind: 'miniFluidChallenge',
    label: 'Mini fluid challenge',
    source: SOURCE,
    readOuts: { vti: flow, strokeVolume: flow, cardiacOutput: flow, cardiacIndex: flow },
  };
}

export const miniFluidChallengeRule: ResponsivenessRule = {
  id: MINI_FLUID_CHALLENGE_RULE_ID,
  onError: ruleErrorFinding(MINI_FLUID_CHALLENGE_RULE_ID, 'mini-fluid-challenge'),
  run: (ctx) => assessDynamicTest(ctx, miniFluidChallengeSpec(ctx.t)),
};
