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

/** Flow readings that show a flow monitor in use (cardiac output, cardiac index, stroke volume). */
export const FLOW_MONITOR_KINDS = ['cardiacOutput', 'cardiacIndex', 'strokeVolume'] as const;
export type FlowMonitorKind = (typeof FLOW_MONITOR_KINDS)[number];

/**
 * The flow variable of the newest reading within `flowMonitorRecentMin`, when a flow monitor is in use; ties go to
 * the order of FLOW_MONITOR_KINDS.
 */
export function flowMonitorKind(ctx: RuleContext): FlowMonitorKind | undefined {
  const { t, snapshot: s, now } = ctx;
  let best: { kind: FlowMonitorKind; ms: number } | undefined;
  for (const k of FLOW_MONITOR_KINDS) {
    const newest = readings(s, k, now).items[0];
    if (newest === undefined) continue;
    const ms = Date.parse(newest.effective);
    if (now.getTime() - ms > t.flowMonitorRecentMin * 60_000) continue;
    if (!best || ms > best.ms) best = { kind: k, ms };
  }
  return best?.kind;
}

/**
 * The heart–lung index read from the arterial line now: PPV (else SVV) within its window, fresh or set aside by a
 * later event (the arterial line is there either way); a stale one says nothing about the patient now.
 */
export function currentHeartLungIndex(ctx: RuleContext): 'ppv' | 'svv' | undefined {
  const current = (k: 'ppv' | 'svv') => {
    const st = latestReading(ctx.snapshot, k, ctx.now, ctx.w.ppvSvvMin).state;
    return st === 'fresh' || st === 'set-aside';
  };
  if (current('ppv')) return 'ppv';
  return current('svv') ? 'svv' : undefined;
}

export function chooseNextTest(ctx: RuleContext): NextTestKind {
  const vent = checkVentilation(ctx);
  const hasIndex = currentHeartLungIndex(ctx) !== undefined;
  if (vent.state === 'met' && hasIndex && checkRhythm(ctx).state === 'met' && checkTidalVolume(ctx).state === 'failed')
    return 'tidal-volume-challenge';
  if (checkIntraAbdominalPressure(ctx).state === 'failed') return 'mini-fluid-challenge';
  if (flowMonitorKind(ctx) === undefined) return 'mini-fluid-challenge';
  return 'passive-leg-raise';
}
