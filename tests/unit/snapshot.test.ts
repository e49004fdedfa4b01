// Snapshot normalization: provenance, canonical units and the flags that exclude a value with a reason.
import { describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import { TIDEMARK_ANSWERS } from '../../src/fhir/codes.js';

const now = new Date('2026-11-20T14:00:00Z');
const P = 'pat-s1';
const t = (m: number) => b.minutesAgo(now, m);
const snap = (resources: unknown[], extra: object = {}) => buildSnapshot(resources as never, { patientId: P, ...extra }, now);

describe('buildSnapshot', () => {
  it('keeps provenance: canonical value, original value/unit, time, age and reference', () => {
    const s = snap([b.numeric('alb-1', P, 'albumin', 2.5, t(90), { unit: 'g/dL' })]);
    expect(s.measurements).toEqual([
      {
        kind: 'albumin',
        value: 25,
        unit: 'g/L',
        original: { value: 2.5, unit: 'g/dL', code: '1751-7', system: 'http://loinc.org' },
        effective: '2026-11-20T12:30:00.000Z',
        ageMinutes: 90,
        ref: 'Observation/alb-1',
      },
    ]);
  });

  it.each([
    ['unknown unit', b.numeric('x1', P, 'heartRate', 80, t(5), { unit: 'furlongs' }), 'unknown-unit'],
    ['incompatible unit', b.numeric('x2', P, 'lactate', 2, t(5), { unit: 'kg' }), 'incompatible-unit'],
    ['impossible value', b.numeric('x3', P, 'heartRate', 900, t(5)), 'impossible-value'],
    ['a time in the future', b.numeric('x4', P, 'heartRate', 80, new Date(now.getTime() + 3600_000).toISOString()), 'future-time'],
    ['entered-in-error', b.numeric('x5', P, 'heartRate', 80, t(5), { status: 'entered-in-error' }), 'entered-in-error'],
    ['cancelled', b.numeric('x6', P, 'heartRate', 80, t(5), { status: 'cancelled' }), 'cancelled'],
    ['another patient', b.numeric('x7', 'someone-else', 'heartRate', 80, t(5)), 'other-patient'],
    [
      'a censored value (<)',
      {
        ...b.numeric('x8', P, 'lactate', 0.5, t(5)),
        valueQuantity: { value: 0.5, comparator: '<', unit: 'mmol/L', system: 'http://unitsofmeasure.org', code: 'mmol/L' },
      },
      'censored-value',
    ],
  ])('flags and excludes %s', (_name, resource, reason) => {
    const s = snap([resource]);
    expect(s.measurements).toHaveLength(0);
    expect(s.excluded).toHaveLength(1);
    expect(s.excluded[0]?.reason).toBe(reason);
    expect(s.excluded[0]?.ref).toBe(`Observation/${(resource as { id: string }).id}`);
  });

  it('allows five minutes of clock skew before calling a time future', () => {
    const s = snap([b.numeric('skew', P, 'heartRate', 80, new Date(now.getTime() + 4 * 60_000).toISOString())]);
    expect(s.measurements).toHaveLength(1);
  });

  it('reads blood pressure panel components (LOINC 85354-9 with 8480-6 / 8462-4)', () => {
    const panel = {
      resourceType: 'Observation',
      id: 'bp-panel',
      status: 'final',
      subject: { reference: `Patient/${P}` },
      effectiveDateTime: t(3),
      code: { coding: [{ system: 'http://loinc.org', code: '85354-9' }] },
      component: [
        {
          code: { coding: [{ system: 'http://loinc.org', code: '8480-6' }] },
          valueQuantity: { value: 101, unit: 'mmHg', system: 'http://unitsofmeasure.org', code: 'mm[Hg]' },
        },
        {
          code: { coding: [{ system: 'http://loinc.org', code: '8462-4' }] },
          valueQuantity: { value: 55, unit: 'mmHg', system: 'http://unitsofmeasure.org', code: 'mm[Hg]' },
        },
      ],
    };
    const s = snap([panel]);
    expect(s.measurements.map((m) => [m.kind, m.value, m.ref])).toEqual([
      ['diastolicBp', 55, 'Observation/bp-panel'],
      ['systolicBp', 101, 'Observation/bp-panel'],
    ]);
  });

  it('sorts each kind newest first and reads coded answers and dynamic tests', () => {
    const s = snap([
      b.numeric('hr-old', P, 'heartRate', 100, t(50)),
      b.numeric('hr-new', P, 'heartRate', 90, t(5)),
      b.coded('vm', P, 'ventilationMode', 'controlled-no-effort', t(15)),
      b.dynamicTest('plr', P, 'plr', 'cardiacOutput', 4.0, 4.5, t(20)),
    ]);
    expect(s.measurements.map((m) => m.ref)).toEqual(['Observation/hr-new', 'Observation/hr-old']);
    expect(s.coded).toMatchObject([{ kind: 'ventilationMode', answer: 'controlled-no-effort', ageMinutes: 15 }]);
    expect(s.dynamicTests).toMatchObject([{ kind: 'plr', measured: 'cardiacOutput', before: 4, after: 4.5, unit: 'L/min' }]);
  });

  it('refuses a coded answer it does not know', () => {
    const o = b.coded('vm2', P, 'ventilationMode', 'controlled-no-effort', t(15));
    o.valueCodeableConcept = { coding: [{ system: TIDEMARK_ANSWERS, code: 'sideways' }] };
    expect(snap([o]).excluded[0]?.reason).toBe('unknown-answer');
  });

  it('reads fluids given (volume in mL) and vasoactives, and ignores other drugs', () => {
    const s = snap([
      b.administration('ma-1', P, b.FLUIDS.saline, 1, t(120), t(90)),
      b.administration('ma-2', P, b.FLUIDS.norepinephrine, undefined, t(300), t(10), { value: 0.1, unit: 'ug/kg/min' }),
      { ...b.administration('ma-3', P, b.FLUIDS.saline, 500, t(60), t(30)), medicationCodeableConcept: { text: 'Paracetamol 1 g' } },
    ]);
    expect(s.fluids).toHaveLength(1);
    expect(s.fluids[0]).toMatchObject({ fluidClass: 'saline', volumeMl: 1, status: 'completed' });
    expect(s.vasoactives).toMatchObject([{ drug: 'norepinephrine', rate: { value: 0.1, unit: 'ug/kg/min' } }]);
  });

  it('converts an administration volume in litres', () => {
    const a = b.administration('ma-4', P, b.FLUIDS.lactatedRinger, 1, t(120), t(60));
    a.dosage = { dose: { value: 1, unit: 'L', system: 'http://unitsofmeasure.org', code: 'L' } };
    expect(snap([a]).fluids[0]?.volumeMl).toBeCloseTo(1000, 6);
  });

  it('reads draft orders: volume, fluid class, selection; non-fluid orders are not fluids', () => {
    const bolus = b.bolusOrder('mr-1', P, b.FLUIDS.lactatedRinger, 500, 30, t(1));
    const other = b.otherOrder('mr-2', P, 'Paracetamol 1 g IV', t(1));
    const rate = b.bolusOrder('mr-3', P, b.FLUIDS.saline, 250, 15, t(1));
    rate.dosageInstruction = [
      {
        timing: { repeat: { duration: 2, durationUnit: 'h' } },
        doseAndRate: [{ rateQuantity: { value: 125, unit: 'mL/h', system: 'http://unitsofmeasure.org', code: 'mL/h' } }],
      },
    ];
    const s = snap([], {
      selections: ['MedicationRequest/mr-1', 'MedicationRequest/mr-3'],
      draftOrders: { entry: [{ resource: bolus }, { resource: other }, { resource: rate }] },
    });
    expect(s.draftOrders.map((o) => [o.id, o.selected, o.isFluid, o.fluidClass, o.volumeMl])).toEqual([
      ['mr-1', true, true, 'balanced-crystalloid', 500],
      ['mr-2', false, false, undefined, undefined],
      ['mr-3', true, true, 'saline', 250],
    ]);
  });

  it('reads sex and age from Patient and the admission time from Encounter', () => {
    const s = snap([b.patient(P, 'male', '1950-11-21', 'Tern', 'Oskar'), b.encounter('e1', P, '2026-11-19T08:00:00Z')], {
      encounterId: 'e1',
    });
    expect(s.patient).toEqual({ ref: `Patient/${P}`, sex: 'male', birthDate: '1950-11-21', ageYears: 75 });
    expect(s.encounter).toMatchObject({ ref: 'Encounter/e1', start: '2026-11-19T08:00:00.000Z' });
  });
});

describe('fluid ordered as a ServiceRequest', () => {
  it('reads the fluid class from the text and the volume from quantityQuantity', () => {
    const sr = b.serviceOrder('sr-1', P, 'Fluid bolus: compound sodium lactate', t(1));
    (sr as any).quantityQuantity = { value: 0.5, unit: 'L', system: 'http://unitsofmeasure.org', code: 'L' };
    const s = snap([], { draftOrders: { entry: [{ resource: sr }, { resource: b.serviceOrder('sr-2', P, 'Chest X-ray', t(1)) }] } });
    expect(s.draftOrders.map((o) => [o.ref, o.isFluid, o.fluidClass, o.volumeMl])).toEqual([
      ['ServiceRequest/sr-1', true, 'balanced-crystalloid', 500],
      ['ServiceRequest/sr-2', false, undefined, undefined],
    ]);
  });
  it('an oral or subcutaneous route is not an IV bolus', () => {
    const mr = b.bolusOrder('mr-po', P, b.FLUIDS.saline, 500, 30, t(1));
    mr.dosageInstruction![0]!.route = { text: 'oral' };
    expect(snap([], { draftOrders: { entry: [{ resource: mr }] } }).draftOrders[0]?.isFluid).toBe(false);
  });
});
