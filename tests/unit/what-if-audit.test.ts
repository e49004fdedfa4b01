/**
 * The what-if in the audit tools: a record stored before Advice.whatIf existed (its advice without one) replays and
 * compares as unchanged under the same rules, in the replay diff and in the impact report's comparable outcome,
 * for every demo scenario (invented patients) — the what-if adds no spurious change.
 */
import { describe, expect, it } from 'vitest';
import { SCENARIOS, serviceIdFor } from '../../examples/scenarios/index.js';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import { ImpactTally } from '../../src/audit/impact.js';
import { outcomeOf } from '../../src/audit/outcome.js';
import { replay, rerun } from '../../src/audit/replay.js';
import type { StoredAdvice } from '../../src/audit/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';

const NOW = new Date('2026-11-20T14:00:00Z');
const T = resolveThresholds({});
const VERSION = 'test';
const catalogue = loadCatalogue().catalogue;

function records(): StoredAdvice[] {
  return SCENARIOS.map((s, i) => {
    const built = s.build(NOW);
    const snapshot = buildSnapshot(
      built.resources,
      {
        patientId: s.patientId,
        encounterId: s.encounterId,
        ...(built.hook === 'order-select' ? { selections: built.selections } : {}),
        draftOrders: { entry: built.draftOrders.map((resource) => ({ resource })) },
      },
      NOW,
    );
    const full = assess(snapshot, NOW, T, VERSION);
    const { whatIf: _dropped, ...old } = full;
    const base: StoredAdvice = {
      id: `rec-${i}`,
      recordedAt: NOW.toISOString(),
      service: serviceIdFor(built.hook),
      hook: built.hook,
      hookInstance: `h-${i}`,
      patientId: s.patientId,
      outcome: 'answered',
      rulesVersion: VERSION,
      snapshot,
      findings: old.findings,
      advice: old,
      cards: [],
      cardKinds: {},
      gathering: [],
      timings: { totalMs: 0, gatherMs: 0, fhirWaitMs: 0, assessMs: 0 },
      seq: i + 1,
      hash: '',
      format: 1,
      prevHash: '',
    };
    const r = rerun(base, { thresholds: T, rulesVersion: VERSION, catalogue })!;
    return { ...base, cards: r.cards.map((c) => c.card), cardKinds: Object.fromEntries(r.cards.map((c) => [c.card.uuid ?? '', c.kind])) };
  });
}

describe('what-if and the audit tools', () => {
  const recs = records();

  it('the scenarios do carry a what-if now, and their stored advice (as an older record) does not', () => {
    expect(recs.every((r) => r.advice && !('whatIf' in r.advice))).toBe(true);
    expect(recs.filter((r) => assess(r.snapshot!, NOW, T, VERSION).whatIf).length).toBeGreaterThan(15);
  });

  it('replay under the same rules: no change', () => {
    for (const r of recs) expect(replay(r, T, VERSION)?.changed, r.id).toBe(false);
  });

  it('the comparable outcome ignores the what-if, and the impact report counts every record unchanged', () => {
    for (const r of recs) {
      const now = assess(r.snapshot!, NOW, T, VERSION);
      expect(outcomeOf(now, [])).toEqual(outcomeOf(r.advice, []));
    }
    const tally = new ImpactTally({ thresholds: T, catalogue, rulesVersion: VERSION });
    for (const r of recs) tally.add(r);
    const report = tally.report();
    expect(report.replayed).toBe(recs.length);
    expect(report.unchanged).toBe(recs.length);
    expect(report.changed.any).toBe(0);
  });
});
