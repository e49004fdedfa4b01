/**
 * Reading what Tidemark answered for a scenario (the cards, and the machine-readable verdicts kept in the audit
 * record: advice.responsiveness.value, advice.tolerance.value) and comparing it with the scenario's expectation.
 * Shared by the demo and the end-to-end tests so that both judge a match the same way.
 */
import type { ScenarioExpectation } from './types.js';

export interface ObservedVerdicts {
  /** null: the record has no responsiveness verdict. */
  responsiveness: string | null;
  /** null: the record has no tolerance verdict. */
  tolerance: string | null;
  /** The most severe card indicator, or 'no-card'. */
  indicator: string;
  /** advice.recommendation.action and .nextTest (null when absent). */
  action: string | null;
  nextTest: string | null;
}

interface VerdictLike {
  value?: unknown;
}
interface RecordLike {
  advice?: { responsiveness?: VerdictLike; tolerance?: VerdictLike; recommendation?: { action?: unknown; nextTest?: unknown } };
}

const SEVERITY = ['info', 'warning', 'critical'];

export function observedVerdicts(record: unknown, cards: ReadonlyArray<{ indicator?: unknown }>): ObservedVerdicts {
  const advice = (record as RecordLike | undefined)?.advice;
  const r = advice?.responsiveness;
  const t = advice?.tolerance;
  const tolerance = t && typeof t.value === 'string' ? t.value : null;
  const indicators = cards.map((c) => String(c.indicator)).sort((a, b) => SEVERITY.indexOf(b) - SEVERITY.indexOf(a));
  const rec = advice?.recommendation;
  return {
    responsiveness: r && typeof r.value === 'string' ? r.value : null,
    tolerance,
    indicator: indicators[0] ?? 'no-card',
    action: typeof rec?.action === 'string' ? rec.action : null,
    nextTest: typeof rec?.nextTest === 'string' ? rec.nextTest : null,
  };
}

/** The ways `observed` departs from `expected`; empty when it matches. */
export function mismatches(expected: ScenarioExpectation, observed: ObservedVerdicts): string[] {
  const out: string[] = [];
  if (expected.indicator !== observed.indicator) out.push(`indicator ${observed.indicator}, expected ${expected.indicator}`);
  if (expected.responsiveness !== null && expected.responsiveness !== observed.responsiveness) {
    out.push(`responsiveness ${observed.responsiveness ?? 'not given'}, expected ${expected.responsiveness}`);
  }
  if (expected.tolerance !== null) {
    // "not-known" also matches a record that leaves the tolerance verdict out while giving a responsiveness verdict.
    const ok =
      expected.tolerance === observed.tolerance ||
      (expected.tolerance === 'not-known' && observed.tolerance === null && observed.responsiveness !== null);
    if (!ok) out.push(`tolerance ${observed.tolerance ?? 'not given'}, expected ${expected.tolerance}`);
  }
  if (expected.action !== undefined && expected.action !== observed.action)
    out.push(`action ${observed.action ?? 'none'}, expected ${expected.action}`);
  if (expected.nextTest !== undefined && expected.nextTest !== observed.nextTest)
    out.push(`test offered ${observed.nextTest ?? 'none'}, expected ${expected.nextTest ?? 'none'}`);
  return out;
}

export function expectationText(e: ScenarioExpectation): string {
  return e.indicator === 'no-card' ? 'no card' : `${e.responsiveness ?? '-'}/${e.tolerance ?? '-'}/${e.indicator}`;
}
