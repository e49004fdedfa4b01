/**
 * Properties of assessResponsiveness (fast-check, invented data):
 *  1. order: the result (findings and verdict) does not depend on the order of the snapshot arrays;
 *  2. stale: adding data older than every window that could count it never changes the verdict;
 *  3. removal never makes the verdict more certain (indeterminate → likely/unlikely), with one exception that no
 *     scheme with a conflict rule can avoid: the removed data spoke against the new verdict (it supported a finding
 *     pointing the other way: one side of a conflict) or confounded a finding (a vasoactive change during a
 *     bolus). "A piece of evidence" is all data of one marker (e.g. all CVP readings, all PLR tests); see
 *     docs/clinical-logic/responsiveness.md, "Properties".
 *     Stronger, per single item: removing an item that no finding cites never changes any finding or the verdict;
 *  4. a dynamic test of one kind, added to the snapshot, changes the output of no rule but that kind's own
 *     (DYNAMIC_TEST_RULES), nor the test offered; so the what-if's partial re-run (reassessWithDynamicTest) gives
 *     exactly what a full run gives.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { DEFAULT_WINDOWS as W } from '../../src/assess/common/windows.js';
import {
  assessResponsiveness,
  DYNAMIC_TEST_RULES,
  reassessWithDynamicTest,
  RESPONSIVENESS_RULES,
  responsivenessThresholdsSchema,
  runResponsiveness,
} from '../../src/assess/responsiveness/index.js';
import { contextOf } from '../helpers/rule-context.js';
import type { Finding, Responsiveness } from '../../src/assess/types.js';
import {
  CODED_ANSWERS,
  KIND_UNITS,
  type CodedKind,
  type DynamicMeasured,
  type DynamicTestKind,
  type NumericKind,
} from '../../src/fhir/codes.js';
import type {
  CodedMeasurement,
  DynamicTestResult,
  FluidGiven,
  Measurement,
  PatientSnapshot,
  VasoactiveDrug,
} from '../../src/snapshot/types.js';
import { DYNAMIC_MEASURED_UNITS } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});
const NOW = new Date('2026-03-10T12:00:00.000Z');
/** Runs per property; raise with RESP_PROP_RUNS for a deep search. */
const RUNS = Number(process.env.RESP_PROP_RUNS ?? 250);
const iso = (ageMin: number) => new Date(NOW.getTime() - ageMin * 60_000).toISOString();

// ── Generators ─────────────────────────────────────────────────────────────────────────────────────────────
const RANGES: Partial<Record<NumericKind, [number, number]>> = {
  heartRate: [50, 150],
  systolicBp: [70, 160],
  diastolicBp: [35, 90],
  meanBp: [45, 110],
  respiratoryRate: [0, 35],
  bodyHeight: [140, 195],
  tidalVolume: [300, 700],
  ppv: [2, 25],
  svv: [2, 25],
  cvp: [-2, 20],
  rightAtrialPressure: [-2, 20],
  ivcDiameterMax: [1.0, 3.0],
  ivcDiameterMin: [0.3, 2.8],
  intraAbdominalPressure: [3, 22],
  lactate: [0.5, 8],
  capillaryRefill: [1, 7],
  urineOutput: [0, 200],
};
const KINDS = Object.keys(RANGES) as NumericKind[];
const CODED: CodedKind[] = ['ventilationMode', 'heartRhythm', 'chestStatus', 'lvFunction'];
const TESTS: Record<DynamicTestKind, DynamicMeasured[]> = {
  plr: ['cardiacOutput', 'strokeVolume', 'pulsePressure', 'vti'],
  miniFluidChallenge: ['vti', 'strokeVolume', 'pulsePressure'],
  endExpiratoryOcclusion: ['cardiacIndex', 'vti', 'pulsePressure'],
  tidalVolumeChallenge: ['ppv', 'svv'],
};

/** Ages with many ties and values near the windows. */
const age = (max: number) => fc.oneof(fc.integer({ min: 0, max }), fc.constantFrom(0, 5, 10, 20, 30, 31, 60, 61, 90, 120, 240, 241, 360));
const valueOf = (kind: NumericKind) => {
  const [lo, hi] = RANGES[kind] ?? [0, 1];
  return fc.integer({ min: Math.round(lo * 10), max: Math.round(hi * 10) }).map((v) => v / 10);
};

