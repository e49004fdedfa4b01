/**
 * Which test would settle it: the first feasible test, in the engine's order of preference, whose positive or
 * negative result changes the responsiveness verdict or the recommended action. The order: the test the engine
 * offers for this patient (chooseNextTest, next-test.ts: the verdict's nextTest) first, then the others in the
 * order of NEXT_TESTS.
 *
 * A verdict of high confidence (a fresh flow test decided it) is already settled: a second test that disagreed
 * would only make it indeterminate (a conflict of dynamic evidence, combine.ts), and the advice offers no test then
 * (advise-order.ts). Its rows still say what each result would do, but no test is decisive.
 */
import { NEXT_TESTS, type Confidence, type NextTestKind } from '../types.js';
import type { WhatIfRow } from './types.js';

export function preferenceOrder(first: NextTestKind | undefined): NextTestKind[] {
  return first ? [first, ...NEXT_TESTS.filter((t) => t !== first)] : [...NEXT_TESTS];
}

/** `rows` in the order of preference; `confidence` that of the current verdict. */
export function decisiveTest(rows: readonly WhatIfRow[], confidence: Confidence | undefined): NextTestKind | undefined {
  if (confidence === 'high') return undefined;
  return rows.find((r) => r.feasible && r.outcomes.some((o) => o.changes))?.test;
}
