/**
 * Fluid responsiveness: "if this patient gets more volume, is cardiac output likely to rise?"
 * Pure: a function of the common rule context (snapshot, now, thresholds, windows, events); no I/O, no clock.
 * Each marker rule returns exactly one finding (assessed, or not-assessed with the gap and reason); combine.ts turns
 * them into the verdict with its confidence; next-test.ts names the test that would settle or confirm it.
 * May import: ../common, ../types, ../../snapshot/types, ../../fhir/codes, ../../physiology, ../tolerance/conditions.
 */
import type { ResponsivenessFinding } from '../common/finding.js';
import { runRules, type RuleError } from '../common/rule.js';
import type { Responsiveness, Verdict } from '../types.js';
import { combineResponsiveness } from './combine.js';
import type { ResponsivenessRule, RuleContext } from './context.js';
import { cvpRule } from './cvp.js';
import { endExpiratoryOcclusionRule } from './end-expiratory-occlusion.js';
import { ivcRule } from './ivc.js';
import { lastBolusRule } from './last-bolus.js';
import { lvFunctionRule } from './lv-function.js';
import { miniFluidChallengeRule } from './mini-fluid-challenge.js';
import { chooseNextTest } from './next-test.js';
import { plrRule } from './plr.js';
import { ppvRule } from './ppv.js';
import { svvRule } from './svv.js';
import { tidalVolumeChallengeRule } from './tidal-volume-challenge.js';

export { responsivenessThresholdsSchema, DEFAULT_RESPONSIVENESS_THRESHOLDS, type ResponsivenessThresholds } from './thresholds.js';
export type { ResponsivenessRule, RuleContext } from './context.js';

/** Marker rules in output order. */
export const RESPONSIVENESS_RULES: readonly ResponsivenessRule[] = [
  ppvRule,
  svvRule,
  plrRule,
  miniFluidChallengeRule,
  endExpiratoryOcclusionRule,
  tidalVolumeChallengeRule,
  lastBolusRule,
  ivcRule,
  cvpRule,
  lvFunctionRule,
];

/** Rule ids, in output order. */
export const RESPONSIVENESS_RULE_IDS: readonly string[] = RESPONSIVENESS_RULES.map((r) => r.id);

export interface ResponsivenessResult {
  findings: ResponsivenessFinding[];
  verdict: Verdict<Responsiveness>;
  /** Rules that threw; each also appears as a not-assessed finding, and the other findings still count. */
  ruleErrors: RuleError[];
}

export function assessResponsiveness(ctx: RuleContext): ResponsivenessResult {
  const { findings, ruleErrors } = runRules(RESPONSIVENESS_RULES, ctx);
  let nextTest;
  try {
    nextTest = chooseNextTest(ctx);
  } catch {
    nextTest = 'mini-fluid-challenge' as const;
  }
  return { findings, verdict: combineResponsiveness(findings, ctx.t, nextTest), ruleErrors };
}
