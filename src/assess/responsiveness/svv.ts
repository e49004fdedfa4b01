/** Rule 'responsiveness.svv': stroke volume variation, same validity conditions as PPV. */
import type { ResponsivenessRule } from './context.js';
import { ruleErrorFinding } from './finding.js';
import { assessVariationIndex } from './variation-index.js';

export const SVV_RULE_ID = 'responsiveness.svv';

export const svvRule: ResponsivenessRule = {
  id: SVV_RULE_ID,
  onError: ruleErrorFinding(SVV_RULE_ID, 'svv'),
  run: (ctx) =>
    assessVariationIndex(ctx, {
      ruleId: SVV_RULE_ID,
      kind: 'svv',
      label: 'SVV',
      thresholdPercent: ctx.t.svvThresholdPercent,
      greyZoneLowPercent: ctx.t.svvGreyZoneLowPercent,
      source:
        'SVV threshold 11.6 %: Marik et al., Crit Care Med 2009;37:2642 (value from memory); grey zone below it: our choice (threshold − 1 SD); ' +
        'validity conditions as for PPV: Monnet, Marik, Teboul, Ann Intensive Care 2016;6:111',
    }),
};
