/**
 * assess(): the pure core. A function of (snapshot, now, thresholds, rulesVersion):
 *   need/            is there anything to treat, and which phase of fluid therapy;
 *   responsiveness/  likely | unlikely | indeterminate, with its confidence and the test that would settle it;
 *   tolerance/       adequate | limited | poor | not known (a CVP that decided responsiveness counts once);
 *   order/           the reading of each selected fluid order;
 *   advice/          the matrix that joins them, in codes;
 *   what-if/         what a positive or negative result of each feasible test would do to the verdict and advice
 *                    (the engine re-run on a copy of the snapshot with the result added, re-doing only what that
 *                    result can change; the re-runs compute no what-if of their own).
 * All on the common rule core (common/). Failures are isolated: a group that throws is recorded in
 * ruleErrors and the other findings still count.
 */
import type { DynamicTestKind } from '../fhir/codes.js';
import type { PatientSnapshot } from '../snapshot/types.js';
import { adviseOrder } from './advice/index.js';
import { evidenceEvents } from './common/events.js';
import type { Finding, SharedNumber } from './common/finding.js';
import { guarded, type RuleContext } from './common/rule.js';
import { assessNeed } from './need/index.js';
import { describeOrder } from './order/index.js';
import { reassessWithDynamicTest, runResponsiveness, type ResponsivenessRun } from './responsiveness/index.js';
import type { Thresholds } from './thresholds.js';
import { runToleranceRules, toleranceOfRun, type ToleranceRun } from './tolerance/index.js';
import type { Advice } from './types.js';
import { computeWhatIf } from './what-if/index.js';

export interface AssessOptions {
  /** Compute Advice.whatIf (default true). The what-if's own re-runs pass false. */
  whatIf?: boolean;
}

export function assess(s: PatientSnapshot, now: Date, t: Thresholds, rulesVersion: string, opts: AssessOptions = {}): Advice {
  const reuse: Reuse = { tolerance: new Map() };
  const advice = assessOnce(s, now, t, rulesVersion, reuse);
  if (advice.responsiveness && opts.whatIf !== false) {
    const w = guarded('what-if', advice.ruleErrors, () => {
      // The events of this run when they were read (else read again, and the what-if fails as that step did).
      const events = reuse.events ?? evidenceEvents(s, now, t.windows.fluidEventMinMl);
      return computeWhatIf({
        ctx: { snapshot: s, now, t: t.responsiveness, w: t.windows, events },
        advice,
        // A what-if adds one dynamic test result and nothing else, and only responsiveness reads dynamic tests, only
        // the rule of that kind of test among its rules: the re-run takes the events, need, phase and order findings
        // of this run as they are, the other responsiveness rules' findings and the test offered, and the tolerance
        // of this run when the numbers counted once come out the same (tests/property/what-if.property.test.ts
        // checks every outcome against a full independent re-run).
        rerun: (x, added) => assessOnce(x, now, t, rulesVersion, reuse, added.kind),
      });
    });
    if (w) advice.whatIf = w;
  }
  return advice;
}

/** What a what-if re-run takes from the run it varies (see assess); filled by that run. */
interface Reuse {
  /** The events, when they were read without error. */
  events?: ReturnType<typeof evidenceEvents>;
  need?: { value: ReturnType<typeof assessNeed> | undefined };
  responsiveness?: ResponsivenessRun;
  /** The tolerance rules' run (it does not depend on the numbers counted once). */
  toleranceRules?: ToleranceRun;
  /** Tolerance by the numbers counted once (their sorted list). */
  tolerance: Map<string, ReturnType<typeof toleranceOfRun> | undefined>;
  orderFindings?: Finding[];
}

/**
 * The engine without the what-if step. `added`: set in a what-if re-run, the kind of the dynamic test result that `s`
 * adds to the snapshot of the run that filled `reuse`.
 */
