/** Rule 'responsiveness.cvp': CVP at the extremes only, a static marker (see ../common/cvp.ts for the reading and sources). */
import { CVP_RESPONSIVENESS_SOURCE as SOURCE, cvpEvidence, latestCvp } from '../common/cvp.js';
import { latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';
import type { ResponsivenessRule } from './context.js';
import { assessed, ruleErrorFinding, unusableFinding } from './finding.js';

export const CVP_RULE_ID = 'responsiveness.cvp';
/** PEEP from which the finding notes that PEEP raises the CVP reading (common practice; not a threshold of the verdict). */
const HIGH_PEEP_CMH2O = 10;

export const cvpRule: ResponsivenessRule = {
  id: CVP_RULE_ID,
  onError: ruleErrorFinding(CVP_RULE_ID, 'cvp'),
  run: (ctx) => {
    const { t, now } = ctx;
    const { sel, label } = latestCvp(ctx.snapshot, now, ctx.w);
    if (sel.state !== 'fresh') {
      return unusableFinding(sel, { ruleId: CVP_RULE_ID, marker: 'cvp', label, source: SOURCE, evidenceOf: (m) => cvpEvidence(m, now) });
    }
    const v = sel.item.value;
    // PEEP raises CVP without a change in filling (common practice): say so beside a CVP read on high PEEP.
    const peep = latestReading(ctx.snapshot, 'peep', now, ctx.w.tidalVolumeMin);
    const onPeep =
      peep.state === 'fresh' && peep.item.value >= HIGH_PEEP_CMH2O ? `, on PEEP ${fmt(peep.item.value)} cmH2O, which raises it` : '';
    const base = {
      ruleId: CVP_RULE_ID,
      marker: 'cvp' as const,
      tier: 'static' as const,
      evidence: [cvpEvidence(sel.item, now)],
      source: SOURCE,
      values: { cvpMmHg: v },
      uses: ['cvp' as const],
    };
    if (v <= t.cvpLowMmHg) {
      return assessed({
        ...base,
        direction: 'for',
        text: `${label} ${fmt(v, 1)} mmHg (≤ ${fmt(t.cvpLowMmHg, 1)})${onPeep}: very low, points to fluid responsiveness (static, corroborates only)`,
      });
    }
    if (v >= t.cvpHighMmHg) {
      return assessed({
        ...base,
        direction: 'against',
        text: `${label} ${fmt(v, 1)} mmHg (≥ ${fmt(t.cvpHighMmHg, 1)})${onPeep}: high, points against fluid responsiveness (static, corroborates only)`,
      });
    }
    return assessed({
      ...base,
      direction: 'neutral',
      text: `${label} ${fmt(v, 1)} mmHg${onPeep}: mid-range, not evidence either way (Marik 2008, 2013)`,
    });
  },
};
