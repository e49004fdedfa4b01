/**
 * assess(): the pure core. A function of (snapshot, now, thresholds, rulesVersion):
 * responsiveness engine, tolerance engine, the reading of each selected fluid order, and the advice matrix
 * that joins them. Failures are isolated (conventions §6): a group that throws is recorded in ruleErrors and
 * the other findings still count.
 */
import type { PatientSnapshot } from '../snapshot/types.js';
import { adviseOrder } from './advice/index.js';
import { describeOrder } from './order/index.js';
import { assessResponsiveness } from './responsiveness/index.js';
import type { Thresholds } from './thresholds.js';
import { assessTolerance } from './tolerance/index.js';
import type { Advice, Finding } from './types.js';

export function assess(s: PatientSnapshot, now: Date, t: Thresholds, rulesVersion: string): Advice {
  const findings: Finding[] = [];
  const ruleErrors: Advice['ruleErrors'] = [];
  const advice: Advice = { rulesVersion, now: now.toISOString(), findings, ruleErrors };
  const guard = <T>(id: string, fn: () => T): T | undefined => {
    try {
      return fn();
    } catch (e) {
      ruleErrors.push({ ruleId: id, message: String((e as Error)?.message ?? e).slice(0, 300) });
      return undefined;
    }
  };

  const r = guard('responsiveness', () => assessResponsiveness(s, now, t.responsiveness));
  if (r) {
    findings.push(...r.findings);
    ruleErrors.push(...r.ruleErrors);
    advice.responsiveness = r.verdict;
  }
  const tol = guard('tolerance', () => assessTolerance(s, now, t.tolerance));
  if (tol) {
    findings.push(...tol.findings);
    ruleErrors.push(...tol.ruleErrors);
    // With no limiting marker assessed, 'adequate' would mean "unknown": leave the verdict unset.
    if (tol.coverage.assessed > 0) advice.tolerance = tol.verdict;
  }

  const orders = s.draftOrders.filter((o) => o.selected && o.isFluid);
  if (orders.length) {
    const orderFindings = guard('order', () => {
      const out: Finding[] = [];
      for (const o of orders) out.push(...describeOrder(o, s, now, t.order));
      return out;
    });
    if (orderFindings) findings.push(...orderFindings);
    if (r && tol) {
      const rec = guard('advice', () => adviseOrder(r.verdict, tol.verdict, orderFindings ?? [], findings));
      if (rec) advice.recommendation = rec;
    }
  }
  return advice;
}