function assessOnce(s: PatientSnapshot, now: Date, t: Thresholds, rulesVersion: string, reuse: Reuse, added?: DynamicTestKind): Advice {
  const rerun = added !== undefined;
  const findings: Finding[] = [];
  const ruleErrors: Advice['ruleErrors'] = [];
  const advice: Advice = { rulesVersion, now: now.toISOString(), findings, ruleErrors };
  const read =
    rerun && reuse.events ? reuse.events : guarded('events', ruleErrors, () => evidenceEvents(s, now, t.windows.fluidEventMinMl));
  if (!rerun && read) reuse.events = read;
  const events = read ?? [];
  const ctx = <T>(x: T): RuleContext<T> => ({ snapshot: s, now, t: x, w: t.windows, events });

  const tol = t.tolerance;
  const need = rerun && reuse.need ? reuse.need.value : assessNeedOf();
  if (!rerun) reuse.need = { value: need };
  function assessNeedOf() {
    return guarded('need', ruleErrors, () =>
      assessNeed(
        ctx({
          ...t.need,
          weightMaxAgeHours: tol.weightMaxAgeHours,
          admissionWeightWindowHours: tol.admissionWeightWindowHours,
          balanceFallbackLookbackHours: tol.balanceFallbackLookbackHours,
          urinePointMaxGapMinutes: tol.urinePointMaxGapMinutes,
          urineRecencyMinutes: tol.urineRecencyMinutes,
          urineCoverageFraction: tol.urineCoverageFraction,
        }),
      ),
    );
  }
  if (need) {
    findings.push(...need.findings);
    ruleErrors.push(...need.ruleErrors);
    advice.need = need.need;
    if (need.phase) advice.phase = need.phase;
  }

  const base = rerun ? reuse.responsiveness : undefined;
  const r = guarded('responsiveness', ruleErrors, () =>
    base && added ? reassessWithDynamicTest(base, ctx(t.responsiveness), added) : runResponsiveness(ctx(t.responsiveness)),
  );
  if (!rerun && r) reuse.responsiveness = r;
  if (r) {
    findings.push(...r.findings);
    ruleErrors.push(...r.ruleErrors);
    advice.responsiveness = r.verdict;
  }
  // A number counts once: the shared numbers of the findings that decided responsiveness.
  const counted: SharedNumber[] = r
    ? [
        ...new Set(
          r.findings
            .filter((f) => r.verdict.decidingRules.includes(f.ruleId) && r.verdict.value !== 'indeterminate')
            .flatMap((f) => f.uses ?? []),
        ),
      ]
    : [];
  const countedKey = [...counted].sort().join('|');
  const tv = reuse.tolerance.has(countedKey)
    ? reuse.tolerance.get(countedKey)
    : guarded('tolerance', ruleErrors, () => toleranceOfRun((reuse.toleranceRules ??= runToleranceRules(ctx(t.tolerance))), tol, counted));
  reuse.tolerance.set(countedKey, tv);
  if (tv) {
    findings.push(...tv.findings);
    ruleErrors.push(...tv.ruleErrors);
    advice.tolerance = tv.verdict;
  }

  const orders = s.draftOrders.filter((o) => o.selected && o.isFluid);
  if (orders.length) {
    const orderFindings =
      rerun && reuse.orderFindings
        ? reuse.orderFindings
        : (guarded('order', ruleErrors, () => orders.flatMap((o) => describeOrder(o, s, now, t.order))) ?? []);
    if (!rerun) reuse.orderFindings = orderFindings;
    findings.push(...orderFindings);
    if (r && tv && need && need.phase) {
      const rec = guarded('advice', ruleErrors, () =>
        adviseOrder({
          responsiveness: r.verdict,
          tolerance: tv.verdict,
          need: need.need,
          phase: need.phase!,
          findings,
          orderFindings,
        }),
      );
      if (rec) advice.recommendation = rec;
    }
  }
  return advice;
}
