/**
 * Properties of the tolerance assessment:
 *   1. a more positive balance (more intake, less output) never improves tolerance;
 *   2. the order of observations, administrations and conditions does not matter;
 *   3. adding stale data (older than every window, before admission) changes nothing that counts.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { assessTolerance } from '../../src/assess/tolerance/index.js';
import { limitOf } from '../../src/assess/tolerance/finding.js';
import { describeOrder } from '../../src/assess/order/describe-order.js';
import { DEFAULT_ORDER_THRESHOLDS } from '../../src/assess/order/thresholds.js';
import { adviseOrder } from '../../src/assess/advice/advise-order.js';
import { ICD10, NUMERIC_KINDS, SNOMED } from '../../src/fhir/codes.js';
import type { Finding, Tolerance } from '../../src/assess/types.js';
import type { Measurement, PatientSnapshot } from '../../src/snapshot/types.js';
import { coded, condition, fluid, m, NOW, order, snapshot, T } from '../helpers/tolerance-fixtures.js';
import { contextOf } from '../helpers/rule-context.js';

const DAY = 1440;
/** 'not known' ranks with 'adequate': more data (a balance where there was none) may turn one into the other. */
const RANK: Record<Tolerance, number> = { adequate: 0, 'not-known': 0, limited: 1, poor: 2 };
const LIMIT_RANK = { none: 0, moderate: 1, severe: 2 } as const;

const opt = <V>(arb: fc.Arbitrary<V>) => fc.option(arb, { nil: undefined });

/**
 * Invented bedside data: amounts tile back from now in 4-h periods; markers optional. `calm` pulls every
 * marker into its normal range with monotone clamps (min/max), so that adequate tolerance is reached too
 * and the balance changes of property 1 keep their direction.
 */
const scenario = fc.record({
  calm: fc.boolean(),
  weightKg: fc.integer({ min: 45, max: 130 }),
  laterWeightDeltaKg: opt(fc.integer({ min: -5, max: 30 })),
  intake: fc.array(fc.integer({ min: 0, max: 3000 }), { maxLength: 14 }),
  output: fc.array(fc.integer({ min: 0, max: 2500 }), { maxLength: 14 }),
  urine: fc.array(fc.integer({ min: 0, max: 150 }), { maxLength: 26 }),
  admin: fc.array(fc.record({ ml: fc.integer({ min: 50, max: 1000 }), endAgo: fc.integer({ min: 0, max: 3 * DAY - 120 }) }), {
    maxLength: 5,
  }),
  evlwi: opt(fc.double({ min: 3, max: 25, noNaN: true })),
  albumin: opt(fc.integer({ min: 12, max: 48 })),
  cvp: opt(fc.integer({ min: 0, max: 25 })),
  iap: opt(fc.integer({ min: 2, max: 32 })),
  bLines: opt(fc.integer({ min: 0, max: 8 })),
  bLinesBySide: opt(fc.tuple(fc.integer({ min: 0, max: 4 }), fc.integer({ min: 0, max: 4 }), fc.integer({ min: 20, max: 120 }))),
  oedema: opt(fc.integer({ min: 0, max: 4 })),
  spo2: fc.array(
    fc.record({ spo2: fc.integer({ min: 80, max: 100 }), fio2: fc.integer({ min: 21, max: 100 }), ago: fc.integer({ min: 0, max: 420 }) }),
    { maxLength: 4 },
  ),
  peep: fc.array(fc.record({ v: fc.integer({ min: 0, max: 20 }), ago: fc.integer({ min: 0, max: 420 }) }), { maxLength: 3 }),
  creatinine: fc.array(fc.record({ v: fc.double({ min: 0.4, max: 6, noNaN: true }), ago: fc.integer({ min: 10, max: 6 * DAY }) }), {
    maxLength: 4,
  }),
  ivc: opt(fc.double({ min: 0.8, max: 3.2, noNaN: true })),
  pf: opt(fc.integer({ min: 0, max: 90 })),
  hv: opt(fc.constantFrom('normal', 'mild', 'severe')),
  rv: opt(fc.constantFrom('continuous', 'biphasic', 'monophasic')),
  conditions: fc.subarray([
    [SNOMED, '84114007'],
    [ICD10, 'K74.6'],
    [ICD10, 'J80'],
    [SNOMED, '38341003'],
  ] as const),
});
type Scenario = typeof scenario extends fc.Arbitrary<infer U> ? U : never;

