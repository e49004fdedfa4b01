/**
 * Codes that real records carry, read through the real snapshot reader (buildSnapshot): LOINC 2708-6 for the
 * saturation, 3150-0 as the inhaled-oxygen component of a pulse oximetry panel, SNOMED CT rhythm values,
 * Hartmann's and the RxNorm fluids, conditions coded the way problem lists code them, and a lung-ultrasound count
 * whose bodySite names one lung.
 */
import type { Observation } from 'fhir/r4.js';
import { describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import { classifyFluid } from '../../src/fhir/medications.js';
import { conditionsRule } from '../../src/assess/tolerance/conditions.js';
import { lungUltrasoundRule } from '../../src/assess/tolerance/lung-ultrasound.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';

const now = new Date('2026-11-20T14:00:00Z');
const P = 'pat-codes';
const t = (m: number) => b.minutesAgo(now, m);
const snap = (resources: unknown[]) => buildSnapshot(resources as never, { patientId: P }, now);
const LOINC = 'http://loinc.org';
const SCT = 'http://snomed.info/sct';
const RX = 'http://www.nlm.nih.gov/research/umls/rxnorm';
const pct = (value: number) => ({ value, unit: '%', system: 'http://unitsofmeasure.org', code: '%' });

/** A pulse oximetry Observation coded as the US Core profile codes it (invented values). */
function pulseOx(id: string, spo2: number, components: Observation['component'], codes = ['2708-6', '59408-5']): Observation {
  return {
    resourceType: 'Observation',
    id,
    status: 'final',
    subject: { reference: `Patient/${P}` },
    effectiveDateTime: t(10),
    code: { coding: codes.map((code) => ({ system: LOINC, code })) },
    valueQuantity: pct(spo2),
    ...(components ? { component: components } : {}),
  };
}

describe('saturation and inhaled oxygen', () => {
  it('LOINC 2708-6 alone is read as SpO2', () => {
    const s = snap([pulseOx('o1', 94, undefined, ['2708-6'])]);
    expect(s.measurements).toMatchObject([
      { kind: 'spo2', value: 94, unit: '%', ref: 'Observation/o1', original: { system: LOINC, code: '2708-6' } },
    ]);
  });
  it('the original names the code the record carried, also for a kind with several codes (venous lactate 2519-7)', () => {
    const lac: Observation = {
      resourceType: 'Observation',
      id: 'l1',
      status: 'final',
      subject: { reference: `Patient/${P}` },
      effectiveDateTime: t(20),
      code: {
        coding: [
          { system: 'urn:lab', code: 'LACV' },
          { system: LOINC, code: '2519-7' },
        ],
      },
      valueQuantity: { value: 2.1, unit: 'mmol/L', system: 'http://unitsofmeasure.org', code: 'mmol/L' },
    };
    expect(snap([lac]).measurements).toMatchObject([{ kind: 'lactate', value: 2.1, original: { system: LOINC, code: '2519-7' } }]);
  });
  it('a pulse oximetry panel gives SpO2 and, from its 3150-0 component, FiO2; the 3151-8 flow rate is not read', () => {
    const s = snap([
      pulseOx('o2', 92, [
        {
          code: { coding: [{ system: LOINC, code: '3151-8', display: 'Inhaled oxygen flow rate' }] },
          valueQuantity: { value: 6, unit: 'L/min', system: 'http://unitsofmeasure.org', code: 'L/min' },
        },
        { code: { coding: [{ system: LOINC, code: '3150-0', display: 'Inhaled oxygen concentration' }] }, valueQuantity: pct(40) },
      ]),
    ]);
    expect(s.measurements.map((m) => [m.kind, m.value, m.original.code])).toEqual([
      ['fio2', 40, '3150-0'],
      ['spo2', 92, '2708-6'],
    ]);
    expect(s.excluded).toEqual([]);
  });
  it('3150-0 as a fraction (unit 1) is converted to %', () => {
    const s = snap([
      pulseOx('o3', 97, [
        {
          code: { coding: [{ system: LOINC, code: '3150-0' }] },
          valueQuantity: { value: 0.21, unit: '1', system: 'http://unitsofmeasure.org', code: '1' },
        },
      ]),
    ]);
    expect(s.measurements.find((m) => m.kind === 'fio2')?.value).toBeCloseTo(21, 6);
  });
  it('a 3150-0 component with no value is listed as not usable, the saturation is kept', () => {
    const s = snap([pulseOx('o4', 95, [{ code: { coding: [{ system: LOINC, code: '3150-0' }] } }])]);
    expect(s.measurements.map((m) => m.kind)).toEqual(['spo2']);
    expect(s.excluded).toMatchObject([{ ref: 'Observation/o4', reason: 'no-value', kind: 'fio2' }]);
  });
});

describe('heart rhythm coded in SNOMED CT', () => {
  const rhythm = (id: string, code: string, display: string): Observation => ({
    resourceType: 'Observation',
    id,
    status: 'final',
    subject: { reference: `Patient/${P}` },
    effectiveDateTime: t(30),
    code: { coding: [{ system: LOINC, code: '8884-9', display: 'Heart rate rhythm' }] },
    valueCodeableConcept: { coding: [{ system: SCT, code, display }] },
  });
  it.each([
    ['426783006', 'Sinus rhythm', 'sinus'],
    ['64730000', 'Normal sinus rhythm', 'sinus'],
    ['427084000', 'Sinus tachycardia', 'sinus'],
    ['49436004', 'Atrial fibrillation', 'atrial-fibrillation'],
    ['164889003', 'Electrocardiographic atrial fibrillation', 'atrial-fibrillation'],
    ['5370000', 'Atrial flutter', 'other-irregular'],
    ['164890007', 'Electrocardiographic atrial flutter', 'other-irregular'],
  ])('%s %s → %s, with the original coding kept', (code, display, answer) => {
    const s = snap([rhythm('r1', code, display)]);
    expect(s.coded).toMatchObject([{ kind: 'heartRhythm', answer, original: { system: SCT, code, display } }]);
  });
  it('a SNOMED CT concept not on the list is excluded as an unknown answer, not read as sinus', () => {
    const s = snap([rhythm('r2', '71908006', 'Ventricular fibrillation')]);
    expect(s.coded).toEqual([]);
    expect(s.excluded).toMatchObject([{ ref: 'Observation/r2', reason: 'unknown-answer', kind: 'heartRhythm' }]);
  });
  it('a rhythm code under another system is not read', () => {
    const s = snap([
      { ...rhythm('r3', '426783006', 'Sinus rhythm'), valueCodeableConcept: { coding: [{ system: 'urn:local', code: '426783006' }] } },
    ]);
    expect(s.coded).toEqual([]);
  });
});

describe('fluids', () => {
  const given = (id: string, medication: object) => b.administration(id, P, medication as never, 500, t(90), t(60));
  it.each([
    ["Hartmann's solution for infusion", 'balanced-crystalloid'],
    ['Compound sodium lactate intravenous infusion', 'balanced-crystalloid'],
    ['Hartmanns 1000 mL', 'balanced-crystalloid'],
    ['HARTMANN’S SOLUTION', 'balanced-crystalloid'],
  ])('"%s" is read as %s', (text, cls) => {
    const s = snap([given('f1', { text })]);
    expect(s.fluids).toMatchObject([{ fluidClass: cls, volumeMl: 500, display: text }]);
  });
  it.each([["Hartmann's procedure"], ['Reversal of Hartmann’s'], ['Hartmanns operation, laparoscopic'], ['Hartmann pouch leak']])(
    'the operation "%s" in a ServiceRequest is not a fluid order',
    (text) => {
      const s = buildSnapshot([], { patientId: P, draftOrders: { entry: [{ resource: b.serviceOrder('sr1', P, text, t(1)) }] } }, now);
      expect(s.draftOrders).toMatchObject([{ ref: 'ServiceRequest/sr1', isFluid: false }]);
    },
  );
  it("RxNorm 847630 (lactated Ringer's clinical drug) is read by code, whatever the text", () => {
    const s = snap([given('f2', { coding: [{ system: RX, code: '847630' }], text: 'LR' })]);
    expect(s.fluids).toMatchObject([{ fluidClass: 'balanced-crystalloid' }]);
  });
  it('an RxNorm code under another system is not read as one', () => {
    expect(classifyFluid({ coding: [{ system: 'urn:local', code: '847630' }] })).toBeUndefined();
  });
  it('an unknown RxNorm code falls back to the generic name', () => {
    expect(classifyFluid({ coding: [{ system: RX, code: '99999999', display: 'Albumin human 25 % solution' }] })).toBe('albumin-hyper');
  });
});

describe('conditions coded as problem lists code them, through the snapshot into the tolerance rule', () => {
  const T = resolveThresholds({}).tolerance;
  it.each([
    ['http://hl7.org/fhir/sid/icd-10-cm', 'I27.21', 'Secondary pulmonary arterial hypertension', 'pulmonary-hypertension'],
    ['http://hl7.org/fhir/sid/icd-10-cm', 'I5081', 'Right heart failure (undotted)', 'heart-failure,right-ventricular-failure'],
    [SCT, '441481004', 'Chronic systolic heart failure', 'heart-failure'],
    [SCT, '714152005', 'Chronic kidney disease stage 5 on dialysis', 'end-stage-kidney-disease'],
    [SCT, '89580002', 'Cryptogenic cirrhosis', 'advanced-liver-disease'],
  ])('%s %s (%s) → %s', (system, code, display, sets) => {
    const s = snap([b.condition('c1', P, system, code, display)]);
    const f = conditionsRule(s, now, T)[0]!;
    expect(f).toMatchObject({ limit: 'moderate', values: { matchedSets: sets } }); // assessment v2: the limit is a typed field
  });
});

describe('lung ultrasound per side, through the snapshot into the tolerance rule', () => {
  const MARKER = 'https://tidemark.invalid/fhir/CodeSystem/marker';
  const regions = (value: number, code = '{regions}') => ({ value, unit: code, system: 'http://unitsofmeasure.org', code });
  const lus = (id: string, code: string, value: number, extra: Partial<Observation> = {}): Observation => ({
    resourceType: 'Observation',
    id,
    status: 'final',
    subject: { reference: `Patient/${P}` },
    effectiveDateTime: t(30),
    code: { coding: [{ system: MARKER, code }] },
    valueQuantity: regions(value),
    ...extra,
  });
  const site = (...codes: string[]) => ({ bodySite: { coding: codes.map((code) => ({ system: SCT, code })) } });
  const T = resolveThresholds({}).tolerance;

  it('the per-side markers are read as left and right counts (of 4)', () => {
    const s = snap([lus('l1', 'lung-us-b-regions-left', 3), lus('r1', 'lung-us-b-regions-right', 2)]);
    expect(s.measurements.map((m) => [m.kind, m.value, m.unit])).toEqual([
      ['bLineRegionsLeft', 3, '{regions}'],
      ['bLineRegionsRight', 2, '{regions}'],
    ]);
    expect(lungUltrasoundRule(s, now, T)[0]).toMatchObject({ limit: 'severe', harmSign: true, values: { pattern: 'diffuse' } });
  });
  it("the whole-chest code with bodySite left lung (SNOMED CT 44029006) / right lung (3341006) is that side's count; the original keeps the code sent", () => {
    const s = snap([lus('w1', 'lung-us-b-regions', 0, site('44029006')), lus('w2', 'lung-us-b-regions', 4, site('3341006'))]);
    expect(s.measurements.map((m) => [m.kind, m.value, m.original.code])).toEqual([
      ['bLineRegionsLeft', 0, 'lung-us-b-regions'],
      ['bLineRegionsRight', 4, 'lung-us-b-regions'],
    ]);
    expect(lungUltrasoundRule(s, now, T)[0]).toMatchObject({ limit: 'moderate', harmSign: false, values: { pattern: 'one-sided' } });
  });
  it('no bodySite, another site (lung structure 39607008), or both lungs named at once: whole chest, side unknown', () => {
    for (const extra of [{}, site('39607008'), site('44029006', '3341006')]) {
      const s = snap([lus('w3', 'lung-us-b-regions', 6, extra)]);
      expect(s.measurements.map((m) => m.kind)).toEqual(['bLineRegions']);
      expect(lungUltrasoundRule(s, now, T)[0]).toMatchObject({ limit: 'moderate', harmSign: false, values: { sideRecorded: false } });
    }
  });
  it('more than 4 regions on one lung is impossible and left out; a wrong unit is left out', () => {
    const s = snap([
      lus('x1', 'lung-us-b-regions', 5, site('44029006')),
      lus('x2', 'lung-us-b-regions-right', 3, { valueQuantity: regions(3, '%') }),
    ]);
    expect(s.measurements).toEqual([]);
    expect(s.excluded).toMatchObject([
      { ref: 'Observation/x1', reason: 'impossible-value', kind: 'bLineRegionsLeft' },
      { ref: 'Observation/x2', reason: 'incompatible-unit', kind: 'bLineRegionsRight' },
    ]);
    expect(lungUltrasoundRule(s, now, T)[0]!.status).toBe('not-assessed');
  });
});
