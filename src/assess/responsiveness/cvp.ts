/**
 * Rule 'responsiveness.cvp': CVP at the extremes only (common practice §11): ≤ 3 mmHg → for, ≥ 12 mmHg → against,
 * both static-extreme. In between CVP is not evidence either way (Marik 2008, 2013). A measured right atrial mean
 * pressure stands in when no fresh CVP exists.
 */
import type { Measurement } from '../../snapshot/types.js';
import type { ResponsivenessRule } from './context.js';
import { assessed, fmt, unusableFinding } from './finding.js';
import { evidenceOfMeasurement, latestMeasurement, type Selection } from './select.js';

export const CVP_RULE_ID = 'responsiveness.cvp';
const SOURCE = 'CVP extremes: common practice; mid-range CVP does not predict fluid response: Marik PE et al., Chest 2008;134:172; Marik PE, Cavallazzi R, Crit Care Med 2013;41:1774';

export const cvpRule: ResponsivenessRule = {
  id: CVP_RULE_ID,
  run: (ctx) => {
    const { t, now } = ctx;
    const cvp = latestMeasurement(ctx.snapshot, 'cvp', now, t.cvpMaxAgeMin);
    const rap = latestMeasurement(ctx.snapshot, 'rightAtrialPressure', now, t.cvpMaxAgeMin);
    let sel: Selection<Measurement> = cvp;
    let label = 'CVP';
    if (cvp.state !== 'fresh' && rap.state === 'fresh') { sel = rap; label = 'Right atrial pressure'; }
    else if (cvp.state === 'missing' && rap.state !== 'missing') { sel = rap; label = 'Right atrial pressure'; }
    if (sel.state !== 'fresh') {
      return unusableFinding(sel, { ruleId: CVP_RULE_ID, label, source: SOURCE, evidenceOf: (m) => evidenceOfMeasurement(m, now) });
    }
    const v = sel.item.value;
    const ev = [evidenceOfMeasurement(sel.item, now)];
    const values = { cvpMmHg: v };
    if (v <= t.cvpLowMmHg) {
      return assessed({ ruleId: CVP_RULE_ID, direction: 'for', weight: 'static-extreme', text: `${label} ${fmt(v)} mmHg (≤ ${fmt(t.cvpLowMmHg)}): very low, points to fluid responsiveness`, evidence: ev, source: SOURCE, values });
    }
    if (v >= t.cvpHighMmHg) {
      return assessed({ ruleId: CVP_RULE_ID, direction: 'against', weight: 'static-extreme', text: `${label} ${fmt(v)} mmHg (≥ ${fmt(t.cvpHighMmHg)}): high, points against fluid responsiveness`, evidence: ev, source: SOURCE, values });
    }
    return assessed({
      ruleId: CVP_RULE_ID, direction: 'neutral', weight: 'static',
      text: `${label} ${fmt(v)} mmHg: mid-range, not evidence either way (Marik 2008, 2013)`, evidence: ev, source: SOURCE, values,
    });
  },
};
