/**
 * Tidemark's tolerance scheme (docs/clinical-logic/tolerance.md; docs/clinical-logic/index.md, "Tolerance"):
 *   poor      — a severe finding in the lungs, venous system or balance; or a severe finding elsewhere (abdomen,
 *               kidneys) together with at least a moderate lung, venous or balance finding; or moderate findings in
 *               at least `poorWhenModerateDomains` (3) domains, one of them lungs, venous or balance. "Poor" always
 *               rests on a lung, venous-congestion or balance finding: oliguria and a creatinine rise early in shock
 *               are signs of hypoperfusion as much as of intolerance;
 *   limited   — at least one moderate or severe finding otherwise;
 *   adequate  — no limiting finding among at least `adequateMinMarkers` markers assessed, one of them lungs, venous
 *               or balance; it states its coverage ("no limit found in 3 of 17 markers");
 *   not-known — no limit found, but too few markers assessed to call it adequate.
 * Context-only findings (balance in mL, albumin) never limit. A number counts once (docs/clinical-logic): a tolerance finding whose
 * shared number (the CVP) already decided the responsiveness verdict becomes context (countOnce).
 */
import type { SharedNumber, ToleranceDomain, ToleranceFinding } from '../common/finding.js';
import type { Tolerance, Verdict } from '../types.js';
import { limitOf } from './finding.js';

const CORE: ReadonlySet<ToleranceDomain> = new Set(['lungs', 'venous', 'balance']);

export interface ToleranceCoverage {
  /** Assessed markers that can limit (context-only findings are not counted). */
  assessed: number;
  /** All markers that can limit, assessed or not. */
  total: number;
  notAssessed: number;
}

export function toleranceCoverage(findings: readonly ToleranceFinding[]): ToleranceCoverage {
  const limiting = findings.filter((f) => !f.contextOnly);
  const assessed = limiting.filter((f) => f.status === 'assessed').length;
  return { assessed, total: limiting.length, notAssessed: limiting.length - assessed };
}

/** Findings whose shared number already decided another question become context, said so in their text. */
export function countOnce(findings: readonly ToleranceFinding[], counted: readonly SharedNumber[]): ToleranceFinding[] {
  if (counted.length === 0) return [...findings];
  return findings.map((f) =>
    f.status === 'assessed' && !f.contextOnly && f.uses?.some((u) => counted.includes(u))
      ? { ...f, contextOnly: true, limit: 'none' as const, text: `${f.text} (counted once, in the responsiveness verdict)` }
      : f,
  );
}

function list(findings: readonly ToleranceFinding[]): string {
  return findings.map((f) => f.text).join('; ');
}

export function toleranceVerdict(
  findings: readonly ToleranceFinding[],
  t: { poorWhenModerateDomains: number; adequateMinMarkers: number },
): Verdict<Tolerance> {
  const severe = findings.filter((f) => limitOf(f) === 'severe');
  const moderate = findings.filter((f) => limitOf(f) === 'moderate');
  const limiting = [...severe, ...moderate];
  const cov = toleranceCoverage(findings);
  const coverage = { assessed: cov.assessed, total: cov.total };
  const notText = cov.notAssessed > 0 ? ` (${cov.notAssessed} of ${cov.total} marker(s) not assessed)` : '';
  const core = limiting.filter((f) => CORE.has(f.domain));
  const severeCore = severe.filter((f) => CORE.has(f.domain));
  const domains = [...new Set(limiting.map((f) => f.domain))];
  const ids = (fs: readonly ToleranceFinding[]) => fs.map((f) => f.ruleId);

  if (severeCore.length || (severe.length && core.length) || (domains.length >= t.poorWhenModerateDomains && core.length)) {
    return { value: 'poor', rationale: `Poor tolerance: ${list(limiting)}${notText}.`, decidingRules: ids(limiting), coverage };
  }
  if (limiting.length) {
    const capped = severe.length ? '; no lung, venous or balance finding, so not called poor' : '';
    return {
      value: 'limited',
      rationale: `Limited tolerance: ${list(limiting)}${capped}${notText}.`,
      decidingRules: ids(limiting),
      coverage,
    };
  }
  const assessed = findings.filter((f) => f.status === 'assessed' && !f.contextOnly);
  if (assessed.length < t.adequateMinMarkers || !assessed.some((f) => CORE.has(f.domain))) {
    return {
      value: 'not-known',
      rationale: `No limit found, but only ${cov.assessed} of ${cov.total} markers could be assessed${assessed.some((f) => CORE.has(f.domain)) ? '' : ' and none of lungs, venous pressure or balance'}: tolerance is not known.`,
      decidingRules: [],
      coverage,
    };
  }
  return {
    value: 'adequate',
    rationale: `No limit found in ${cov.assessed} of ${cov.total} markers.`,
    decidingRules: ids(assessed),
    coverage,
  };
}
