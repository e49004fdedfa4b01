/**
 * What would change the advice (issue: counterfactual next step). For each of the four tests the advice can offer,
 * in the engine's order of preference (decisive.ts): is it feasible for this patient (feasibility.ts), and if so,
 * what would a positive and a negative result at its published threshold (hypothetical.ts) do to the verdict and
 * the recommendation? The engine itself is re-run on a copy of the snapshot with the hypothetical result added;
 * it is passed in (`rerun`) so that this folder does not import assess.ts, and the re-run never computes a what-if
 * of its own. Pure: no I/O, no clock; the input snapshot is never changed.
 */
import type { DynamicTestResult, PatientSnapshot } from '../../snapshot/types.js';
import type { RuleContext } from '../responsiveness/context.js';
import type { Advice } from '../types.js';
import { decisiveTest, preferenceOrder } from './decisive.js';
import { feasibility, sharedChecks } from './feasibility.js';
import { hypotheticalResult } from './hypothetical.js';
import type { WhatIf, WhatIfOutcome, WhatIfRow } from './types.js';

export { NOT_FEASIBLE, type NotFeasible, type WhatIf, type WhatIfOutcome, type WhatIfRow } from './types.js';
export { WHAT_IF_REF_PREFIX } from './hypothetical.js';

export interface WhatIfInput {
  /** The responsiveness context of the current snapshot (snapshot, now, responsiveness thresholds, windows, events). */
  ctx: RuleContext;
  /** The current advice, without a what-if. */
  advice: Advice;
  /**
   * The engine without the what-if step, at the same `now` and thresholds, on `s`: the current snapshot with the
   * dynamic test result `added` put in and nothing else changed.
   */
  rerun: (s: PatientSnapshot, added: DynamicTestResult) => Advice;
}

export function computeWhatIf({ ctx, advice, rerun }: WhatIfInput): WhatIf {
  const current = advice.responsiveness;
  const shared = sharedChecks(ctx);
  const rows: WhatIfRow[] = preferenceOrder(current?.nextTest).map((test) => {
    const f = feasibility(test, ctx, advice.findings, shared);
    if (f.notFeasible.length || !f.measured) return { test, feasible: false, notFeasible: f.notFeasible, outcomes: [] };
    const measured = f.measured;
    let source: string | undefined;
    const outcomes = (['positive', 'negative'] as const).map((result): WhatIfOutcome => {
      const h = hypotheticalResult(ctx, test, measured, result);
      source = h.source;
      const s: PatientSnapshot = { ...ctx.snapshot, dynamicTests: [h.result, ...ctx.snapshot.dynamicTests] };
      const after = rerun(s, h.result);
      const r = after.responsiveness;
      if (!r) throw new Error(`the re-run with a hypothetical ${test} gave no responsiveness verdict`);
      const rec = after.recommendation;
      const changes = r.value !== current?.value || rec?.action !== advice.recommendation?.action;
      return {
        result,
        assumed: h.assumed,
        responsiveness: r.value,
        ...(r.confidence ? { confidence: r.confidence } : {}),
        ...(rec ? { action: rec.action, headline: rec.headline } : {}),
        changes,
      };
    });
    return { test, feasible: true, notFeasible: [], outcomes, ...(source ? { source } : {}) };
  });
  const decisive = decisiveTest(rows, current?.confidence);
  return { rows, ...(decisive ? { decisive } : {}) };
}
