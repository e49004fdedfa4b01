/**
 * Builders for valid FHIR R4 resources of invented patients, used by the example scenarios, the demo and the
 * tests. Codes come from src/fhir/codes.ts so fixtures and the reader agree.
 */
import type {
  Bundle,
  Condition,
  Encounter,
  FhirResource,
  MedicationAdministration,
  MedicationRequest,
  Observation,
  Patient,
  ServiceRequest,
} from 'fhir/r4.js';
import {
  CODED_OBSERVATION_CODES,
  DYNAMIC_COMPONENT,
  DYNAMIC_TEST_CODES,
  KIND_UNITS,
  OBSERVATION_CODES,
  RXNORM,
  TIDEMARK_ANSWERS,
  TIDEMARK_MARKERS,
  UCUM,
  type CodedKind,
  type DynamicMeasured,
  type DynamicTestKind,
  type NumericKind,
} from '../../src/fhir/codes.js';

const VITAL_KINDS: readonly NumericKind[] = [
  'heartRate',
  'systolicBp',
  'diastolicBp',
  'meanBp',
  'respiratoryRate',
  'spo2',
  'bodyWeight',
  'bodyHeight',
];
const LAB_KINDS: readonly NumericKind[] = ['lactate', 'albumin', 'creatinine'];

/** ISO instant `minutes` before `now` (UTC, Z: the embedded server sorts raw strings). */
export function minutesAgo(now: Date, minutes: number): string {
  return new Date(now.getTime() - minutes * 60_000).toISOString().replace(/\.\d{3}Z$/, 'Z');
}

export function patient(id: string, gender: Patient['gender'], birthDate: string, family: string, given: string): Patient {
  return { resourceType: 'Patient', id, gender, birthDate, name: [{ family, given: [given] }] };
}

export function encounter(id: string, patientId: string, start: string): Encounter {
  return {
    resourceType: 'Encounter',
    id,
    status: 'in-progress',
    class: { system: 'http://terminology.hl7.org/CodeSystem/v3-ActCode', code: 'IMP', display: 'inpatient encounter' },
    subject: { reference: `Patient/${patientId}` },
    period: { start },
  };
}

