/**
 * adviseOrder: the verdicts (responsiveness with its confidence, tolerance, need, phase) and the findings → one
 * recommendation in codes. Pure; names options, never doses drugs. Order of precedence (docs/clinical-logic/index.md):
 *   1. early resuscitation of shock → resuscitate-and-reassess; never a withdrawal (with harm signs: smaller aliquot);
 *   2. later, a response likely (or untested) but no current sign of hypoperfusion → question-need, never "give";
 *   3. the matrix (matrix.ts); a critical indicator only with poor tolerance and a harm sign.
 */
import type { Finding, ToleranceFinding } from '../common/finding.js';
import type { Need, PhaseValue, Responsiveness, Tolerance, Verdict } from '../types.js';
import { ADVICE_MATRIX } from './matrix.js';
import type { AdviceAction, AdviceIndicator, AlternativeCode, HeadlineKey, MatrixRow, OrderRecommendation } from './types.js';

function unique<T>(xs: T[]): T[] {
  return [...new Set(xs)];
}

export function matrixRow(r: Verdict<Responsiveness>): MatrixRow {
  if (r.value === 'indeterminate') return 'indeterminate';
  if (r.confidence !== 'low') return r.value;
  return r.value === 'likely' ? 'likely-low' : 'unlikely-low';
}

export interface AdviseInput {
  responsiveness: Verdict<Responsiveness>;
  tolerance: Verdict<Tolerance>;
  need: Verdict<Need>;
  phase: Verdict<PhaseValue>;
  findings: readonly Finding[];
  orderFindings: readonly Finding[];
}

export function adviseOrder(a: AdviseInput): OrderRecommendation {
  const { responsiveness: r, tolerance: tol, need, phase } = a;
  const row = matrixRow(r);
  const entry = ADVICE_MATRIX[row][tol.value];
  const all = [...a.findings, ...a.orderFindings.filter((o) => !a.findings.includes(o))];
  const harm = all.filter((f): f is ToleranceFinding => f.topic === 'tolerance' && f.status === 'assessed' && f.harmSign);
  const critical = tol.value === 'poor' && harm.length > 0;
  // Nothing current to go on: no clinical finding rests on evidence, and some marker was set aside as stale.
  const onlyStale =
    !all.some((f) => f.status === 'assessed' && f.topic !== 'order' && f.topic !== 'phase' && f.evidence.length > 0) &&
    all.some((f) => f.topic !== 'order' && f.gap === 'stale');

  let action: AdviceAction = entry.action;
  let headline: HeadlineKey = `${row}/${tol.value}`;
  let alternatives: AlternativeCode[] = [...entry.alternatives];
  if (phase.value === 'early-resuscitation') {
    if (critical) {
      action = 'smaller-aliquot';
      headline = 'early/congestion';
      alternatives = ['smaller-aliquot', 'vasopressor'];
    } else {
      action = 'resuscitate-and-reassess';
      headline = row === 'unlikely' ? 'early/unlikely' : 'early/any';
      alternatives = row === 'unlikely' ? ['vasopressor', 'echo', 'cause'] : ['vasopressor'];
    }
  } else if (critical) {
    headline = `congestion/${r.value}`;
  } else if (need.value !== 'present' && (r.value === 'likely' || (r.value === 'indeterminate' && need.value === 'absent'))) {
    action = 'question-need';
    if (need.value === 'unknown') headline = 'need-unknown/responsive';
    else headline = r.value === 'likely' ? 'no-need/responsive' : 'no-need/untested';
    alternatives = ['perfusion-check'];
  } else if (onlyStale) {
    headline = 'stale-data/any';
  }

  const cautious = tol.value === 'limited' || tol.value === 'poor' || r.value === 'unlikely' || action === 'question-need';
  let indicator: AdviceIndicator = cautious ? 'warning' : 'info';
  if (critical) indicator = 'critical';

  const reasons: string[] = [r.rationale, tol.rationale, need.rationale, phase.rationale];
  if (critical) reasons.push(`Signs that volume is likely to harm: ${harm.map((f) => f.text).join('; ')}.`);
  for (const part of ['volume', 'volume-per-kg', 'intravascular-estimate'] as const) {
    const f = a.orderFindings.find((o) => o.topic === 'order' && o.part === part && o.status === 'assessed');
    if (f) reasons.push(f.text);
  }
  const unread = a.orderFindings.find((o) => o.topic === 'order' && o.part === 'volume' && o.status === 'not-assessed');
  if (unread) reasons.push(`Ordered volume not read: ${unread.reason ?? unread.text}.`);

  const ordered = a.orderFindings.find((o) => o.topic === 'order' && o.part === 'volume');
  const orderedClass = ordered?.topic === 'order' ? ordered.fluidClass : undefined;
  const orderedIsAlbumin = orderedClass === 'albumin-iso' || orderedClass === 'albumin-hyper';
  // The test is offered whenever the verdict is not of high confidence and there is a decision to make.
  const offerTest = action === 'test-first' || (action !== 'question-need' && r.confidence !== 'high');
  return {
    action,
    indicator,
    headline,
    reasons,
    alternatives: unique(alternatives.filter((x) => !(orderedIsAlbumin && x === 'albumin'))),
    ...(offerTest && r.nextTest ? { nextTest: r.nextTest } : {}),
    cell: `${row}/${tol.value}`,
    ...(r.confidence ? { confidence: r.confidence } : {}),
    need: need.value,
    phase: phase.value,
    toleranceAssessed: tol.value !== 'not-known',
    harmSigns: harm.map((f) => f.ruleId),
    decidingRules: unique([...r.decidingRules, ...tol.decidingRules, ...need.decidingRules, ...harm.map((f) => f.ruleId)]),
  };
}
