/**
 * The one Rule shape and the one runner. A rule is a pure function of a context (snapshot, now, thresholds)
 * returning its findings; a rule that throws is caught once, recorded in ruleErrors with its id, leaves a
 * not-assessed finding of its topic, and the other rules still count.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { EvidenceEvent } from './events.js';
import type { Finding } from './finding.js';
import type { Windows } from './windows.js';

export interface RuleContext<T> {
  snapshot: PatientSnapshot;
  now: Date;
  /** The rule group's own thresholds. */
  t: T;
  /** The shared windows (windows.ts). */
  w: Windows;
  /** Events that make dynamic evidence old, newest first (events.ts). */
  events: readonly EvidenceEvent[];
}

export interface Rule<T, F extends Finding = Finding> {
  id: string;
  run: (ctx: RuleContext<T>) => F | F[];
  /** The not-assessed finding to stand in for the rule when it throws. */
  onError: (message: string) => F;
}

export interface RuleError {
  ruleId: string;
  message: string;
}

export function runRules<T, F extends Finding>(
  rules: readonly Rule<T, F>[],
  ctx: RuleContext<T>,
): { findings: F[]; ruleErrors: RuleError[] } {
  const findings: F[] = [];
  const ruleErrors: RuleError[] = [];
  for (const rule of rules) {
    try {
      const out = rule.run(ctx);
      if (Array.isArray(out)) findings.push(...out);
      else findings.push(out);
    } catch (e) {
      const message = (e instanceof Error ? e.message : String(e)).slice(0, 300);
      ruleErrors.push({ ruleId: rule.id, message });
      findings.push(rule.onError(message));
    }
  }
  return { findings, ruleErrors };
}

/** Runs one function with the same isolation, for the steps of assess() that are not marker rules. */
export function guarded<R>(id: string, errors: RuleError[], fn: () => R): R | undefined {
  try {
    return fn();
  } catch (e) {
    errors.push({ ruleId: id, message: String((e as Error)?.message ?? e).slice(0, 300) });
    return undefined;
  }
}