type MRaw = { kind: NumericKind; value: number; ageMin: number };
const measurementArb: fc.Arbitrary<MRaw> = fc.constantFrom(...KINDS).chain((kind) =>
  fc.record({
    kind: fc.constant(kind),
    value: valueOf(kind),
    ageMin: kind === 'bodyHeight' ? fc.integer({ min: 0, max: 600_000 }) : age(400),
  }),
);
/** A vitals series every 15 min so that bolus windows get readings. */
const seriesArb = fc
  .option(
    fc.record({ hr: fc.integer({ min: 80, max: 130 }), map: fc.integer({ min: 50, max: 80 }), drift: fc.integer({ min: -3, max: 3 }) }),
    { nil: undefined },
  )
  .map((s) =>
    s
      ? Array.from({ length: 21 }, (_, i) => i * 15).flatMap((a): MRaw[] => [
          { kind: 'heartRate', value: s.hr - s.drift * (a / 15), ageMin: a },
          { kind: 'meanBp', value: s.map + s.drift * (a / 30), ageMin: a },
        ])
      : [],
  );
const codedArb = fc
  .constantFrom(...CODED)
  .chain((kind) => fc.record({ kind: fc.constant(kind), answer: fc.constantFrom(...CODED_ANSWERS[kind]), ageMin: age(1500) }));
const testArb = fc.constantFrom(...(Object.keys(TESTS) as DynamicTestKind[])).chain((kind) =>
  fc.record({
    kind: fc.constant(kind),
    measured: fc.constantFrom(...TESTS[kind]),
    before: fc.integer({ min: 20, max: 600 }).map((v) => v / 10),
    factor: fc.integer({ min: 85, max: 130 }).map((v) => v / 100),
    ageMin: age(120),
  }),
);
const fluidArb = fc.record({
  volumeMl: fc.constantFrom(100, 250, 500, 1000),
  startAgeMin: age(400),
  durationMin: fc.constantFrom(0, 10, 20, 30, 60, 90),
  status: fc.constantFrom('completed', 'completed', 'completed', 'in-progress'),
});
const vasoArb = fc.record({
  drug: fc.constantFrom('norepinephrine', 'vasopressin'),
  startAgeMin: age(500),
  runMin: fc.option(fc.integer({ min: 0, max: 300 }), { nil: undefined }),
  rate: fc.option(fc.constantFrom(0.05, 0.1, 0.2), { nil: undefined }),
});

type ArbValue<A> = A extends fc.Arbitrary<infer V> ? V : never;

interface Raw {
  sex: PatientSnapshot['patient']['sex'];
  measurements: MRaw[];
  coded: Array<{ kind: CodedKind; answer: string; ageMin: number }>;
  tests: ArbValue<typeof testArb>[];
  fluids: ArbValue<typeof fluidArb>[];
  vasos: ArbValue<typeof vasoArb>[];
}
/**
 * A coherent, mostly valid heart–lung state (random data alone almost never meets all six PPV conditions), so that
 * valid PPV/SVV, the tidal volume challenge and the ventilation-dependent IVC indices are exercised too.
 */
const stateArb = fc
  .option(
    fc.record({
      mode: fc.constantFrom(
        'controlled-no-effort',
        'controlled-no-effort',
        'controlled-no-effort',
        'spontaneous',
        'controlled-with-effort',
      ),
      rhythm: fc.constantFrom('sinus', 'sinus', 'sinus', 'sinus', 'atrial-fibrillation'),
      chest: fc.constantFrom('closed', 'closed', 'closed', 'open'),
      vtMl: fc.constantFrom(420, 600, 600, 650),
      iap: fc.constantFrom(6, 8, 8, 14),
      rr: fc.constantFrom(16, 20, 20, 30),
      ageMin: fc.integer({ min: 0, max: 25 }),
      ppv: fc.option(
        fc.integer({ min: 20, max: 250 }).map((v) => v / 10),
        { nil: undefined },
      ),
      svv: fc.option(
        fc.integer({ min: 20, max: 250 }).map((v) => v / 10),
        { nil: undefined },
      ),
    }),
    { nil: undefined },
  )
  .map((st): { m: MRaw[]; c: Array<{ kind: CodedKind; answer: string; ageMin: number }> } =>
    st
      ? {
          m: [
            { kind: 'tidalVolume', value: st.vtMl, ageMin: st.ageMin },
            { kind: 'bodyHeight', value: 175, ageMin: 3000 },
            { kind: 'intraAbdominalPressure', value: st.iap, ageMin: st.ageMin + 30 },
            { kind: 'heartRate', value: 100, ageMin: st.ageMin },
            { kind: 'respiratoryRate', value: st.rr, ageMin: st.ageMin },
            ...(st.ppv !== undefined ? [{ kind: 'ppv' as const, value: st.ppv, ageMin: st.ageMin }] : []),
            ...(st.svv !== undefined ? [{ kind: 'svv' as const, value: st.svv, ageMin: st.ageMin }] : []),
          ],
          c: [
            { kind: 'ventilationMode', answer: st.mode, ageMin: st.ageMin },
            { kind: 'heartRhythm', answer: st.rhythm, ageMin: st.ageMin },
            { kind: 'chestStatus', answer: st.chest, ageMin: st.ageMin + 60 },
          ],
        }
      : { m: [], c: [] },
  );