function category(kind: string): Observation['category'] {
  let code = LAB_KINDS.includes(kind as NumericKind) ? 'laboratory' : 'procedure';
  if (VITAL_KINDS.includes(kind as NumericKind)) code = 'vital-signs';
  return [{ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/observation-category', code }] }];
}

export interface ObsOptions {
  unit?: string;
  status?: Observation['status'];
  periodStart?: string;
  /** Observation.bodySite, e.g. one lung for a lung-ultrasound count (SNOMED CT body structure). */
  bodySite?: { system: string; code: string; display: string };
}

/** A numeric Observation in UCUM (the kind's canonical unit unless `unit` is given). */
export function numeric(
  id: string,
  patientId: string,
  kind: NumericKind,
  value: number,
  effective: string,
  opts: ObsOptions = {},
): Observation {
  const code = OBSERVATION_CODES.find((c) => c.kind === kind);
  if (!code) throw new Error(`no code for ${kind}`);
  const unit = opts.unit ?? KIND_UNITS[kind];
  return {
    resourceType: 'Observation',
    id,
    status: opts.status ?? 'final',
    category: category(kind),
    code: { coding: [{ system: code.system, code: code.code, display: code.display }], text: code.display },
    subject: { reference: `Patient/${patientId}` },
    ...(opts.periodStart ? { effectivePeriod: { start: opts.periodStart, end: effective } } : { effectiveDateTime: effective }),
    valueQuantity: { value, unit: unit.replace(/[[\]]/g, ''), system: UCUM, code: unit },
    ...(opts.bodySite ? { bodySite: { coding: [opts.bodySite], text: opts.bodySite.display } } : {}),
  };
}

export function coded(id: string, patientId: string, kind: CodedKind, answer: string, effective: string): Observation {
  const code =
    CODED_OBSERVATION_CODES.find((c) => c.kind === kind && c.system === TIDEMARK_MARKERS) ??
    CODED_OBSERVATION_CODES.find((c) => c.kind === kind);
  if (!code) throw new Error(`no code for ${kind}`);
  return {
    resourceType: 'Observation',
    id,
    status: 'final',
    category: category(kind),
    code: { coding: [{ system: code.system, code: code.code, display: code.display }], text: code.display },
    subject: { reference: `Patient/${patientId}` },
    effectiveDateTime: effective,
    valueCodeableConcept: { coding: [{ system: TIDEMARK_ANSWERS, code: answer, display: answer.replace(/-/g, ' ') }] },
  };
}

const MEASURED_UNIT: Record<DynamicMeasured, string> = {
  cardiacOutput: 'L/min',
  cardiacIndex: 'L/min/m2',
  strokeVolume: 'mL',
  pulsePressure: 'mm[Hg]',
  vti: 'cm',
  ppv: '%',
  svv: '%',
};

export function dynamicTest(
  id: string,
  patientId: string,
  kind: DynamicTestKind,
  measured: DynamicMeasured,
  before: number,
  after: number,
  effective: string,
): Observation {
  const code = DYNAMIC_TEST_CODES.find((c) => c.kind === kind);
  if (!code) throw new Error(`no code for ${kind}`);
  const unit = MEASURED_UNIT[measured];
  const q = (value: number) => ({ value, unit: unit.replace(/[[\]]/g, ''), system: UCUM, code: unit });
  return {
    resourceType: 'Observation',
    id,
    status: 'final',
    category: category(kind),
    code: { coding: [{ system: code.system, code: code.code, display: code.display }], text: code.display },
    subject: { reference: `Patient/${patientId}` },
    effectiveDateTime: effective,
    component: [
      {
        code: { coding: [{ system: TIDEMARK_MARKERS, code: DYNAMIC_COMPONENT.measured }] },
        valueCodeableConcept: { coding: [{ system: TIDEMARK_ANSWERS, code: measured }] },
      },
      { code: { coding: [{ system: TIDEMARK_MARKERS, code: DYNAMIC_COMPONENT.before }] }, valueQuantity: q(before) },
      { code: { coding: [{ system: TIDEMARK_MARKERS, code: DYNAMIC_COMPONENT.after }] }, valueQuantity: q(after) },
    ],
  };
}

export function condition(id: string, patientId: string, system: string, code: string, display: string): Condition {
  return {
    resourceType: 'Condition',
    id,
    subject: { reference: `Patient/${patientId}` },
    clinicalStatus: { coding: [{ system: 'http://terminology.hl7.org/CodeSystem/condition-clinical', code: 'active' }] },
    verificationStatus: { coding: [{ system: 'http://terminology.hl7.org/CodeSystem/condition-ver-status', code: 'confirmed' }] },
    code: { coding: [{ system, code, display }], text: display },
  };
}

export const FLUIDS = {
  saline: {
    coding: [{ system: RXNORM, code: '313002', display: 'Sodium Chloride 9 MG/ML Injectable Solution' }],
    text: 'Sodium chloride 0.9 % infusion',
  },
  lactatedRinger: { text: "Lactated Ringer's solution for infusion" },
  albumin20: { text: 'Albumin human 20 % solution for infusion' },
  albumin5: { text: 'Albumin human 5 % solution for infusion' },
  norepinephrine: { coding: [{ system: RXNORM, code: '7512', display: 'norepinephrine' }], text: 'Norepinephrine infusion' },
} as const;

export function administration(
  id: string,
  patientId: string,
  medication: (typeof FLUIDS)[keyof typeof FLUIDS],
  volumeMl: number | undefined,
  start: string,
  end: string,
  rate?: { value: number; unit: string },
): MedicationAdministration {
  return {
    resourceType: 'MedicationAdministration',
    id,
    status: 'completed',
    subject: { reference: `Patient/${patientId}` },
    medicationCodeableConcept: structuredClone(medication) as MedicationAdministration['medicationCodeableConcept'],
    effectivePeriod: { start, end },
    dosage: {
      route: { coding: [{ system: 'http://snomed.info/sct', code: '47625008', display: 'Intravenous route' }] },
      ...(volumeMl !== undefined ? { dose: { value: volumeMl, unit: 'mL', system: UCUM, code: 'mL' } } : {}),
      ...(rate ? { rateQuantity: { value: rate.value, unit: rate.unit, system: UCUM, code: rate.unit } } : {}),
    },
  };
}

/** A draft IV bolus order: `volumeMl` over `minutes`. */
export function bolusOrder(
  id: string,
  patientId: string,
  medication: (typeof FLUIDS)[keyof typeof FLUIDS],
  volumeMl: number,
  minutes: number,
  authoredOn: string,
): MedicationRequest {
  return {
    resourceType: 'MedicationRequest',
    id,
    status: 'draft',
    intent: 'order',
    subject: { reference: `Patient/${patientId}` },
    authoredOn,
    medicationCodeableConcept: structuredClone(medication) as MedicationRequest['medicationCodeableConcept'],
    dosageInstruction: [
      {
        text: `${volumeMl} mL IV over ${minutes} min`,
        timing: { repeat: { count: 1, duration: minutes, durationUnit: 'min' } },
        route: { coding: [{ system: 'http://snomed.info/sct', code: '47625008', display: 'Intravenous route' }] },
        doseAndRate: [{ doseQuantity: { value: volumeMl, unit: 'mL', system: UCUM, code: 'mL' } }],
      },
    ],
  };
}

export function otherOrder(id: string, patientId: string, text: string, authoredOn: string): MedicationRequest {
  return {
    resourceType: 'MedicationRequest',
    id,
    status: 'draft',
    intent: 'order',
    subject: { reference: `Patient/${patientId}` },
    authoredOn,
    medicationCodeableConcept: { text },
  };
}

export function serviceOrder(id: string, patientId: string, text: string, authoredOn: string): ServiceRequest {
  return {
    resourceType: 'ServiceRequest',
    id,
    status: 'draft',
    intent: 'order',
    subject: { reference: `Patient/${patientId}` },
    authoredOn,
    code: { text },
  };
}

export function searchset(resources: FhirResource[], next?: string): Bundle {
  return {
    resourceType: 'Bundle',
    type: 'searchset',
    total: resources.length,
    ...(next ? { link: [{ relation: 'next', url: next }] } : {}),
    entry: resources.map((resource) => ({ resource, search: { mode: 'match' as const } })),
  };
}

export function transaction(resources: FhirResource[]): Bundle {
  return {
    resourceType: 'Bundle',
    type: 'transaction',
    entry: resources.map((resource) => ({
      resource,
      request: { method: 'PUT' as const, url: `${resource.resourceType}/${resource.id ?? ''}` },
    })),
  };
}
