/** Findings, verdicts and advice: what the pure core returns. Plain JSON, stored in the audit record. */
import type { OrderRecommendation } from './advice/types.js';
import type { Finding } from './common/finding.js';
import type { RuleError } from './common/rule.js';
import type { WhatIf } from './what-if/types.js';
import type { Confidence, Need, NextTestKind, PhaseValue, Responsiveness, Tolerance } from './common/verdicts.js';

export {
  NEXT_TESTS,
  type Confidence,
  type Need,
  type NextTestKind,
  type PhaseValue,
  type Responsiveness,
  type Tolerance,
} from './common/verdicts.js';

export type {
  Direction,
  Evidence,
  Figures,
  Finding,
  FindingTopic,
  Freshness,
  GapKind,
  Marker,
  NeedSign,
  OrderFinding,
  PerfusionFinding,
  Phase,
  PhaseFinding,
  ResponsivenessFinding,
  SharedNumber,
  Tier,
  ToleranceDomain,
  ToleranceFinding,
  ToleranceLimit,
} from './common/finding.js';

export interface Verdict<V extends string> {
  value: V;
  /** One sentence: why this verdict. */
  rationale: string;
  /** Rule ids of the findings that decided it. */
  decidingRules: string[];
  /** Responsiveness: the tier that decided it. */
  confidence?: Confidence;
  /** Responsiveness: the test that would settle or confirm it. */
  nextTest?: NextTestKind;
  /** Conditions assumed because they were not charted (e.g. chest closed, IAP normal). */
  assumptions?: string[];
  /** Tolerance: markers assessed and markers in all. */
  coverage?: { assessed: number; total: number };
}

export interface Advice {
  rulesVersion: string;
  now: string;
  findings: Finding[];
  responsiveness?: Verdict<Responsiveness>;
  tolerance?: Verdict<Tolerance>;
  need?: Verdict<Need>;
  phase?: Verdict<PhaseValue>;
  /** For order hooks with a fluid bolus selected: what the advice matrix recommends. */
  recommendation?: OrderRecommendation;
  /** What the result of each feasible responsiveness test would do to the advice (src/assess/what-if/). */
  whatIf?: WhatIf;
  /** Errors raised by single rules; the other findings still count. */
  ruleErrors: RuleError[];
}
