/**
 * Fluid tolerance: can this patient take more volume without harm? Pure functions of
 * (snapshot, now, thresholds); no I/O, no clock. One file per marker rule; this file runs them in a fixed
 * order and applies the scheme in verdict.ts. May import: ../types, ../../snapshot/types, ../../fhir/codes,
 * ../../physiology, zod.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { SharedNumber, ToleranceFinding } from '../common/finding.js';
import { runRules, type Rule, type RuleContext, type RuleError } from '../common/rule.js';
import type { Windows } from '../common/windows.js';
import type { Tolerance, Verdict } from '../types.js';
import { abdominalPressureRule, ABDOMINAL_PRESSURE } from './abdominal-pressure.js';
import { albuminRule, ALBUMIN } from './albumin.js';
import { balance24hRule, BALANCE_24H, BALANCE_CUMULATIVE, cumulativeBalanceRule } from './balance.js';
import { CONDITIONS, conditionsRule } from './conditions.js';
import { CVP, cvpRule } from './cvp.js';
import { EVLWI, evlwiRule } from './evlwi.js';
import { notAssessed, type ToleranceDomain } from './finding.js';
import { FLUID_OVERLOAD, fluidOverloadRule } from './fluid-overload.js';
import { KIDNEY_CREATININE, kidneyCreatinineRule } from './kidney-creatinine.js';
import { KIDNEY_URINE, kidneyUrineRule } from './kidney-urine.js';
import { LUNG_ULTRASOUND, lungUltrasoundRule } from './lung-ultrasound.js';
import { OEDEMA, oedemaRule } from './oedema.js';
import { OXYGEN_NEED, oxygenNeedRule } from './oxygen-need.js';
import { SPO2_FIO2, SPO2_FIO2_TREND, spo2Fio2Rule, spo2Fio2TrendRule } from './spo2-fio2.js';
import type { ToleranceThresholds } from './thresholds.js';
import { countOnce, toleranceCoverage, toleranceVerdict, type ToleranceCoverage } from './verdict.js';
import { VEXUS, vexusRule } from './vexus.js';
import { WEIGHT_GAIN, weightGainRule } from './weight-gain.js';

export type ToleranceRuleFn = (snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds, w: Windows) => ToleranceFinding[];
export type ToleranceRule = Rule<ToleranceThresholds, ToleranceFinding>;

function rule(id: string, domain: ToleranceDomain, fn: ToleranceRuleFn): ToleranceRule {
  return {
    id,
    run: (c) => fn(c.snapshot, c.now, c.t, c.w),
    onError: (message) =>
      notAssessed(id, domain, 'Not assessed: the rule failed', `rule error: ${message}`, 'internal', [], undefined, 'rule-error'),
  };
}

/** The tolerance rules in the order their findings are listed. */
export const TOLERANCE_RULES: readonly ToleranceRule[] = [
  rule(BALANCE_CUMULATIVE, 'balance', cumulativeBalanceRule),
  rule(BALANCE_24H, 'balance', balance24hRule),
  rule(FLUID_OVERLOAD, 'balance', fluidOverloadRule),
  rule(WEIGHT_GAIN, 'balance', weightGainRule),
  rule(ALBUMIN, 'oncotic', albuminRule),
  rule(OEDEMA, 'oncotic', oedemaRule),
  rule(SPO2_FIO2, 'lungs', spo2Fio2Rule),
  rule(SPO2_FIO2_TREND, 'lungs', spo2Fio2TrendRule),
  rule(OXYGEN_NEED, 'lungs', oxygenNeedRule),
  rule(LUNG_ULTRASOUND, 'lungs', lungUltrasoundRule),
  rule(EVLWI, 'lungs', evlwiRule),
  rule(VEXUS, 'venous', vexusRule),
  rule(CVP, 'venous', cvpRule),
  rule(ABDOMINAL_PRESSURE, 'abdomen', abdominalPressureRule),
  rule(KIDNEY_URINE, 'kidneys', kidneyUrineRule),
  rule(KIDNEY_CREATININE, 'kidneys', kidneyCreatinineRule),
  rule(CONDITIONS, 'conditions', conditionsRule),
];

export interface ToleranceAssessment {
  findings: ToleranceFinding[];
  verdict: Verdict<Tolerance>;
  coverage: ToleranceCoverage;
  /** Rules that threw: each also leaves a not-assessed finding, and the other rules still count. */
  ruleErrors: RuleError[];
}

/**
 * Runs the tolerance rules. `counted`: shared numbers that already decided the responsiveness verdict; their
 * tolerance findings become context (a number counts once, docs/clinical-logic).
 */
export function assessTolerance(ctx: RuleContext<ToleranceThresholds>, counted: readonly SharedNumber[] = []): ToleranceAssessment {
  return toleranceOfRun(runToleranceRules(ctx), ctx.t, counted);
}

/** The tolerance rules' findings and errors, before a number is counted once (they do not depend on `counted`). */
export type ToleranceRun = ReturnType<typeof runToleranceRules>;
export function runToleranceRules(ctx: RuleContext<ToleranceThresholds>): { findings: ToleranceFinding[]; ruleErrors: RuleError[] } {
  return runRules(TOLERANCE_RULES, ctx);
}

/** assessTolerance from a run of its rules: the numbers in `counted` counted once, then the verdict. */
export function toleranceOfRun(run: ToleranceRun, t: ToleranceThresholds, counted: readonly SharedNumber[] = []): ToleranceAssessment {
  const findings = countOnce(run.findings, counted);
  return { findings, verdict: toleranceVerdict(findings, t), coverage: toleranceCoverage(findings), ruleErrors: run.ruleErrors };
}

export { toleranceThresholdsSchema, DEFAULT_TOLERANCE_THRESHOLDS, type ToleranceThresholds } from './thresholds.js';
export { limitOf, type ToleranceLimit, type ToleranceDomain } from './finding.js';
export { toleranceVerdict, toleranceCoverage, countOnce, type ToleranceCoverage } from './verdict.js';
