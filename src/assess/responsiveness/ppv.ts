/** Rule 'responsiveness.ppv': pulse pressure variation, validity-gated, with the Cannesson grey zone. */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessVariationIndex } from './variation-index.js';

export const PPV_RULE_ID = 'responsiveness.ppv';

export const ppvRule: ResponsivenessRule = {
  id: PPV_RULE_ID,
  onError: ruleErrorFinding(PPV_RULE_ID, 'ppv'),
  run: (ctx) =>
    assessVariationIndex(ctx, {
      ruleId: PPV_RULE_ID,
      kind: 'ppv',
      label: 'PPV',
      thresholdPercent: ctx.t.ppvThresholdPercent,
      greyZoneLowPercent: ctx.t.ppvGreyZoneLowPercent,
      source:
        'PPV ≥ 13 %: Michard et al., Am J Respir Crit Care Med 2000;162:134; grey zone 9–13 %: Cannesson et al., Anesthesiology 2011;115:231; ' +
        'validity conditions: Monnet, Marik, Teboul, Ann Intensive Care 2016;6:111; HR/RR > 3.6: De Backer et al., Anesthesiology 2009;110:1092',
    }),
};
