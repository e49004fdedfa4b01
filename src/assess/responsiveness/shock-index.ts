/** Rule 'responsiveness.shock-index' (topic perfusion, context): HR/SBP > 1.0 is raised; normal about 0.5–0.7. */
import { shockIndex } from '../../physiology/shock-index.js';
import type { ResponsivenessRule } from './context.js';
import { assessed, fmt, notAssessed, unusableFinding } from './finding.js';
import { evidenceOfMeasurement, latestMeasurement, sortEvidence } from './select.js';

export const SHOCK_INDEX_RULE_ID = 'responsiveness.shock-index';
const SOURCE = 'Shock index HR/SBP (Allgöwer & Burri 1967, from memory); > 1.0: Koch E et al., Open Access Emerg Med 2019;11:179';

export const shockIndexRule: ResponsivenessRule = {
  id: SHOCK_INDEX_RULE_ID,
  run: (ctx) => {
    const w = ctx.t.vitalsMaxAgeMin;
    const hr = latestMeasurement(ctx.snapshot, 'heartRate', ctx.now, w);
    const sbp = latestMeasurement(ctx.snapshot, 'systolicBp', ctx.now, w);
    const args = { ruleId: SHOCK_INDEX_RULE_ID, topic: 'perfusion' as const, source: SOURCE, evidenceOf: (m: Parameters<typeof evidenceOfMeasurement>[0]) => evidenceOfMeasurement(m, ctx.now) };
    if (hr.state !== 'fresh') return unusableFinding(hr, { ...args, label: 'Shock index: heart rate' });
    if (sbp.state !== 'fresh') {
      const f = unusableFinding(sbp, { ...args, label: 'Shock index: systolic pressure' });
      return { ...f, evidence: sortEvidence([...f.evidence, evidenceOfMeasurement(hr.item, ctx.now)]) };
    }
    const ev = [evidenceOfMeasurement(hr.item, ctx.now), evidenceOfMeasurement(sbp.item, ctx.now)];
    if (!(sbp.item.value > 0)) {
      return notAssessed({ ...args, text: 'Shock index: not assessed, systolic pressure 0', reason: 'Shock index invalid: systolic pressure must be positive', evidence: ev, values: { freshness: 'invalid' } });
    }
    const si = shockIndex(hr.item.value, sbp.item.value);
    const raised = si > ctx.t.shockIndexHigh;
    return assessed({
      ruleId: SHOCK_INDEX_RULE_ID, topic: 'perfusion', weight: 'context',
      text: `Shock index ${fmt(si, 2)} (HR ${fmt(hr.item.value, 0)} / SBP ${fmt(sbp.item.value, 0)})${raised ? `, above ${fmt(ctx.t.shockIndexHigh, 2)}` : ''} (context)`,
      evidence: ev, source: SOURCE, values: { shockIndex: Math.round(si * 100) / 100, raised },
    });
  },
};