function build(raw: Scenario): PatientSnapshot {
  const c = raw.calm;
  const sc: Scenario = !c
    ? raw
    : {
        ...raw,
        laterWeightDeltaKg: raw.laterWeightDeltaKg === undefined ? undefined : Math.min(raw.laterWeightDeltaKg, 3),
        intake: raw.intake.map((v) => Math.min(v, 150)),
        output: raw.output.map((v) => Math.max(v, 200)),
        urine: raw.urine.map((v) => Math.max(v, 60)),
        admin: raw.admin.map((a) => ({ ...a, ml: Math.min(a.ml, 100) })),
        evlwi: raw.evlwi === undefined ? undefined : Math.min(raw.evlwi, 8),
        albumin: raw.albumin === undefined ? undefined : Math.max(raw.albumin, 32),
        cvp: raw.cvp === undefined ? undefined : Math.min(raw.cvp, 8),
        iap: raw.iap === undefined ? undefined : Math.min(raw.iap, 10),
        bLines: raw.bLines === undefined ? undefined : Math.min(raw.bLines, 1),
        bLinesBySide: raw.bLinesBySide === undefined ? undefined : ([Math.min(raw.bLinesBySide[0], 1), 0, raw.bLinesBySide[2]] as const),
        oedema: raw.oedema === undefined ? undefined : Math.min(raw.oedema, 1),
        spo2: raw.spo2.map((p) => ({ ...p, spo2: Math.max(p.spo2, 95), fio2: 21 })),
        peep: [],
        creatinine: raw.creatinine.map((x) => ({ ...x, v: 0.8 })),
        ivc: raw.ivc === undefined ? undefined : Math.min(raw.ivc, 1.9),
        conditions: [],
      };
  let n = 0;
  const ref = () => `Observation/p-${++n}`;
  const ms: Measurement[] = [m('bodyWeight', sc.weightKg, 3 * DAY - 30, { ref: ref() })];
  if (sc.laterWeightDeltaKg !== undefined) ms.push(m('bodyWeight', sc.weightKg + sc.laterWeightDeltaKg, 90, { ref: ref() }));
  sc.intake.forEach((v, i) => ms.push(m('fluidIntake', v, i * 240, { periodMinutes: 240, ref: ref() })));
  sc.output.forEach((v, i) => ms.push(m('fluidOutput', v, i * 240, { periodMinutes: 240, ref: ref() })));
  sc.urine.forEach((v, i) => ms.push(m('urineOutput', v, i * 60, { periodMinutes: 60, ref: ref() })));
  if (sc.evlwi !== undefined) ms.push(m('evlwi', sc.evlwi, 100, { ref: ref() }));
  if (sc.albumin !== undefined) ms.push(m('albumin', sc.albumin, 300, { ref: ref() }));
  if (sc.cvp !== undefined) ms.push(m('cvp', sc.cvp, 20, { ref: ref() }));
  if (sc.iap !== undefined) ms.push(m('intraAbdominalPressure', sc.iap, 50, { ref: ref() }), m('meanBp', 72, 45, { ref: ref() }));
  if (sc.bLines !== undefined) ms.push(m('bLineRegions', sc.bLines, 70, { ref: ref() }));
  if (sc.bLinesBySide !== undefined)
    ms.push(
      m('bLineRegionsLeft', sc.bLinesBySide[0], sc.bLinesBySide[2], { ref: ref() }),
      m('bLineRegionsRight', sc.bLinesBySide[1], sc.bLinesBySide[2], { ref: ref() }),
    );
  if (sc.oedema !== undefined) ms.push(m('edemaGrade', sc.oedema, 400, { ref: ref() }));
  for (const p of sc.spo2) ms.push(m('spo2', p.spo2, p.ago, { ref: ref() }), m('fio2', p.fio2, p.ago, { ref: ref() }));
  for (const p of sc.peep) ms.push(m('peep', p.v, p.ago, { ref: ref() }));
  for (const x of sc.creatinine) ms.push(m('creatinine', Math.round(x.v * 100) / 100, x.ago, { ref: ref() }));
  if (sc.ivc !== undefined) ms.push(m('ivcDiameterMax', Math.round(sc.ivc * 10) / 10, 40, { ref: ref() }));
  if (sc.pf !== undefined) ms.push(m('portalPulsatility', sc.pf, 40, { ref: ref() }));
  return snapshot({
    measurements: ms,
    coded: [
      ...(sc.hv ? [coded('hepaticVeinPattern', sc.hv, 40, { ref: 'Observation/hv' })] : []),
      ...(sc.rv ? [coded('renalVeinPattern', sc.rv, 40, { ref: 'Observation/rv' })] : []),
    ],
    fluids: sc.admin.map((a, i) =>
      fluid('balanced-crystalloid', a.ml, a.endAgo + 30, a.endAgo, { ref: `MedicationAdministration/a-${i}` }),
    ),
    conditions: sc.conditions.map(([system, code], i) => condition(system, code, 'active', `Condition/c-${i}`)),
  });
}

