/**
 * Replay: re-run today's rules on a stored snapshot (at the stored `now`) and report what changed — the
 * verdicts, the recommendation, the indicator and which findings appeared, disappeared or changed. This is
 * how the informatics group sees the effect of a rule or threshold change on past advice. Pure.
 */
import { assess } from '../assess/assess.js';
import type { Thresholds } from '../assess/thresholds.js';
import type { Advice, Finding } from '../assess/types.js';
import type { StoredAdvice } from './types.js';

export interface ReplayDiff {
  adviceId: string;
  recordedRulesVersion: string;
  currentRulesVersion: string;
  changed: boolean;
  responsiveness: { then?: string; now?: string };
  tolerance: { then?: string; now?: string };
  action: { then?: string; now?: string };
  indicator: { then?: string; now?: string };
  findings: { added: string[]; removed: string[]; changed: Array<{ ruleId: string; then: string; now: string }> };
}

const key = (f: Finding) => `${f.ruleId}`;
const direction = (f: Finding) => (f.topic === 'responsiveness' ? f.direction : undefined);

export function replay(rec: StoredAdvice, thresholds: Thresholds, rulesVersion: string): ReplayDiff | undefined {
  if (!rec.snapshot || !rec.advice) return undefined;
  const then = rec.advice;
  const now: Advice = assess(rec.snapshot, new Date(rec.snapshot.now), thresholds, rulesVersion);
  const byThen = new Map(then.findings.map((f) => [key(f), f]));
  const byNow = new Map(now.findings.map((f) => [key(f), f]));
  const added = [...byNow.keys()].filter((k) => !byThen.has(k));
  const removed = [...byThen.keys()].filter((k) => !byNow.has(k));
  const changed: ReplayDiff['findings']['changed'] = [];
  for (const [k, f] of byNow) {
    const old = byThen.get(k);
    if (old && (old.text !== f.text || old.status !== f.status || direction(old) !== direction(f))) changed.push({ ruleId: k, then: old.text, now: f.text });
  }
  const pair = (a?: string, b?: string) => ({ ...(a ? { then: a } : {}), ...(b ? { now: b } : {}) });
  const diff: ReplayDiff = {
    adviceId: rec.id,
    recordedRulesVersion: rec.rulesVersion,
    currentRulesVersion: rulesVersion,
    changed: false,
    responsiveness: pair(then.responsiveness?.value, now.responsiveness?.value),
    tolerance: pair(then.tolerance?.value, now.tolerance?.value),
    action: pair(then.recommendation?.action, now.recommendation?.action),
    indicator: pair(then.recommendation?.indicator, now.recommendation?.indicator),
    findings: { added, removed, changed },
  };
  diff.changed =
    [diff.responsiveness, diff.tolerance, diff.action, diff.indicator].some((p) => p.then !== p.now) || added.length + removed.length + changed.length > 0;
  return diff;
}
