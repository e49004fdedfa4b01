/**
 * Fluid responsiveness: "if this patient gets more volume, is cardiac output likely to rise?"
 * Pure: a function of the common rule context (snapshot, now, thresholds, windows, events); no I/O, no clock.
 * Each marker rule returns exactly one finding (assessed, or not-assessed with the gap and reason); combine.ts turns
 * them into the verdict with its confidence; next-test.ts names the test that would settle or confirm it.
 * May import: ../common, ../types, ../../snapshot/types, ../../fhir/codes, ../../physiology, ../tolerance/conditions.
 */
import type { ResponsivenessFinding } from '../common/finding.js';
import { runRules, type RuleError } from '../common/rule.js';
import type { DynamicTestKind } from '../../fhir/codes.js';
import type { NextTestKind, Responsiveness, Verdict } from '../types.js';
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

/** A result with what a what-if re-run takes from it: each rule's output apart, and the test offered. */
export interface ResponsivenessRun extends ResponsivenessResult {
  /** The findings and error of each rule of RESPONSIVENESS_RULES, in that order. */
  byRule: ReadonlyArray<{ findings: ResponsivenessFinding[]; ruleErrors: RuleError[] }>;
  nextTest: NextTestKind;
}

/**
 * The one rule that reads each kind of dynamic test: the before/after tests read the snapshot's dynamic tests of
 * their own kind (dynamic-test.ts, dynamicTestsOf) and no rule or step of this group reads any other
 * (tests/property/responsiveness.property.test.ts, "a dynamic test of one kind").
 */
export const DYNAMIC_TEST_RULES: Readonly<Record<DynamicTestKind, ResponsivenessRule>> = {
  plr: plrRule,
  miniFluidChallenge: miniFluidChallengeRule,
  endExpiratoryOcclusion: endExpiratoryOcclusionRule,
  tidalVolumeChallenge: tidalVolumeChallengeRule,
};

export function assessResponsiveness(ctx: RuleContext): ResponsivenessResult {
  const { findings, verdict, ruleErrors } = runResponsiveness(ctx);
  return { findings, verdict, ruleErrors };
}

/** assessResponsiveness, keeping what reassessWithDynamicTest needs. */
export function runResponsiveness(ctx: RuleContext): ResponsivenessRun {
  // One rule at a time through the one runner: the same findings and errors, in the same order, as all at once.
  const byRule = RESPONSIVENESS_RULES.map((rule) => runRules([rule], ctx));
  let nextTest: NextTestKind;
  try {
    nextTest = chooseNextTest(ctx);
  } catch {
    nextTest = 'mini-fluid-challenge';
  }
  return joined(byRule, ctx, nextTest);
}

/**
 * runResponsiveness on `ctx`, whose snapshot is the snapshot of `base` with dynamic test results of one `kind` added
 * and nothing else changed: only the rule that reads that kind (DYNAMIC_TEST_RULES) is run again; the other rules'
 * outputs and the test offered (chooseNextTest reads no dynamic test) are those of `base`.
 */
export function reassessWithDynamicTest(base: ResponsivenessRun, ctx: RuleContext, kind: DynamicTestKind): ResponsivenessRun {
  const rule = DYNAMIC_TEST_RULES[kind];
  const byRule = base.byRule.map((out, i) => (RESPONSIVENESS_RULES[i] === rule ? runRules([rule], ctx) : out));
  return joined(byRule, ctx, base.nextTest);
}

function joined(byRule: ResponsivenessRun['byRule'], ctx: RuleContext, nextTest: NextTestKind): ResponsivenessRun {
  const findings: ResponsivenessFinding[] = [];
  const ruleErrors: RuleError[] = [];
  for (const out of byRule) {
    findings.push(...out.findings);
    ruleErrors.push(...out.ruleErrors);
  }
  return { findings, verdict: combineResponsiveness(findings, ctx.t, nextTest), ruleErrors, byRule, nextTest };
}