function shuffled<X>(xs: readonly X[], seed: number): X[] {
  const out = [...xs];
  let s = seed >>> 0 || 1;
  for (let i = out.length - 1; i > 0; i--) {
    s = (Math.imul(s, 1103515245) + 12345) >>> 0;
    const j = s % (i + 1);
    [out[i], out[j]] = [out[j]!, out[i]!];
  }
  return out;
}

function worse(after: Finding[], before: Finding[]): boolean {
  return after.every((f, i) => LIMIT_RANK[limitOf(f)] >= LIMIT_RANK[limitOf(before[i]!)]);
}

describe('tolerance properties', () => {
  it('the generator reaches every verdict, so the properties below are not vacuous', () => {
    const seen = new Set(
      fc.sample(scenario, { numRuns: 300, seed: 20260314 }).map((sc) => assessTolerance(contextOf(build(sc), NOW, T)).verdict.value),
    );
    expect([...seen].sort()).toEqual(['adequate', 'limited', 'poor']); // 'not-known' is covered by the verdict truth table
  });

  it('more intake or less output never improves tolerance', () => {
    fc.assert(
      fc.property(
        scenario,
        fc.oneof(
          fc.record({ kind: fc.constant('more-intake' as const), i: fc.nat(), by: fc.integer({ min: 1, max: 5000 }) }),
          fc.record({ kind: fc.constant('less-output' as const), i: fc.nat(), by: fc.integer({ min: 1, max: 2500 }) }),
          fc.record({ kind: fc.constant('less-urine' as const), i: fc.nat(), by: fc.integer({ min: 1, max: 150 }) }),
          fc.record({ kind: fc.constant('extra-administration' as const), i: fc.nat(), by: fc.integer({ min: 50, max: 1000 }) }),
        ),
        (sc, change) => {
          const more: Scenario = structuredClone(sc);
          if (change.kind === 'more-intake') {
            // With no intake observations the intake is the administrations: more intake is one more of them
            // (a first intake observation would change the source, not add volume).
            if (more.intake.length === 0) more.admin.push({ ml: change.by, endAgo: change.i % (2 * DAY) });
            else more.intake[change.i % more.intake.length]! += change.by;
          } else if (change.kind === 'less-output' && more.output.length > 0) {
            const k = change.i % more.output.length;
            more.output[k] = Math.max(0, more.output[k]! - change.by);
          } else if (change.kind === 'less-urine' && more.urine.length > 0) {
            const k = change.i % more.urine.length;
            more.urine[k] = Math.max(0, more.urine[k]! - change.by);
          } else if (change.kind === 'extra-administration') {
            more.admin.push({ ml: change.by, endAgo: change.i % (2 * DAY) });
          }
          const a = assessTolerance(contextOf(build(sc), NOW, T));
          const b = assessTolerance(contextOf(build(more), NOW, T));
          expect(RANK[b.verdict.value]).toBeGreaterThanOrEqual(RANK[a.verdict.value]);
          expect(worse(b.findings, a.findings)).toBe(true);
          const balance = (r: typeof a) => r.findings.find((f) => f.ruleId === 'tolerance.balance-cumulative')?.values?.['balanceMl'];
          if (typeof balance(a) === 'number' && typeof balance(b) === 'number')
            expect(balance(b) as number).toBeGreaterThanOrEqual(balance(a) as number);
        },
      ),
      { numRuns: 150 },
    );
  });

  it('the order of observations, administrations and conditions does not matter', () => {
    fc.assert(
      fc.property(scenario, fc.integer({ min: 1, max: 2 ** 31 - 1 }), (sc, seed) => {
        const s = build(sc);
        const t: PatientSnapshot = {
          ...s,
          measurements: shuffled(s.measurements, seed),
          coded: shuffled(s.coded, seed + 1),
          fluids: shuffled(s.fluids, seed + 2),
          conditions: shuffled(s.conditions, seed + 3),
        };
        const a = assessTolerance(contextOf(s, NOW, T));
        const b = assessTolerance(contextOf(t, NOW, T));
        expect(b).toEqual(a);
        const oa = describeOrder(order(), s, NOW, DEFAULT_ORDER_THRESHOLDS);
        const ob = describeOrder(order(), t, NOW, DEFAULT_ORDER_THRESHOLDS);
        expect(ob).toEqual(oa);
        const rv = { value: 'likely' as const, rationale: 'x', decidingRules: [], confidence: 'high' as const };
        const nv = { value: 'present' as const, rationale: 'x', decidingRules: [] };
        const pv = { value: 'later' as const, rationale: 'x', decidingRules: [] };
        const adv = (r: typeof a, o: typeof oa) =>
          adviseOrder({ responsiveness: rv, tolerance: r.verdict, need: nv, phase: pv, findings: r.findings, orderFindings: o });
        expect(adv(b, ob)).toEqual(adv(a, oa));
      }),
      { numRuns: 150 },
    );
  });

  it('adding stale data changes nothing that counts', () => {
    const staleMeasurement = fc.record({
      kind: fc.constantFrom(...NUMERIC_KINDS.filter((k) => k !== 'fluidBalance')),
      frac: fc.double({ min: 0, max: 1, noNaN: true }),
      ago: fc.integer({ min: 9 * DAY, max: 40 * DAY }),
      period: opt(fc.integer({ min: 60, max: 1440 })),
    });
    fc.assert(
      fc.property(
        scenario,
        fc.array(staleMeasurement, { minLength: 1, maxLength: 12 }),
        fc.array(fc.integer({ min: 9 * DAY, max: 30 * DAY }), { maxLength: 3 }),
        (sc, stale, staleFluids) => {
          const s = build(sc);
          const plus: PatientSnapshot = {
            ...s,
            measurements: [
              ...s.measurements,
              ...stale.map((x, i) => {
                // A value inside the kind's plausible range, in its canonical unit.
                const range: Record<string, [number, number]> = { fio2: [21, 100], edemaGrade: [0, 4] };
                const [lo, hi] = range[x.kind] ?? [0, 100];
                return m(x.kind, lo + x.frac * (hi - lo), x.ago, {
                  ref: `Observation/stale-${i}`,
                  ...(x.period ? { periodMinutes: x.period } : {}),
                });
              }),
            ],
            coded: [...s.coded, coded('hepaticVeinPattern', 'severe', 10 * DAY, { ref: 'Observation/stale-hv' })],
            fluids: [
              ...s.fluids,
              ...staleFluids.map((ago, i) => fluid('saline', 1000, ago + 60, ago, { ref: `MedicationAdministration/stale-${i}` })),
            ],
            conditions: [...s.conditions, condition(SNOMED, '46177005', 'resolved', 'Condition/stale')],
          };
          const a = assessTolerance(contextOf(s, NOW, T));
          const b = assessTolerance(contextOf(plus, NOW, T));
          expect(b.verdict).toEqual(a.verdict);
          b.findings.forEach((f, i) => {
            const g = a.findings[i]!;
            if (g.status === 'assessed') expect(f).toEqual(g);
            else expect({ ruleId: f.ruleId, status: f.status }).toEqual({ ruleId: g.ruleId, status: g.status });
          });
          expect(describeOrder(order(), plus, NOW, DEFAULT_ORDER_THRESHOLDS)).toEqual(
            describeOrder(order(), s, NOW, DEFAULT_ORDER_THRESHOLDS),
          );
        },
      ),
      { numRuns: 150 },
    );
  });
});
