/** Rule 'responsiveness.lactate' (topic perfusion, context): lactate > 2 mmol/L is raised. */
import type { ResponsivenessRule } from './context.js';
import { assessed, fmt, unusableFinding } from './finding.js';
import { evidenceOfMeasurement, latestMeasurement } from './select.js';

export const LACTATE_RULE_ID = 'responsiveness.lactate';
const SOURCE = 'Lactate > 2 mmol/L: Sepsis-3, Singer M et al., JAMA 2016;315:801–810';

export const lactateRule: ResponsivenessRule = {
  id: LACTATE_RULE_ID,
  run: (ctx) => {
    const sel = latestMeasurement(ctx.snapshot, 'lactate', ctx.now, ctx.t.lactateMaxAgeMin);
    if (sel.state !== 'fresh') {
      return unusableFinding(sel, { ruleId: LACTATE_RULE_ID, topic: 'perfusion', label: 'Lactate', source: SOURCE, evidenceOf: (m) => evidenceOfMeasurement(m, ctx.now) });
    }
    const v = sel.item.value;
    const limit = ctx.t.lactateMaxNormalMmolL;
    const raised = v > limit;
    return assessed({
      ruleId: LACTATE_RULE_ID, topic: 'perfusion', weight: 'context',
      text: `Lactate ${fmt(v)} mmol/L (${raised ? `> ${fmt(limit)}: raised` : `≤ ${fmt(limit)}: not raised`}; context)`,
      evidence: [evidenceOfMeasurement(sel.item, ctx.now)], source: SOURCE, values: { lactateMmolL: v, raised },
    });
  },
};
