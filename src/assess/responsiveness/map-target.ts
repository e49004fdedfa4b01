/** Rule 'responsiveness.map' (topic perfusion, context): MAP (measured, else from SBP/DBP) below the 65 mmHg target. */
import type { Finding } from '../types.js';
import { mapPointEvidence, mapSeries } from './blood-pressure.js';
import type { ResponsivenessRule } from './context.js';
import { assessed, fmt, notAssessed, staleText } from './finding.js';
import { ageMinutes } from './select.js';

export const MAP_RULE_ID = 'responsiveness.map';
const SOURCE = 'Initial MAP target 65 mmHg: Surviving Sepsis Campaign 2021, Evans L et al., Intensive Care Med 2021;47:1181; MAP ≈ DBP + (SBP − DBP)/3: common practice';

export const mapRule: ResponsivenessRule = {
  id: MAP_RULE_ID,
  run: (ctx): Finding => {
    const newest = mapSeries(ctx)[0];
    const w = ctx.t.vitalsMaxAgeMin;
    if (!newest) {
      return notAssessed({ ruleId: MAP_RULE_ID, topic: 'perfusion', text: 'MAP: not assessed (none recorded)', reason: 'no MAP and no systolic/diastolic pair recorded', source: SOURCE, values: { freshness: 'missing' } });
    }
    const ev = mapPointEvidence(newest, ctx.now);
    const age = ageMinutes(newest.effective, ctx.now);
    if (age > w) {
      const why = staleText(age, w);
      return notAssessed({ ruleId: MAP_RULE_ID, topic: 'perfusion', text: `MAP: not assessed, latest ${why}`, reason: `MAP ${why}`, evidence: ev, source: SOURCE, values: { freshness: 'stale', ageMin: Math.round(age), windowMin: w } });
    }
    const below = newest.mapMmHg < ctx.t.mapTargetMmHg;
    return assessed({
      ruleId: MAP_RULE_ID, topic: 'perfusion', weight: 'context',
      text: `MAP ${fmt(newest.mapMmHg, 0)} mmHg${newest.measured ? '' : ' (from SBP/DBP)'}, ${below ? 'below' : 'at or above'} the target of ${fmt(ctx.t.mapTargetMmHg)} mmHg (context)`,
      evidence: ev, source: SOURCE, values: { mapMmHg: Math.round(newest.mapMmHg * 10) / 10, measured: newest.measured, belowTarget: below },
    });
  },
};
