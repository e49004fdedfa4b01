/**
 * Rule 'responsiveness.end-expiratory-occlusion': 15-s end-expiratory hold. CI, CO or SV rise > 5 % (dynamic);
 * by echo, VTI rise ≥ 9 % (dynamic); by pulse pressure > 5 % (weak, a static marker that only corroborates).
 */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessDynamicTest, type DynamicTestSpec, type ReadOut } from './dynamic-test.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export const END_EXPIRATORY_OCCLUSION_RULE_ID = 'responsiveness.end-expiratory-occlusion';
const SOURCE = 'End-expiratory occlusion, CI rise > 5 %: Monnet X et al., Crit Care Med 2009;37:951–956 (from memory)';

/** The test with its read-outs and thresholds (what-if/ reads it too, to put a hypothetical result at the threshold). */
export function endExpiratoryOcclusionSpec(t: ResponsivenessThresholds): DynamicTestSpec {
  const flow: ReadOut = { compare: 'relative', threshold: t.eeoFlowRisePercent, strict: true, tier: 'dynamic', source: SOURCE };
  return {
    ruleId: END_EXPIRATORY_OCCLUSION_RULE_ID,
    marker: 'end-expiratory-occlusion',
    kind: 'endExpiratoryOcclusion',
    label: 'End-expiratory occlusion',
    source: SOURCE,
    readOuts: {
      cardiacIndex: flow,
      cardiacOutput: flow,
      strokeVolume: flow,
      vti: {
        compare: 'relative',
        threshold: t.eeoVtiRisePercent,
        strict: false,
        tier: 'dynamic',
        source:
          'End-expiratory occlusion by echo, VTI rise ≥ 9 %: echocardiographic study, Crit Care 2018 (PMC5804059; authors from memory: Georges D et al.)',
      },
      pulsePressure: {
        compare: 'relative',
        threshold: t.eeoPulsePressureRisePercent,
        strict: true,
        tier: 'static',
        note: 'judged by pulse pressure only: weak evidence, a static marker that only corroborates',
        source: 'End-expiratory occlusion, pulse pressure rise > 5 %: Monnet X et al., Crit Care Med 2009 (from memory)',
      },
    },
  };
}

export const endExpiratoryOcclusionRule: ResponsivenessRule = {
  id: END_EXPIRATORY_OCCLUSION_RULE_ID,
  onError: ruleErrorFinding(END_EXPIRATORY_OCCLUSION_RULE_ID, 'end-expiratory-occlusion'),
  run: (ctx) => assessDynamicTest(ctx, endExpiratoryOcclusionSpec(ctx.t)),
};
