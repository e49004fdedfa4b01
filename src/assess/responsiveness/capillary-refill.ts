/** Rule 'responsiveness.capillary-refill' (topic perfusion, context): capillary refill > 3 s is prolonged. */
import type { ResponsivenessRule } from './context.js';
import { assessed, fmt, unusableFinding } from './finding.js';
import { evidenceOfMeasurement, latestMeasurement } from './select.js';

export const CAPILLARY_REFILL_RULE_ID = 'responsiveness.capillary-refill';
const SOURCE = 'Capillary refill > 3 s abnormal: ANDROMEDA-SHOCK, Hernández G et al., JAMA 2019;321:654–664; CRT as adjunct: Surviving Sepsis Campaign 2021';

export const capillaryRefillRule: ResponsivenessRule = {
  id: CAPILLARY_REFILL_RULE_ID,
  run: (ctx) => {
    const sel = latestMeasurement(ctx.snapshot, 'capillaryRefill', ctx.now, ctx.t.capillaryRefillMaxAgeMin);
    if (sel.state !== 'fresh') {
      return unusableFinding(sel, { ruleId: CAPILLARY_REFILL_RULE_ID, topic: 'perfusion', label: 'Capillary refill', source: SOURCE, evidenceOf: (m) => evidenceOfMeasurement(m, ctx.now) });
    }
    const v = sel.item.value;
    const limit = ctx.t.capillaryRefillMaxNormalS;
    const prolonged = v > limit;
    return assessed({
      ruleId: CAPILLARY_REFILL_RULE_ID, topic: 'perfusion', weight: 'context',
      text: prolonged
        ? `Capillary refill ${fmt(v)} s (> ${fmt(limit)} s): prolonged, signals hypoperfusion (context)`
        : `Capillary refill ${fmt(v)} s (≤ ${fmt(limit)} s): normal (context)`,
      evidence: [evidenceOfMeasurement(sel.item, ctx.now)], source: SOURCE, values: { capillaryRefillS: v, prolonged },
    });
  },
};
