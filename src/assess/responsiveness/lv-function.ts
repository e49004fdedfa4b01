/** Rule 'responsiveness.lv-function': coded echo impression of LV function, as context (never decides). */
import { evidenceOfCoded, latestCoded } from '../common/select.js';
import type { ResponsivenessRule } from './context.js';
import { assessed, ruleErrorFinding, unusableFinding } from './finding.js';

export const LV_FUNCTION_RULE_ID = 'responsiveness.lv-function';
const SOURCE = 'Echo impression as context: common practice';

const TEXT: Record<string, string> = {
  hyperdynamic: 'Echo: hyperdynamic left ventricle (context: often seen with low filling; does not decide responsiveness)',
  normal: 'Echo: normal left ventricular function (context)',
  reduced: 'Echo: reduced left ventricular function (context: weigh volume tolerance)',
  'severely-reduced':
    'Echo: severely reduced left ventricular function (context: output may rise little with volume, and volume is poorly tolerated)',
};

export const lvFunctionRule: ResponsivenessRule = {
  id: LV_FUNCTION_RULE_ID,
  onError: ruleErrorFinding(LV_FUNCTION_RULE_ID, 'lv-function'),
  run: (ctx) => {
    const sel = latestCoded(ctx.snapshot, 'lvFunction', ctx.now, ctx.w.echoImpressionMin);
    if (sel.state !== 'fresh') {
      return unusableFinding(sel, {
        ruleId: LV_FUNCTION_RULE_ID,
        marker: 'lv-function',
        label: 'Echo impression of LV function',
        source: SOURCE,
        evidenceOf: (c) => evidenceOfCoded(c, ctx.now),
      });
    }
    const answer = sel.item.answer;
    return assessed({
      ruleId: LV_FUNCTION_RULE_ID,
      marker: 'lv-function',
      direction: 'neutral',
      tier: 'context',
      text: TEXT[answer] ?? `Echo: LV function '${answer}' (context)`,
      evidence: [evidenceOfCoded(sel.item, ctx.now)],
      source: SOURCE,
      values: { lvFunction: answer },
    });
  },
};
