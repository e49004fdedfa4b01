/**
 * Properties of the what-if (fast-check, invented data): over random heart–lung states, monitors, earlier tests,
 * tolerance markers and orders,
 *  1. assess() never changes the snapshot it is given;
 *  2. every outcome agrees with an independent re-run: the test's hypothetical result, rebuilt here from the outcome's
 *     assumed change (on a baseline of our own: only the change is judged), put into a copy of the snapshot and
 *     assessed without a what-if, gives the outcome's verdict, confidence, action and headline; so an outcome with
 *     `changes: false` really has the verdict and action of the current advice, and one with `changes: true` really
 *     differs;
 *  3. the hypothetical is judged as meant: a positive result points to responsiveness, a negative one against;
 *  4. decisive is the first feasible row (in the engine's order, the offered test first) with a change, and is absent
 *     when the current verdict is of high confidence;
 *  5. raised IAP (≥ 12 mmHg, WSACS 2013) never leaves the leg raise feasible; spontaneous breathing never leaves the
 *     occlusion test or the tidal volume challenge feasible.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import type { Advice } from '../../src/assess/types.js';
import type { WhatIfOutcome, WhatIfRow } from '../../src/assess/what-if/types.js';
import type { DynamicMeasured, DynamicTestKind } from '../../src/fhir/codes.js';
import type { DynamicTestResult, PatientSnapshot } from '../../src/snapshot/types.js';
import { DYNAMIC_MEASURED_UNITS, SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = resolveThresholds({});
const RUNS = Number(process.env.WHAT_IF_PROP_RUNS ?? 60);

const KIND_OF: Record<WhatIfRow['test'], DynamicTestKind> = {
  'passive-leg-raise': 'plr',
  'mini-fluid-challenge': 'miniFluidChallenge',
  'end-expiratory-occlusion': 'endExpiratoryOcclusion',
  'tidal-volume-challenge': 'tidalVolumeChallenge',
};
const RULE_OF: Record<WhatIfRow['test'], string> = {
  'passive-leg-raise': 'responsiveness.plr',
  'mini-fluid-challenge': 'responsiveness.mini-fluid-challenge',
  'end-expiratory-occlusion': 'responsiveness.end-expiratory-occlusion',
  'tidal-volume-challenge': 'responsiveness.tidal-volume-challenge',
};
const TESTS: Record<DynamicTestKind, DynamicMeasured[]> = {
  plr: ['cardiacOutput', 'pulsePressure', 'vti'],
  miniFluidChallenge: ['vti', 'strokeVolume'],
  endExpiratoryOcclusion: ['cardiacIndex', 'vti'],
  tidalVolumeChallenge: ['ppv'],
};

const stateArb = fc.record({
  sex: fc.constantFrom('male', 'female', 'unknown') as fc.Arbitrary<'male' | 'female' | 'unknown'>,
  mode: fc.option(fc.constantFrom('controlled-no-effort', 'controlled-no-effort', 'controlled-with-effort', 'spontaneous'), {
    nil: undefined,
  }),
  rhythm: fc.option(fc.constantFrom('sinus', 'sinus', 'atrial-fibrillation'), { nil: undefined }),
  vtMl: fc.option(fc.constantFrom(380, 420, 520, 600), { nil: undefined }),
  iap: fc.option(fc.constantFrom(8, 11, 12, 18), { nil: undefined }),
  ppv: fc.option(
    fc.integer({ min: 30, max: 220 }).map((v) => v / 10),
    { nil: undefined },
  ),
  coAgeMin: fc.option(fc.constantFrom(5, 100, 239, 300), { nil: undefined }),
  map: fc.constantFrom(58, 72, 80),
  lactate: fc.option(fc.constantFrom(1.2, 2.8, 4.5), { nil: undefined }),
  evlwi: fc.option(fc.constantFrom(7, 14), { nil: undefined }),
  cvp: fc.option(fc.constantFrom(2, 8, 15), { nil: undefined }),
  order: fc.boolean(),
  tests: fc.array(
    fc.constantFrom(...(Object.keys(TESTS) as DynamicTestKind[])).chain((kind) =>
      fc.record({
        kind: fc.constant(kind),
        measured: fc.constantFrom(...TESTS[kind]),
        factor: fc.integer({ min: 90, max: 125 }).map((v) => v / 100),
        ageMin: fc.constantFrom(3, 20, 50, 130),
      }),
    ),
    { maxLength: 2 },
  ),
  bolusAgeMin: fc.option(fc.constantFrom(15, 45), { nil: undefined }),
});
type State = typeof stateArb extends fc.Arbitrary<infer S> ? S : never;

function build(st: State): { s: PatientSnapshot; now: Date } {
  const b = new SnapshotBuilder({ sex: st.sex })
    .measure('bodyHeight', 172, { ageMin: 4000 })
    .vitals({ hr: 105, map: st.map, rr: 18 }, { ageMin: 5 });
  if (st.mode) b.coded('ventilationMode', st.mode, { ageMin: 15 });
  if (st.rhythm) b.coded('heartRhythm', st.rhythm, { ageMin: 15 });
  if (st.vtMl !== undefined) b.measure('tidalVolume', st.vtMl, { ageMin: 15 });
  if (st.iap !== undefined) b.measure('intraAbdominalPressure', st.iap, { ageMin: 40 });
  if (st.ppv !== undefined) b.measure('ppv', st.ppv, { ageMin: 5 });
  if (st.coAgeMin !== undefined) b.measure('cardiacOutput', 5.2, { ageMin: st.coAgeMin });
  if (st.lactate !== undefined) b.measure('lactate', st.lactate, { ageMin: 60 });
  if (st.evlwi !== undefined) b.measure('evlwi', st.evlwi, { ageMin: 60 });
  if (st.cvp !== undefined) b.measure('cvp', st.cvp, { ageMin: 30 });
  for (const t of st.tests) {
    const before = t.measured === 'ppv' ? 7 : 10;
    b.dynamicTest(t.kind, t.measured, before, t.measured === 'ppv' ? before + (t.factor - 1) * 20 : before * t.factor, {
      ageMin: t.ageMin,
    });
  }
  if (st.bolusAgeMin !== undefined) b.fluid({ volumeMl: 250, startAgeMin: st.bolusAgeMin + 15, endAgeMin: st.bolusAgeMin });
  if (st.order)
    b.draftOrder({
      ref: 'draftOrders#MedicationRequest/p1',
      resourceType: 'MedicationRequest',
      id: 'p1',
      selected: true,
      isFluid: true,
      volumeMl: 500,
      durationMin: 30,
      resource: {},
    });
  return { s: b.build(), now: b.now };
}

/** The outcome's hypothetical, rebuilt from its assumed change on a baseline of our own. */
function rebuilt(test: WhatIfRow['test'], o: WhatIfOutcome, now: Date): DynamicTestResult {
  const measured = o.assumed.measured as DynamicMeasured;
  const before = measured === 'ppv' || measured === 'svv' ? 6 : 12;
  const after =
    o.assumed.changePercent !== undefined ? before * (1 + o.assumed.changePercent / 100) : before + (o.assumed.changeAbsolute ?? NaN);
  return {
    kind: KIND_OF[test],
    measured,
    before,
    after,
    unit: DYNAMIC_MEASURED_UNITS[measured],
    effective: now.toISOString(),
    ageMinutes: 0,
    ref: `Observation/check-${test}-${o.result}`,
  };
}

