/**
 * Is a test feasible for this patient now, and on which variable would it be read? Every reason it is not, from the
 * checks the responsiveness rules already make (heart-lung-validity.ts, next-test.ts):
 *   passive leg raise      — real-time flow monitoring (a cardiac output, cardiac index or stroke volume reading
 *                            within flowMonitorRecentMin): the effect is transient and pulse pressure is a poor
 *                            surrogate (Monnet X, Marik PE, Teboul JL, Intensive Care Med 2016;42:1935); not with
 *                            intra-abdominal hypertension, IAP ≥ iahThresholdMmHg (WSACS 2013), where it gives false
 *                            negatives (Mahjoub Y et al., Crit Care Med 2010;38:1824 [from memory]);
 *   mini fluid challenge   — read on VTI by echo, no monitor needed (Muller L et al., Anesthesiology 2011;115:541);
 *   end-expiratory occl.   — controlled ventilation without spontaneous effort (Monnet X et al., Crit Care Med
 *                            2009;37:951 [from memory]); read on the flow monitor, else on VTI by echo (Crit Care 2018,
 *                            PMC5804059);
 *   tidal volume challenge — controlled ventilation without effort and sinus rhythm (its gate), a PPV or SVV from an
 *                            arterial line (it is read on them), and tidal volume below minTidalVolumeMlPerKgPbw
 *                            (8 mL/kg PBW): it is made for low tidal volume (Myatra SN et al., Crit Care Med 2017;45:415).
 * A test whose rule already has a fresh, validated flow result (an assessed dynamic finding) is 'already-done'.
 */
import type { DynamicMeasured } from '../../fhir/codes.js';
import type { Finding } from '../common/finding.js';
import type { RuleContext } from '../responsiveness/context.js';
import { checkIntraAbdominalPressure, checkRhythm, checkTidalVolume, checkVentilation } from '../responsiveness/heart-lung-validity.js';
import { currentHeartLungIndex, flowMonitorKind } from '../responsiveness/next-test.js';
import type { NextTestKind } from '../types.js';
import { TEST_SPECS } from './test-specs.js';
import type { NotFeasible } from './types.js';

export interface Feasibility {
  notFeasible: NotFeasible[];
  /** What the hypothetical result is read on, when feasible. */
  measured?: DynamicMeasured;
}

function ventilationReasons(ctx: RuleContext): NotFeasible[] {
  const v = checkVentilation(ctx);
  if (v.state === 'met') return [];
  // Failed: a fresh record of effort or spontaneous breathing. Unknown: controlled ventilation is not charted.
  return [v.state === 'failed' ? 'spontaneous-breathing' : 'not-ventilated'];
}

/** A fresh, validated result of this test with a flow read-out is already in the advice's findings. */
function alreadyDone(test: NextTestKind, ctx: RuleContext, findings: readonly Finding[]): boolean {
  const ruleId = TEST_SPECS[test].spec(ctx.t).ruleId;
  return findings.some((f) => f.topic === 'responsiveness' && f.ruleId === ruleId && f.status === 'assessed' && f.tier === 'dynamic');
}

/**
 * The checks more than one test makes, each made once for all four on first use (so in the same order, and failing
 * at the same point, as when each test made its own).
 */
export interface SharedChecks {
  flow: () => DynamicMeasured | undefined;
  ventilation: () => readonly NotFeasible[];
}

export function sharedChecks(ctx: RuleContext): SharedChecks {
  let flow: { kind: DynamicMeasured | undefined } | undefined;
  let ventilation: NotFeasible[] | undefined;
  return {
    flow: () => (flow ??= { kind: flowMonitorKind(ctx) }).kind,
    ventilation: () => (ventilation ??= ventilationReasons(ctx)),
  };
}

export function feasibility(
  test: NextTestKind,
  ctx: RuleContext,
  findings: readonly Finding[],
  shared: SharedChecks = sharedChecks(ctx),
): Feasibility {
  const reasons: NotFeasible[] = [];
  let measured: DynamicMeasured | undefined;
  const flow = shared.flow();
  switch (test) {
    case 'passive-leg-raise':
      if (checkIntraAbdominalPressure(ctx).state === 'failed') reasons.push('raised-abdominal-pressure');
      if (flow === undefined) reasons.push('no-flow-monitor');
      measured = flow;
      break;
    case 'mini-fluid-challenge':
      measured = 'vti';
      break;
    case 'end-expiratory-occlusion':
      reasons.push(...shared.ventilation());
      measured = flow ?? 'vti';
      break;
    case 'tidal-volume-challenge': {
      reasons.push(...shared.ventilation());
      const index = currentHeartLungIndex(ctx);
      if (index === undefined) reasons.push('no-arterial-line');
      if (checkRhythm(ctx).state !== 'met') reasons.push('no-sinus-rhythm');
      const vt = checkTidalVolume(ctx).state;
      if (vt === 'met') reasons.push('tidal-volume-not-low');
      else if (vt !== 'failed') reasons.push('tidal-volume-unknown');
      measured = index;
      break;
    }
  }
  if (alreadyDone(test, ctx, findings)) reasons.push('already-done');
  return reasons.length ? { notFeasible: reasons } : { notFeasible: [], ...(measured ? { measured } : {}) };
}
