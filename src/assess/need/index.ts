/**
 * Need and phase: is there anything to treat (a fresh sign of hypoperfusion), and is this early resuscitation of
 * shock or a later phase (docs/clinical-logic/index.md). Pure. May import: ../common, ../types, ../tolerance (weights,
 * urine intervals), ../../physiology.
 */
import type { PerfusionFinding, PhaseFinding } from '../common/finding.js';
import { runRules, type RuleError } from '../common/rule.js';
import type { Need, PhaseValue, Verdict } from '../types.js';
import type { NeedContext } from './context.js';
import { assessPhase } from './phase.js';
import { NEED_RULES } from './signs.js';

export { needThresholdsSchema, DEFAULT_NEED_THRESHOLDS, type NeedThresholds } from './thresholds.js';
export type { NeedContext, NeedSettings } from './context.js';

export interface NeedResult {
  findings: Array<PerfusionFinding | PhaseFinding>;
  need: Verdict<Need>;
  phase?: Verdict<PhaseValue>;
  ruleErrors: RuleError[];
}

/**
 * present — at least one counted sign shows hypoperfusion;
 * absent  — none does, and the MAP and at least one of lactate, capillary refill or urine output were assessed;
 * unknown — otherwise (too little current data to say there is nothing to treat).
 */
export function needVerdict(findings: readonly PerfusionFinding[]): Verdict<Need> {
  const counted = findings.filter((f) => f.status === 'assessed' && !f.contextOnly);
  const signs = counted.filter((f) => f.hypoperfusion === true);
  if (signs.length)
    return { value: 'present', rationale: `${signs.map((f) => f.text).join('; ')}.`, decidingRules: signs.map((f) => f.ruleId) };
  const mapSeen = counted.some((f) => f.sign === 'map');
  const tissue = counted.some((f) => f.sign === 'lactate' || f.sign === 'capillary-refill' || f.sign === 'urine-output');
  if (mapSeen && tissue) {
    return { value: 'absent', rationale: `${counted.map((f) => f.text).join('; ')}.`, decidingRules: counted.map((f) => f.ruleId) };
  }
  const missing = [!mapSeen ? 'a current MAP' : '', !tissue ? 'a current lactate, capillary refill or urine output' : '']
    .filter(Boolean)
    .join(' and ');
  return {
    value: 'unknown',
    rationale: `No sign of hypoperfusion found, but ${missing} is not on the chart: the need for volume cannot be judged.`,
    decidingRules: counted.map((f) => f.ruleId),
  };
}

export function assessNeed(ctx: NeedContext): NeedResult {
  const { findings, ruleErrors } = runRules(NEED_RULES, ctx);
  const out: NeedResult = { findings: [...findings], need: needVerdict(findings), ruleErrors };
  try {
    const p = assessPhase(ctx);
    out.phase = p.verdict;
    out.findings.push(p.finding);
  } catch (e) {
    ruleErrors.push({ ruleId: 'phase.fluid-therapy', message: String((e as Error)?.message ?? e).slice(0, 300) });
  }
  return out;
}
