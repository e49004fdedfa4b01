/**
 * Replay: re-run today's rules on a stored snapshot (at the stored `now`) and report what changed — the
 * verdicts, the recommendation, the indicator and which findings appeared, disappeared or changed. This is
 * how the informatics group sees the effect of a rule or threshold change on past advice. Pure.
 */
import { assess } from '../assess/assess.js';
import type { Thresholds } from '../assess/thresholds.js';
import type { Advice, Finding } from '../assess/types.js';
import type { Catalogue } from '../cards/catalogue.js';
import { composeCards } from '../cards/compose.js';
import { renderCard } from '../cards/render.js';
import type { Card, HookName } from '../hooks/schemas.js';
import { findService } from '../hooks/services.js';
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

/** The advice today's (or candidate) rules give on the record's snapshot, at the stored `now`; undefined for a 412 record. */
export function reassess(rec: StoredAdvice, thresholds: Thresholds, rulesVersion: string): Advice | undefined {
  if (!rec.snapshot || !rec.advice) return undefined;
  return assess(rec.snapshot, new Date(rec.snapshot.now), thresholds, rulesVersion);
}

/** Placeholder base of the links in replayed cards: a replay is compared, never sent, so its links go nowhere. */
const REPLAY_URL = 'https://replay.tidemark.invalid';

/**
 * The advice and the cards the given rules and catalogue make from the record's snapshot, composed as the hook
 * call did (same hook, gathering outcomes, prefetch purposes and context). Pure apart from the cards' fresh uuids.
 */
export function rerun(
  rec: StoredAdvice,
  rules: { thresholds: Thresholds; rulesVersion: string; catalogue: Catalogue },
): { advice: Advice; cards: Array<{ kind: string; card: Card }> } | undefined {
  const advice = reassess(rec, rules.thresholds, rules.rulesVersion);
  if (!advice || !rec.snapshot) return undefined;
  const prefetch = findService(rec.service)?.prefetch ?? {};
  const models = composeCards({
    hook: rec.hook as HookName,
    advice,
    snapshot: rec.snapshot,
    gathering: rec.gathering,
    catalogue: rules.catalogue,
    purposes: Object.fromEntries(Object.entries(prefetch).map(([k, q]) => [k, q.purpose])),
    context: { patientId: rec.patientId ?? '', userId: rec.userId ?? '', ...(rec.encounterId ? { encounterId: rec.encounterId } : {}) },
  });
  return {
    advice,
    cards: models.map((m) => ({ kind: m.kind, card: renderCard(m, rules.catalogue, { hook: rec.hook, publicUrl: REPLAY_URL }) })),
  };
}

export function replay(rec: StoredAdvice, thresholds: Thresholds, rulesVersion: string): ReplayDiff | undefined {
  const now = reassess(rec, thresholds, rulesVersion);
  if (!now || !rec.advice) return undefined;
  const then = rec.advice;
  const byThen = new Map(then.findings.map((f) => [key(f), f]));
  const byNow = new Map(now.findings.map((f) => [key(f), f]));
  const added = [...byNow.keys()].filter((k) => !byThen.has(k));
  const removed = [...byThen.keys()].filter((k) => !byNow.has(k));
  const changed: ReplayDiff['findings']['changed'] = [];
  for (const [k, f] of byNow) {
    const old = byThen.get(k);
    if (old && (old.text !== f.text || old.status !== f.status || direction(old) !== direction(f)))
      changed.push({ ruleId: k, then: old.text, now: f.text });
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
    [diff.responsiveness, diff.tolerance, diff.action, diff.indicator].some((p) => p.then !== p.now) ||
    added.length + removed.length + changed.length > 0;
  return diff;
}
