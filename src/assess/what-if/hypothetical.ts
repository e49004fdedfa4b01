/**
 * The hypothetical result of one test at `now`, judged by the rule's own read-out (threshold from the site's
 * Thresholds object, ≥ or > as the rule reads it, its published source in the rule's spec):
 *   positive — just past the threshold: threshold + POSITIVE_MARGIN (so that it is positive for ≥ and > alike);
 *   negative — clearly below it: the smaller of half the threshold and threshold − POSITIVE_MARGIN.
 * The baseline is the patient's own newest reading of the variable when there is one, else a typical adult value;
 * only the change is judged. The reference starts "what-if#", so it can never be taken for a FHIR id.
 */
import { DYNAMIC_MEASURED_UNITS, type DynamicMeasured, type NumericKind } from '../../fhir/codes.js';
import type { DynamicTestResult } from '../../snapshot/types.js';
import { readings } from '../common/select.js';
import type { RuleContext } from '../responsiveness/context.js';
import type { ReadOut } from '../responsiveness/dynamic-test.js';
import type { NextTestKind } from '../types.js';
import { TEST_SPECS } from './test-specs.js';
import type { WhatIfOutcome } from './types.js';

/** How far past the threshold a positive result is put: 1 % for relative read-outs, 0.5 points for PPV/SVV (our choice). */
export const POSITIVE_MARGIN: Record<ReadOut['compare'], number> = { relative: 1, absolute: 0.5 };

/**
 * Typical adult baselines when the patient has no reading of the variable (common practice; only the change is
 * judged, so they do not affect the result): CO 5 L/min, CI 3 L/min/m², SV 70 mL, LVOT VTI 20 cm, pulse pressure
 * 40 mmHg, PPV/SVV 8 %.
 */
const TYPICAL: Record<DynamicMeasured, number> = {
  cardiacOutput: 5,
  cardiacIndex: 3,
  strokeVolume: 70,
  vti: 20,
  pulsePressure: 40,
  ppv: 8,
  svv: 8,
};

/** Measured variables that are also numeric readings of the snapshot (their newest value is the baseline). */
const AS_READING: Partial<Record<DynamicMeasured, NumericKind>> = {
  cardiacOutput: 'cardiacOutput',
  cardiacIndex: 'cardiacIndex',
  strokeVolume: 'strokeVolume',
  ppv: 'ppv',
  svv: 'svv',
};

export const WHAT_IF_REF_PREFIX = 'what-if#';

/** The change a positive or negative result is put at, for one read-out. */
export function hypotheticalChange(readOut: Pick<ReadOut, 'compare' | 'threshold'>, result: WhatIfOutcome['result']): number {
  const m = POSITIVE_MARGIN[readOut.compare];
  return result === 'positive' ? readOut.threshold + m : Math.min(readOut.threshold / 2, readOut.threshold - m);
}

function baseline(ctx: RuleContext, measured: DynamicMeasured, compare: ReadOut['compare']): number {
  const kind = AS_READING[measured];
  const newest = kind ? readings(ctx.snapshot, kind, ctx.now).items[0]?.value : undefined;
  // A relative change needs a positive baseline; an absolute one (PPV, SVV) any finite value.
  if (newest !== undefined && Number.isFinite(newest) && (compare === 'absolute' || newest > 0)) return newest;
  return TYPICAL[measured];
}

const round = (x: number, d: number) => Math.round(x * 10 ** d) / 10 ** d;

export interface Hypothetical {
  result: DynamicTestResult;
  assumed: WhatIfOutcome['assumed'];
  source: string;
}

export function hypotheticalResult(
  ctx: RuleContext,
  test: NextTestKind,
  measured: DynamicMeasured,
  result: WhatIfOutcome['result'],
): Hypothetical {
  const entry = TEST_SPECS[test];
  const readOut = entry.spec(ctx.t).readOuts[measured];
  if (!readOut) throw new Error(`${test} has no read-out on ${measured}`);
  const change = hypotheticalChange(readOut, result);
  // Not rounded: the margin is far larger than the floating-point error of the rule's own arithmetic.
  const before = baseline(ctx, measured, readOut.compare);
  const after = readOut.compare === 'relative' ? before * (1 + change / 100) : before + change;
  const unit = DYNAMIC_MEASURED_UNITS[measured];
  const d: DynamicTestResult = {
    kind: entry.kind,
    measured,
    before,
    after,
    unit,
    effective: ctx.now.toISOString(),
    ageMinutes: 0,
    ref: `${WHAT_IF_REF_PREFIX}${test}-${result}`,
  };
  const assumed: WhatIfOutcome['assumed'] = {
    measured,
    unit,
    threshold: readOut.threshold,
    strict: readOut.strict,
    ...(readOut.compare === 'relative' ? { changePercent: round(change, 2) } : { changeAbsolute: round(change, 2) }),
  };
  return { result: d, assumed, source: readOut.source };
}
