/**
 * The two scenarios that chart lung ultrasound per side, read through the real snapshot reader and the pure core:
 * the critical card of 02 must rest on its bilateral B-pattern (diffuse interstitial syndrome, ≥ 2 positive regions
 * on each side: Volpicelli G et al., Intensive Care Med 2012;38:577), and 16's one-sided pattern must be no harm sign.
 */
import type { FhirResource, Observation } from 'fhir/r4.js';
import { describe, expect, it } from 'vitest';
import { scenario as s02 } from '../../examples/scenarios/02-responder-poor-tolerance.js';
import { scenario as s16 } from '../../examples/scenarios/16-one-sided-lung-ultrasound.js';
import type { Scenario } from '../../examples/scenarios/types.js';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import { TIDEMARK_MARKERS } from '../../src/fhir/codes.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';

const NOW = new Date('2026-11-20T14:00:00Z');

function advise(s: Scenario, resources?: FhirResource[]) {
  const built = s.build(NOW);
  const snap = buildSnapshot(
    resources ?? built.resources,
    {
      patientId: s.patientId,
      encounterId: s.encounterId,
      ...(built.hook === 'order-select' ? { selections: built.selections } : {}),
      draftOrders: { entry: built.draftOrders.map((resource) => ({ resource })) },
    },
    NOW,
  );
  const advice = assess(snap, NOW, resolveThresholds({}), 'test');
  const lus = advice.findings.find((f) => f.ruleId === 'tolerance.lung-ultrasound');
  return { snap, advice, lus };
}

describe('scenarios charting lung ultrasound per side', () => {
  it('02: 2 of 4 left and 3 of 4 right → diffuse, a harm sign; poor tolerance and the critical indicator rest on it', () => {
    const { snap, advice, lus } = advise(s02);
    expect(snap.measurements.filter((m) => m.kind.startsWith('bLineRegions')).map((m) => [m.kind, m.value])).toEqual([
      ['bLineRegionsLeft', 2],
      ['bLineRegionsRight', 3],
    ]);
    expect(lus).toMatchObject({ status: 'assessed', limit: 'severe', harmSign: true, values: { pattern: 'diffuse' } });
    expect(advice.tolerance?.value).toBe('poor');
    expect(advice.recommendation?.indicator).toBe('critical');
    // The lung finding is the only harm sign: without it the card would not be critical.
    expect(advice.recommendation?.harmSigns).toEqual(['tolerance.lung-ultrasound']);
  });
  it('02 without the side (the same 5 regions as one whole-chest count) is poor but a warning, not critical', () => {
    const built = s02.build(NOW);
    const perSide = (r: FhirResource): r is Observation =>
      r.resourceType === 'Observation' && (r.code.coding ?? []).some((c) => c.code?.startsWith('lung-us-b-regions-'));
    const [left] = built.resources.filter(perSide);
    const whole: Observation = {
      ...left!,
      id: 'rpt-blines-whole',
      code: { coding: [{ system: TIDEMARK_MARKERS, code: 'lung-us-b-regions' }] },
      valueQuantity: { value: 5, unit: '{regions}', system: 'http://unitsofmeasure.org', code: '{regions}' },
    };
    const { advice, lus } = advise(s02, [...built.resources.filter((r) => !perSide(r)), whole]);
    expect(lus).toMatchObject({ limit: 'moderate', harmSign: false, values: { bLineRegions: 5, sideRecorded: false } });
    expect(advice.tolerance?.value).toBe('poor');
    expect(advice.recommendation?.harmSigns).toEqual([]);
    expect(advice.recommendation?.indicator).toBe('warning');
  });
  it('16: 0 of 4 left and 4 of 4 right, charted as the whole-chest code with a one-lung bodySite → one-sided, moderate, no harm sign', () => {
    const { snap, advice, lus } = advise(s16);
    expect(snap.measurements.filter((m) => m.kind.startsWith('bLineRegions')).map((m) => [m.kind, m.value])).toEqual([
      ['bLineRegionsLeft', 0],
      ['bLineRegionsRight', 4],
    ]);
    expect(lus).toMatchObject({ status: 'assessed', limit: 'moderate', harmSign: false, values: { pattern: 'one-sided' } });
    expect(advice.tolerance?.value).toBe('limited');
    expect(advice.recommendation?.harmSigns).toEqual([]);
    expect(advice.recommendation?.indicator).toBe('warning');
  });
});