/** IVC Dmax/Dmin measured together. */
const ivcPairArb = fc
  .array(
    fc.record({
      maxCm: fc.integer({ min: 10, max: 30 }).map((v) => v / 10),
      frac: fc.integer({ min: 40, max: 100 }).map((v) => v / 100),
      ageMin: age(400),
    }),
    { maxLength: 2 },
  )
  .map((ps) =>
    ps.flatMap((p): MRaw[] => [
      { kind: 'ivcDiameterMax', value: p.maxCm, ageMin: p.ageMin },
      { kind: 'ivcDiameterMin', value: Math.round(p.maxCm * p.frac * 100) / 100, ageMin: p.ageMin },
    ]),
  );
const rawArb: fc.Arbitrary<Raw> = fc
  .record({
    sex: fc.constantFrom('male', 'female', 'unknown'),
    base: fc.tuple(fc.array(measurementArb, { maxLength: 40 }), seriesArb, ivcPairArb).map(([a, b, c]) => [...a, ...b, ...c]),
    state: stateArb,
    coded: fc.array(codedArb, { maxLength: 8 }),
    tests: fc.array(testArb, { maxLength: 5 }),
    fluids: fc.array(fluidArb, { maxLength: 3 }),
    vasos: fc.array(vasoArb, { maxLength: 3 }),
  })
  .map(({ base, state, coded, ...rest }) => ({ ...rest, measurements: [...base, ...state.m], coded: [...coded, ...state.c] }));

function build(raw: Raw, tag = 'a'): PatientSnapshot {
  let n = 0;
  const ref = (type: string) => `${type}/${tag}${(n += 1)}`;
  const measurements: Measurement[] = raw.measurements.map((m) => ({
    kind: m.kind,
    value: m.value,
    unit: KIND_UNITS[m.kind],
    original: { value: m.value, unit: KIND_UNITS[m.kind], code: m.kind, system: 'urn:test' },
    effective: iso(m.ageMin),
    ageMinutes: m.ageMin,
    ref: ref('Observation'),
  }));
  const coded: CodedMeasurement[] = raw.coded.map((c) => ({
    kind: c.kind,
    answer: c.answer,
    original: { system: 'urn:test', code: c.answer },
    effective: iso(c.ageMin),
    ageMinutes: c.ageMin,
    ref: ref('Observation'),
  }));
  const dynamicTests: DynamicTestResult[] = raw.tests.map((d) => ({
    kind: d.kind,
    measured: d.measured,
    before: d.before,
    after: Math.round(d.before * d.factor * 100) / 100,
    unit: DYNAMIC_MEASURED_UNITS[d.measured],
    effective: iso(d.ageMin),
    ageMinutes: d.ageMin,
    ref: ref('Observation'),
  }));
  const fluids: FluidGiven[] = raw.fluids.map((f) => ({
    ref: ref('MedicationAdministration'),
    fluidClass: 'balanced-crystalloid',
    display: 'Ringer lactate',
    volumeMl: f.volumeMl,
    start: iso(f.startAgeMin),
    end: iso(f.startAgeMin - f.durationMin),
    status: f.status,
    ageMinutes: f.startAgeMin - f.durationMin,
  }));
  const vasoactives: VasoactiveDrug[] = raw.vasos.map((v) => ({
    ref: ref('MedicationAdministration'),
    drug: v.drug,
    ...(v.rate !== undefined ? { rate: { value: v.rate, unit: 'ug/kg/min' } } : {}),
    start: iso(v.startAgeMin),
    ...(v.runMin !== undefined && v.runMin <= v.startAgeMin ? { end: iso(v.startAgeMin - v.runMin) } : {}),
    status: 'in-progress',
  }));
  return {
    patient: { ref: 'Patient/p', sex: raw.sex },
    now: NOW.toISOString(),
    measurements,
    coded,
    dynamicTests,
    fluids,
    vasoactives,
    conditions: [],
    draftOrders: [],
    excluded: [],
  };
}