describe('property: what-if', () => {
  it('never changes the snapshot; every outcome agrees with an independent re-run; decisive and feasibility follow their rules', () => {
    let feasibleSeen = 0;
    let unchangedSeen = 0;
    fc.assert(
      fc.property(stateArb, (st) => {
        const { s, now } = build(st);
        const copy = structuredClone(s);
        const a: Advice = assess(s, now, T, 'prop');
        expect(s).toEqual(copy);
        if (!a.responsiveness) return;
        const w = a.whatIf!;
        expect(w.rows.map((r) => r.test).sort()).toEqual([
          'end-expiratory-occlusion',
          'mini-fluid-challenge',
          'passive-leg-raise',
          'tidal-volume-challenge',
        ]);
        expect(w.rows[0]?.test).toBe(a.responsiveness.nextTest);
        for (const r of w.rows) {
          expect(r.feasible).toBe(r.notFeasible.length === 0);
          expect(r.outcomes.length).toBe(r.feasible ? 2 : 0);
          for (const o of r.outcomes) {
            feasibleSeen += 1;
            const again = assess({ ...s, dynamicTests: [rebuilt(r.test, o, now), ...s.dynamicTests] }, now, T, 'prop', { whatIf: false });
            expect(o.responsiveness).toBe(again.responsiveness?.value);
            expect(o.confidence).toBe(again.responsiveness?.confidence);
            expect(o.action).toBe(again.recommendation?.action);
            expect(o.headline).toBe(again.recommendation?.headline);
            const same =
              again.responsiveness?.value === a.responsiveness.value && again.recommendation?.action === a.recommendation?.action;
            expect(o.changes).toBe(!same);
            if (!o.changes) unchangedSeen += 1;
            const f = again.findings.find((x) => x.ruleId === RULE_OF[r.test]);
            expect(f).toMatchObject({ status: 'assessed', direction: o.result === 'positive' ? 'for' : 'against' });
          }
        }
        const firstChanging = w.rows.find((r) => r.feasible && r.outcomes.some((o) => o.changes))?.test;
        expect(w.decisive).toBe(a.responsiveness.confidence === 'high' ? undefined : firstChanging);
        const plr = w.rows.find((r) => r.test === 'passive-leg-raise')!;
        if (st.iap !== undefined && st.iap >= T.responsiveness.iahThresholdMmHg) expect(plr.feasible).toBe(false);
        if (st.mode === 'spontaneous' || st.mode === 'controlled-with-effort' || st.mode === undefined) {
          for (const t of ['end-expiratory-occlusion', 'tidal-volume-challenge'])
            expect(w.rows.find((r) => r.test === t)?.feasible).toBe(false);
        }
      }),
      { numRuns: RUNS },
    );
    // The generators reach both kinds of outcome.
    expect(feasibleSeen).toBeGreaterThan(10);
    expect(unchangedSeen).toBeGreaterThan(0);
  });
});
