/**
 * adviseOrder: the responsiveness and tolerance verdicts, the order's findings and all findings → one
 * recommendation from the advice matrix (matrix.ts). Pure; names options, never doses drugs.
 */
import type { Finding, Responsiveness, Tolerance, Verdict } from '../types.js';
import { isCongestionSign } from '../tolerance/finding.js';
import { toleranceCoverage } from '../tolerance/verdict.js';
import { ALTERNATIVE, ADVICE_MATRIX, CRITICAL_HEADLINE, DEFAULT_NEXT_TEST, UNKNOWN_TOLERANCE_HEADLINE } from './matrix.js';
import type { AdviceIndicator, MatrixCell, OrderRecommendation } from './types.js';

const ORDER_TEXT_RULES = ['order.volume', 'order.volume-per-kg', 'order.intravascular-estimate'];

function unique(xs: string[]): string[] {
  return [...new Set(xs)];
}

export function adviseOrder(
  responsiveness: Verdict<Responsiveness>,
  tolerance: Verdict<Tolerance>,
  orderFindings: readonly Finding[],
  findings: readonly Finding[],
): OrderRecommendation {
  const cell: MatrixCell = `${responsiveness.value}/${tolerance.value}`;
  const entry = ADVICE_MATRIX[responsiveness.value][tolerance.value];
  const all = [...findings, ...orderFindings.filter((o) => !findings.includes(o))];
  const harm = all.filter(isCongestionSign);
  const toleranceAssessed = toleranceCoverage(all).assessed > 0;
  const critical = tolerance.value === 'poor' && harm.length > 0;

  const indicator: AdviceIndicator = critical ? 'critical'
    : tolerance.value !== 'adequate' || responsiveness.value === 'unlikely' ? 'warning' : 'info';

  const headline = critical ? CRITICAL_HEADLINE[responsiveness.value]
    : !toleranceAssessed && tolerance.value === 'adequate' ? UNKNOWN_TOLERANCE_HEADLINE[responsiveness.value]
      : entry.headline;

  const reasons: string[] = [responsiveness.rationale, tolerance.rationale];
  if (critical) reasons.push(`Signs that volume is likely to harm: ${harm.map((f) => f.text).join('; ')}.`);
  if (!toleranceAssessed) reasons.push('Fluid tolerance could not be assessed: no tolerance marker was available, so harm from volume cannot be excluded.');
  for (const id of ORDER_TEXT_RULES) {
    const f = orderFindings.find((o) => o.ruleId === id && o.status === 'assessed');
    if (f) reasons.push(f.text);
  }
  const unread = orderFindings.find((o) => o.ruleId === 'order.volume' && o.status === 'not-assessed');
  if (unread) reasons.push(`Ordered volume not read: ${unread.reason ?? unread.text}.`);

  const orderedClass = orderFindings.find((o) => o.ruleId === 'order.volume')?.values?.['fluidClass'];
  const orderedIsAlbumin = orderedClass === 'albumin-iso' || orderedClass === 'albumin-hyper';
  const nextTest = entry.action === 'test-first' ? responsiveness.nextTest ?? DEFAULT_NEXT_TEST : undefined;
  const alternatives = unique([
    ...(nextTest ? [nextTest] : []),
    ...entry.alternatives.filter((a) => !(orderedIsAlbumin && a === ALTERNATIVE.albumin)),
  ]);

  return {
    action: entry.action,
    indicator,
    headline,
    reasons,
    alternatives,
    ...(nextTest ? { nextTest } : {}),
    cell,
    toleranceAssessed,
    harmSigns: harm.map((f) => f.ruleId),
    decidingRules: unique([...responsiveness.decidingRules, ...tolerance.decidingRules, ...harm.map((f) => f.ruleId)]),
  };
}