const assess = (s: PatientSnapshot) => assessResponsiveness(contextOf(s, NOW, T));

function shuffled<X>(xs: readonly X[], seed: number): X[] {
  const out = [...xs];
  let x = seed >>> 0 || 1;
  for (let i = out.length - 1; i > 0; i--) {
    x = (Math.imul(x, 1_103_515_245) + 12_345) >>> 0;
    const j = x % (i + 1);
    [out[i], out[j]] = [out[j] as X, out[i] as X];
  }
  return out;
}

// ── 1. Order ───────────────────────────────────────────────────────────────────────────────────────────────
describe('property: order of the snapshot arrays does not matter', () => {
  it('shuffling every array gives the same findings and verdict', () => {
    fc.assert(
      fc.property(rawArb, fc.integer(), (raw, seed) => {
        const s = build(raw);
        const t: PatientSnapshot = {
          ...s,
          measurements: shuffled(s.measurements, seed),
          coded: shuffled(s.coded, seed + 1),
          dynamicTests: shuffled(s.dynamicTests, seed + 2),
          fluids: shuffled(s.fluids, seed + 3),
          vasoactives: shuffled(s.vasoactives, seed + 4),
        };
        expect(assess(t)).toEqual(assess(s));
      }),
      { numRuns: RUNS },
    );
  });
});

// ── 2. Stale data ──────────────────────────────────────────────────────────────────────────────────────────
/**
 * The oldest age (min) at which any responsiveness rule can count a reading of each kind, from the thresholds:
 * current-state windows, and for the last-bolus rule its look-back plus the window before the bolus.
 */
const bolusVitals = T.lastBolusLookbackMin + T.bolusPreWindowMin;
const bolusSecondary = T.lastBolusLookbackMin + T.bolusSecondaryWindowMin;
const flowDense = T.lastBolusLookbackMin + T.flowBeforeStartMaxMin;
const OLDEST: Partial<Record<NumericKind, number>> = {
  heartRate: Math.max(W.vitalsMin, bolusVitals),
  systolicBp: Math.max(W.vitalsMin, bolusVitals),
  diastolicBp: Math.max(W.vitalsMin, bolusVitals),
  meanBp: Math.max(W.vitalsMin, bolusVitals),
  respiratoryRate: W.vitalsMin,
  bodyHeight: W.bodyHeightMin,
  tidalVolume: W.tidalVolumeMin,
  ppv: W.ppvSvvMin,
  svv: W.ppvSvvMin,
  cvp: W.cvpMin,
  rightAtrialPressure: W.cvpMin,
  ivcDiameterMax: W.ivcMin,
  ivcDiameterMin: W.ivcMin,
  intraAbdominalPressure: W.intraAbdominalPressureMin,
  lactate: bolusSecondary,
  capillaryRefill: bolusSecondary,
  urineOutput: bolusSecondary,
  // Flow readings: the dense bolus path, and the flow-monitor check of the next test.
  cardiacOutput: Math.max(flowDense, T.flowMonitorRecentMin),
  cardiacIndex: Math.max(flowDense, T.flowMonitorRecentMin),
  strokeVolume: Math.max(flowDense, T.flowMonitorRecentMin),
};
const OLDEST_CODED: Record<string, number> = {
  ventilationMode: W.ventilationStateMin,
  heartRhythm: W.rhythmMin,
  chestStatus: W.chestStatusMin,
  lvFunction: W.echoImpressionMin,
};
const staleBy = fc.integer({ min: 1, max: 2000 });
const staleArb = fc.record({
  measurements: fc.array(
    fc.tuple(measurementArb, staleBy).map(([m, d]): MRaw => ({ ...m, ageMin: (OLDEST[m.kind] ?? 0) + d })),
    { maxLength: 15 },
  ),
  coded: fc.array(
    fc.tuple(codedArb, staleBy).map(([c, d]) => ({ ...c, ageMin: (OLDEST_CODED[c.kind] ?? 0) + d })),
    { maxLength: 5 },
  ),
  tests: fc.array(
    fc.tuple(testArb, staleBy).map(([x, d]) => ({ ...x, ageMin: W.dynamicTestMin + d })),
    { maxLength: 3 },
  ),
  fluids: fc.array(
    fc.tuple(fluidArb, staleBy).map(([f, d]) => ({ ...f, startAgeMin: T.lastBolusLookbackMin + f.durationMin + d })),
    { maxLength: 2 },
  ),
  // Events (start, end) older than any span a bolus check can look at; no end = still running, unchanged.
  vasos: fc.array(
    fc.tuple(vasoArb, staleBy).map(([v, d]) => {
      const startAgeMin = bolusVitals + 2 + d + (v.runMin ?? 0);
      return { ...v, startAgeMin };
    }),
    { maxLength: 2 },
  ),
});

