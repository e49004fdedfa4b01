/**
 * Fluid responsiveness: "if this patient gets more volume, is cardiac output likely to rise?"
 * Pure: a function of (snapshot, now, thresholds); no I/O, no clock. Each marker rule returns exactly one finding
 * (assessed, or not-assessed with the reason: missing, stale, invalid, outside validity, confounded); combine.ts
 * turns them into the verdict; next-test.ts names the test that would settle an indeterminate one.
 * May import: ../types, ../../snapshot/types, ../../fhir/codes, ../../physiology. Nothing else.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { Finding, Responsiveness, Verdict } from '../types.js';
import { capillaryRefillRule } from './capillary-refill.js';
import { combineResponsiveness } from './combine.js';
import type { ResponsivenessRule, RuleContext } from './context.js';
import { cvpRule } from './cvp.js';
import { endExpiratoryOcclusionRule } from './end-expiratory-occlusion.js';
import { notAssessed } from './finding.js';
import { ivcRule } from './ivc.js';
import { lactateRule } from './lactate.js';
import { lastBolusRule } from './last-bolus.js';
import { lvFunctionRule } from './lv-function.js';
import { mapRule } from './map-target.js';
import { miniFluidChallengeRule } from './mini-fluid-challenge.js';
import { chooseNextTest } from './next-test.js';
import { plrRule } from './plr.js';
import { ppvRule } from './ppv.js';
import { shockIndexRule } from './shock-index.js';
import { svvRule } from './svv.js';
import { tidalVolumeChallengeRule } from './tidal-volume-challenge.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export { responsivenessThresholdsSchema, DEFAULT_RESPONSIVENESS_THRESHOLDS, type ResponsivenessThresholds } from './thresholds.js';
export type { ResponsivenessRule, RuleContext } from './context.js';

/** Marker rules in output order: responsiveness markers, then context (LV function, perfusion). */
export const RESPONSIVENESS_RULES: readonly ResponsivenessRule[] = [
  ppvRule, svvRule, plrRule, miniFluidChallengeRule, endExpiratoryOcclusionRule, tidalVolumeChallengeRule,
  lastBolusRule, ivcRule, cvpRule, lvFunctionRule,
  mapRule, shockIndexRule, lactateRule, capillaryRefillRule,
];

/** Rule ids, in output order. */
export const RESPONSIVENESS_RULE_IDS: readonly string[] = RESPONSIVENESS_RULES.map((r) => r.id);

export interface ResponsivenessResult {
  findings: Finding[];
  verdict: Verdict<Responsiveness>;
  /** Rules that threw; each also appears as a not-assessed finding, and the other findings still count. */
  ruleErrors: Array<{ ruleId: string; message: string }>;
}

export function assessResponsiveness(snapshot: PatientSnapshot, now: Date, t: ResponsivenessThresholds): ResponsivenessResult {
  const ctx: RuleContext = { snapshot, now, t };
  const findings: Finding[] = [];
  const ruleErrors: ResponsivenessResult['ruleErrors'] = [];
  for (const rule of RESPONSIVENESS_RULES) {
    try {
      findings.push(rule.run(ctx));
    } catch (e) {
      const message = (e instanceof Error ? e.message : String(e)).slice(0, 300);
      ruleErrors.push({ ruleId: rule.id, message });
      findings.push(notAssessed({ ruleId: rule.id, text: `${rule.id}: not assessed (rule error)`, reason: `rule error: ${message}`, source: 'internal', values: { ruleError: true } }));
    }
  }
  let nextTest: string;
  try {
    nextTest = chooseNextTest(ctx);
  } catch {
    nextTest = 'Passive leg raising with real-time cardiac output monitoring';
  }
  return { findings, verdict: combineResponsiveness(findings, t, nextTest), ruleErrors };
}
