/** Rule 'responsiveness.mini-fluid-challenge': 100 mL over 1 min; subaortic VTI (or SV, CO, CI) rise ≥ 10 %. */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessDynamicTest, type ReadOut } from './dynamic-test.js';

export const MINI_FLUID_CHALLENGE_RULE_ID = 'responsiveness.mini-fluid-challenge';
const SOURCE = 'Mini fluid challenge, ΔVTI ≥ 10 %: Muller L et al., Anesthesiology 2011;115:541–547';

export const miniFluidChallengeRule: ResponsivenessRule = {
  id: MINI_FLUID_CHALLENGE_RULE_ID,
  onError: ruleErrorFinding(MINI_FLUID_CHALLENGE_RULE_ID, 'mini-fluid-challenge'),
  run: (ctx) => {
    const flow: ReadOut = { compare: 'relative', threshold: ctx.t.miniFluidChallengeRisePercent, strict: false, tier: 'dynamic', source: SOURCE };
    return assessDynamicTest(ctx, {
      ruleId: MINI_FLUID_CHALLENGE_RULE_ID, marker: 'mini-fluid-challenge', kind: 'miniFluidChallenge', label: 'Mini fluid challenge', source: SOURCE,
      readOuts: { vti: flow, strokeVolume: flow, cardiacOutput: flow, cardiacIndex: flow },
    });
  },
};
