/**
 * Rule 'responsiveness.plr': passive leg raising. Flow read-out (CO, CI, SV, VTI) rise ≥ 10 %: dynamic.
 * Judged by pulse pressure alone it is weak (sens 0.56, spec 0.83, AUC 0.77 in Monnet 2016): a static marker that only corroborates.
 */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessDynamicTest, type DynamicTestSpec, type ReadOut } from './dynamic-test.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export const PLR_RULE_ID = 'responsiveness.plr';
const FLOW_SOURCE = 'PLR-induced rise in cardiac output ≥ 10 %: Monnet, Marik, Teboul, Intensive Care Med 2016;42:1935–1947';

/** The test with its read-outs and thresholds (what-if/ reads it too, to put a hypothetical result at the threshold). */
export function plrSpec(t: ResponsivenessThresholds): DynamicTestSpec {
  const flow: ReadOut = { compare: 'relative', threshold: t.plrFlowRisePercent, strict: false, tier: 'dynamic', source: FLOW_SOURCE };
  return {
    ruleId: PLR_RULE_ID,
    marker: 'plr',
    kind: 'plr',
    label: 'Passive leg raising',
    source: FLOW_SOURCE,
    readOuts: {
      cardiacOutput: flow,
      cardiacIndex: flow,
      strokeVolume: flow,
      vti: flow,
      pulsePressure: {
        compare: 'relative',
        threshold: t.plrPulsePressureRisePercent,
        strict: false,
        tier: 'static',
        note: 'judged by pulse pressure only: weak evidence, a static marker that only corroborates; PLR needs real-time cardiac output monitoring',
        source:
          'PLR by pulse pressure is a poor surrogate (AUC 0.77): Monnet, Marik, Teboul, Intensive Care Med 2016; pulse pressure rise ≥ 12 %: Monnet et al., Crit Care Med 2006;34:1402 (from memory)',
      },
    },
  };
}

export const plrRule: ResponsivenessRule = {
  id: PLR_RULE_ID,
  onError: ruleErrorFinding(PLR_RULE_ID, 'plr'),
  run: (ctx) => assessDynamicTest(ctx, plrSpec(ctx.t)),
};
