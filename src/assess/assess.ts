/**
 * assess(): the pure core. A function of (snapshot, now, thresholds, rulesVersion) that runs every rule
 * group, isolating failures (one rule throwing is recorded and the others still count, conventions §6).
 */
import type { PatientSnapshot } from '../snapshot/types.js';
import { assessPerfusion } from './perfusion.js';
import type { Thresholds } from './thresholds.js';
import type { Advice, Finding } from './types.js';

interface RuleGroup {
  id: string;
  run: (s: PatientSnapshot, now: Date, t: Thresholds) => Finding[];
}

const GROUPS: RuleGroup[] = [{ id: 'perfusion', run: (s, _now, t) => assessPerfusion(s, t.perfusion) }];

export function assess(s: PatientSnapshot, now: Date, t: Thresholds, rulesVersion: string): Advice {
  const findings: Finding[] = [];
  const ruleErrors: Advice['ruleErrors'] = [];
  for (const g of GROUPS) {
    try {
      findings.push(...g.run(s, now, t));
    } catch (e) {
      ruleErrors.push({ ruleId: g.id, message: (e as Error).message?.slice(0, 300) ?? 'error' });
    }
  }
  return { rulesVersion, now: now.toISOString(), findings, ruleErrors };
}