describe('property: adding stale data never changes the verdict', () => {
  it('verdict with stale extras equals the verdict without', () => {
    fc.assert(
      fc.property(rawArb, staleArb, (raw, extra) => {
        const base = build(raw, 'a');
        const more = build({ sex: raw.sex, ...extra }, 'z');
        const withStale: PatientSnapshot = {
          ...base,
          measurements: [...base.measurements, ...more.measurements],
          coded: [...base.coded, ...more.coded],
          dynamicTests: [...base.dynamicTests, ...more.dynamicTests],
          fluids: [...base.fluids, ...more.fluids],
          vasoactives: [...base.vasoactives, ...more.vasoactives],
        };
        expect(assess(withStale).verdict).toEqual(assess(base).verdict);
      }),
      { numRuns: RUNS },
    );
  });
});

// ── 3. Removal ─────────────────────────────────────────────────────────────────────────────────────────────
type Group = { name: string; drop: (s: PatientSnapshot) => PatientSnapshot; refs: (s: PatientSnapshot) => Set<string> };
const kindGroup = (name: string, kinds: readonly string[]): Group => ({
  name,
  drop: (s) => ({
    ...s,
    measurements: s.measurements.filter((m) => !kinds.includes(m.kind)),
    coded: s.coded.filter((c) => !kinds.includes(c.kind)),
  }),
  refs: (s) => new Set([...s.measurements, ...s.coded].filter((m) => kinds.includes(m.kind)).map((m) => m.ref)),
});
const GROUPS: Group[] = [
  kindGroup('blood pressure', ['meanBp', 'systolicBp', 'diastolicBp']),
  kindGroup('venous pressure', ['cvp', 'rightAtrialPressure']),
  kindGroup('IVC', ['ivcDiameterMax', 'ivcDiameterMin']),
  ...KINDS.filter(
    (k) => !['meanBp', 'systolicBp', 'diastolicBp', 'cvp', 'rightAtrialPressure', 'ivcDiameterMax', 'ivcDiameterMin'].includes(k),
  ).map((k) => kindGroup(k, [k])),
  ...CODED.map((k) => kindGroup(k, [k])),
  ...(Object.keys(TESTS) as DynamicTestKind[]).map((k): Group => ({
    name: k,
    drop: (s) => ({ ...s, dynamicTests: s.dynamicTests.filter((d) => d.kind !== k) }),
    refs: (s) => new Set(s.dynamicTests.filter((d) => d.kind === k).map((d) => d.ref)),
  })),
  { name: 'fluids', drop: (s) => ({ ...s, fluids: [] }), refs: (s) => new Set(s.fluids.map((f) => f.ref)) },
  { name: 'vasoactives', drop: (s) => ({ ...s, vasoactives: [] }), refs: (s) => new Set(s.vasoactives.map((v) => v.ref)) },
];
const opposite = (v: Responsiveness) => (v === 'likely' ? 'against' : 'for');

/**
 * The removed data spoke against `after`: it supported an opposing finding, confounded one, set one aside (an event
 * since, or one that set aside a better read-out of the same test), or made one doubtful (a charted raised IAP makes a high PPV doubtful;
 * uncharted, IAP is assumed normal, docs/clinical-logic).
 */
function spokeAgainst(findings: readonly Finding[], removed: Set<string>, after: Responsiveness): boolean {
  return findings.some(
    (f) =>
      f.topic === 'responsiveness' &&
      f.evidence.some((e) => removed.has(e.ref)) &&
      ((f.status === 'assessed' && f.tier !== 'context' && f.direction === opposite(after)) ||
        f.gap === 'confounded' ||
        f.gap === 'set-aside' ||
        f.gap === 'outside-validity' ||
        (f.topic === 'responsiveness' && f.betterSetAsideBy !== undefined)),
  );
}

