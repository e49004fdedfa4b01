/**
 * Fluid tolerance: can this patient take more volume without harm? Pure functions of
 * (snapshot, now, thresholds); no I/O, no clock. One file per marker rule; this file runs them in a fixed
 * order and applies the scheme in verdict.ts. May import: ../types, ../../snapshot/types, ../../fhir/codes,
 * ../../physiology, zod.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding, Tolerance, Verdict } from '../types.js';
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
import { toleranceCoverage, toleranceVerdict, type ToleranceCoverage } from './verdict.js';
import { VEXUS, vexusRule } from './vexus.js';
import { WEIGHT_GAIN, weightGainRule } from './weight-gain.js';

export type ToleranceRule = (snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds) => Finding[];

/** The tolerance rules in the order their findings are listed. */
export const TOLERANCE_RULES: ReadonlyArray<{ id: string; domain: ToleranceDomain; run: ToleranceRule }> = [
  { id: BALANCE_CUMULATIVE, domain: 'balance', run: cumulativeBalanceRule },
  { id: BALANCE_24H, domain: 'balance', run: balance24hRule },
  { id: FLUID_OVERLOAD, domain: 'balance', run: fluidOverloadRule },
  { id: WEIGHT_GAIN, domain: 'balance', run: weightGainRule },
  { id: ALBUMIN, domain: 'oncotic', run: albuminRule },
  { id: OEDEMA, domain: 'oncotic', run: oedemaRule },
  { id: SPO2_FIO2, domain: 'lungs', run: spo2Fio2Rule },
  { id: SPO2_FIO2_TREND, domain: 'lungs', run: spo2Fio2TrendRule },
  { id: OXYGEN_NEED, domain: 'lungs', run: oxygenNeedRule },
  { id: LUNG_ULTRASOUND, domain: 'lungs', run: lungUltrasoundRule },
  { id: EVLWI, domain: 'lungs', run: evlwiRule },
  { id: VEXUS, domain: 'venous', run: vexusRule },
  { id: CVP, domain: 'venous', run: cvpRule },
  { id: ABDOMINAL_PRESSURE, domain: 'abdomen', run: abdominalPressureRule },
  { id: KIDNEY_URINE, domain: 'kidneys', run: kidneyUrineRule },
  { id: KIDNEY_CREATININE, domain: 'kidneys', run: kidneyCreatinineRule },
  { id: CONDITIONS, domain: 'conditions', run: conditionsRule },
];

export interface ToleranceAssessment {
  findings: Finding[];
  verdict: Verdict<Tolerance>;
  /** How many limiting markers were assessed. With none, the verdict 'adequate' means "unknown": a caller may leave Advice.tolerance unset. */
  coverage: ToleranceCoverage;
  /** Rules that threw: each also leaves a not-assessed finding, and the other rules still count (conventions §6). */
  ruleErrors: Array<{ ruleId: string; message: string }>;
}

export function assessTolerance(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceAssessment {
  const findings: Finding[] = [];
  const ruleErrors: ToleranceAssessment['ruleErrors'] = [];
  for (const rule of TOLERANCE_RULES) {
    try {
      findings.push(...rule.run(snapshot, now, t));
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err);
      ruleErrors.push({ ruleId: rule.id, message });
      findings.push(notAssessed(rule.id, rule.domain, 'Not assessed: the rule failed', `rule error: ${message}`, 'Tidemark'));
    }
  }
  return { findings, verdict: toleranceVerdict(findings, t), coverage: toleranceCoverage(findings), ruleErrors };
}

export { toleranceThresholdsSchema, DEFAULT_TOLERANCE_THRESHOLDS, type ToleranceThresholds } from './thresholds.js';
export { limitOf, isCongestionSign, isContextOnly, type ToleranceLimit, type ToleranceDomain } from './finding.js';
export { toleranceVerdict, toleranceCoverage, type ToleranceCoverage } from './verdict.js';
