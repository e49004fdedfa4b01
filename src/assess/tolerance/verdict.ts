/**
 * Tidemark's tolerance scheme (documented in docs/clinical-logic/tolerance.md):
 *   poor     — at least one severe finding (EVLWI ≥ 10, diffuse B-pattern, VExUS 3, %FO ≥ 20 %,
 *              weight gain ≥ 20 %, IAH grade ≥ III, KDIGO stage 3 by urine), or moderate findings in
 *              at least `poorWhenModerateDomains` (3) different organ domains;
 *   limited  — at least one moderate finding;
 *   adequate — no limiting finding among the markers assessed. When nothing could be assessed the verdict
 *              is still 'adequate' (the type has no "unknown"), and the rationale says tolerance is unknown.
 */
import type { Finding, Tolerance, Verdict } from '../types.js';
import { domainOf, isContextOnly, limitOf } from './finding.js';

export interface ToleranceCoverage {
  /** Assessed markers that can limit (context-only findings are not counted). */
  assessed: number;
  notAssessed: number;
}

export function toleranceCoverage(findings: readonly Finding[]): ToleranceCoverage {
  const tol = findings.filter((f) => f.topic === 'tolerance');
  return {
    assessed: tol.filter((f) => f.status === 'assessed' && !isContextOnly(f)).length,
    notAssessed: tol.filter((f) => f.status === 'not-assessed').length,
  };
}

function list(findings: readonly Finding[]): string {
  return findings.map((f) => f.text).join('; ');
}

export function toleranceVerdict(findings: readonly Finding[], t: { poorWhenModerateDomains: number }): Verdict<Tolerance> {
  const tol = findings.filter((f) => f.topic === 'tolerance');
  const severe = tol.filter((f) => limitOf(f) === 'severe');
  const moderate = tol.filter((f) => limitOf(f) === 'moderate');
  const cov = toleranceCoverage(tol);
  const notText = cov.notAssessed > 0 ? ` (${cov.notAssessed} marker(s) not assessed)` : '';

  if (severe.length > 0) {
    return {
      value: 'poor',
      rationale: `Poor tolerance: ${list(severe)}${moderate.length ? `; also ${list(moderate)}` : ''}${notText}.`,
      decidingRules: severe.map((f) => f.ruleId),
    };
  }
  const domains = [...new Set(moderate.map((f) => domainOf(f) ?? f.ruleId))];
  if (domains.length >= t.poorWhenModerateDomains) {
    return {
      value: 'poor',
      rationale: `Poor tolerance: limits in ${domains.length} organ domains (${domains.join(', ')}): ${list(moderate)}${notText}.`,
      decidingRules: moderate.map((f) => f.ruleId),
    };
  }
  if (moderate.length > 0) {
    return { value: 'limited', rationale: `Limited tolerance: ${list(moderate)}${notText}.`, decidingRules: moderate.map((f) => f.ruleId) };
  }
  if (cov.assessed === 0) {
    return {
      value: 'adequate',
      rationale: `No tolerance marker could be assessed${notText}: tolerance is unknown, not shown to be adequate.`,
      decidingRules: [],
    };
  }
  const assessedRules = tol.filter((f) => f.status === 'assessed' && !isContextOnly(f));
  return {
    value: 'adequate',
    rationale: `No limiting finding among ${cov.assessed} marker(s) assessed${notText}.`,
    decidingRules: assessedRules.map((f) => f.ruleId),
  };
}