describe('property: removing evidence never makes the verdict more certain', () => {
  it('removing all data of one marker: indeterminate stays indeterminate unless the data spoke against the new verdict', () => {
    fc.assert(
      fc.property(rawArb, fc.constantFrom(...GROUPS), (raw, group) => {
        const s = build(raw);
        const before = assess(s);
        const after = assess(group.drop(s));
        if (before.verdict.value === 'indeterminate' && after.verdict.value !== 'indeterminate') {
          expect(
            spokeAgainst(before.findings, group.refs(s), after.verdict.value),
            `${group.name}: ${before.verdict.rationale} → ${after.verdict.rationale}`,
          ).toBe(true);
        }
      }),
      { numRuns: RUNS * 2 },
    );
  });

  it('removing one item that no finding cites changes no finding and not the verdict', () => {
    fc.assert(
      fc.property(rawArb, fc.nat(), (raw, pick) => {
        const s = build(raw);
        const before = assess(s);
        const cited = new Set(before.findings.flatMap((f) => f.evidence.map((e) => e.ref)));
        const items: Array<{ ref: string; drop: () => PatientSnapshot }> = [
          ...s.measurements.map((m) => ({ ref: m.ref, drop: () => ({ ...s, measurements: s.measurements.filter((x) => x !== m) }) })),
          ...s.coded.map((c) => ({ ref: c.ref, drop: () => ({ ...s, coded: s.coded.filter((x) => x !== c) }) })),
          ...s.dynamicTests.map((d) => ({ ref: d.ref, drop: () => ({ ...s, dynamicTests: s.dynamicTests.filter((x) => x !== d) }) })),
          ...s.fluids.map((f) => ({ ref: f.ref, drop: () => ({ ...s, fluids: s.fluids.filter((x) => x !== f) }) })),
          ...s.vasoactives.map((v) => ({ ref: v.ref, drop: () => ({ ...s, vasoactives: s.vasoactives.filter((x) => x !== v) }) })),
        ].filter((i) => !cited.has(i.ref));
        if (items.length === 0) return;
        const item = items[pick % items.length];
        if (!item) return;
        const after = assess(item.drop());
        expect(after.findings).toEqual(before.findings);
        expect({ ...after.verdict, nextTest: undefined }).toEqual({ ...before.verdict, nextTest: undefined });
      }),
      { numRuns: RUNS * 2 },
    );
  });

  it('the generators reach every verdict (a property that only ever sees one verdict proves little)', () => {
    const seen = new Set<string>();
    fc.assert(
      fc.property(rawArb, (raw) => {
        seen.add(assess(build(raw)).verdict.value);
      }),
      { numRuns: 300, seed: 42 },
    );
    expect([...seen].sort()).toEqual(['indeterminate', 'likely', 'unlikely']);
  });
});

// ── 4. One added dynamic test ──────────────────────────────────────────────────────────────────────────────
describe('property: a dynamic test of one kind', () => {
  it('added to the snapshot, changes only its own rule’s output; the partial re-run equals a full run', () => {
    let ownChanged = 0;
    fc.assert(
      fc.property(rawArb, testArb, (raw, extra) => {
        const s = build(raw);
        // The added result on its own references (tag 'x'), so that the other items keep theirs.
        const added = build({ sex: raw.sex, measurements: [], coded: [], tests: [extra], fluids: [], vasos: [] }, 'x').dynamicTests[0]!;
        const base = runResponsiveness(contextOf(s, NOW, T));
        const ctx = contextOf({ ...s, dynamicTests: [added, ...s.dynamicTests] }, NOW, T);
        const full = runResponsiveness(ctx);
        expect(reassessWithDynamicTest(base, ctx, added.kind)).toEqual(full);
        expect(full.nextTest).toBe(base.nextTest);
        const own = DYNAMIC_TEST_RULES[added.kind];
        RESPONSIVENESS_RULES.forEach((rule, i) => {
          if (rule !== own) expect(full.byRule[i], rule.id).toEqual(base.byRule[i]);
          else if (JSON.stringify(full.byRule[i]) !== JSON.stringify(base.byRule[i])) ownChanged += 1;
        });
      }),
      { numRuns: RUNS },
    );
    // The added result does change its own rule's finding (else the property would compare nothing that varies).
    expect(ownChanged).toBeGreaterThan(RUNS / 10);
  });
});
