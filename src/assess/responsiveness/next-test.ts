/**
 * The test that would settle (or confirm) responsiveness, as a kind from a closed set; its wording is in the
 * catalogue. Chosen from the patient's state (docs/clinical-logic/index.md, Suggestions):
 * - a PPV or SVV charted under controlled ventilation, sinus rhythm and tidal volume below 8 mL/kg PBW → tidal
 *   volume challenge (Myatra SN et al., Crit Care Med 2017;45:415: made for low tidal volume);
 * - intra-abdominal hypertension → mini fluid challenge, not PLR (PLR false negatives with IAH: Mahjoub Y et al.,
 *   Crit Care Med 2010;38:1824 [M]);
 * - a flow monitor in use (a cardiac output, cardiac index or stroke volume reading within `flowMonitorRecentMin`)
 *   → PLR with real-time flow (Monnet 2016);
 * - no flow monitor → mini fluid challenge with VTI by echo (Muller L et al., Anesthesiology 2011;115:541).
 */
import type { NextTestKind } from '../types.js';
import { latestReading, readings } from '../common/select.js';
import type { RuleContext } from './context.js';
import { checkIntraAbdominalPressure, checkRhythm, checkTidalVolume, checkVentilation } from './heart-lung-validity.js';

export function chooseNextTest(ctx: RuleContext): NextTestKind {
  const { t, snapshot: s, now } = ctx;
  const vent = checkVentilation(ctx);
  const hasIndex = latestReading(s, 'ppv', now, ctx.w.ppvSvvMin).state !== 'missing' || latestReading(s, 'svv', now, ctx.w.ppvSvvMin).state !== 'missing';
  if (vent.state === 'met' && hasIndex && checkRhythm(ctx).state === 'met' && checkTidalVolume(ctx).state === 'failed') return 'tidal-volume-challenge';
  if (checkIntraAbdominalPressure(ctx).state === 'failed') return 'mini-fluid-challenge';
  const flowMonitor = (['cardiacOutput', 'cardiacIndex', 'strokeVolume'] as const).some((k) => {
    const newest = readings(s, k, now).items[0];
    return newest !== undefined && now.getTime() - Date.parse(newest.effective) <= t.flowMonitorRecentMin * 60_000;
  });
  if (!flowMonitor) return 'mini-fluid-challenge';
  return 'passive-leg-raise';
}
