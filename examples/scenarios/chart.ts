/**
 * A small charting helper for the scenarios: writes series of valid FHIR R4 resources for one invented patient
 * with times given as "minutes before now" (UTC Z), using the shared builders in ../lib/fhir-builders.ts.
 * Ids are `<prefix>-<what>-<n>`, unique within a scenario (and across scenarios by their prefix).
 */
import type { Condition, Encounter, FhirResource, MedicationAdministration, MedicationRequest, Observation } from 'fhir/r4.js';
import type { CodedKind, DynamicMeasured, DynamicTestKind, NumericKind } from '../../src/fhir/codes.js';
import { SNOMED } from '../../src/fhir/codes.js';
import * as b from '../lib/fhir-builders.js';

export const HOSPITAL = 'Harbourside General Hospital';

/** One row of bedside vitals. `map` is the measured mean (arterial line or cuff). */
export interface VitalsRow {
  at: number;
  hr: number;
  sbp: number;
  dbp: number;
  map: number;
  rr?: number;
  spo2?: number;
}

/** SNOMED CT concepts used by the scenarios (clinical findings; the tolerance lists use the first four). */
export const CONDITIONS = {
  cirrhosis: { code: '19943007', display: 'Cirrhosis of liver' },
  heartFailure: { code: '84114007', display: 'Heart failure' },
  ards: { code: '67782005', display: 'Acute respiratory distress syndrome' },
  pneumonia: { code: '233604007', display: 'Pneumonia' },
  sepsis: { code: '91302008', display: 'Sepsis' },
} as const;

const SHORT: Partial<Record<NumericKind, string>> = {
  heartRate: 'hr',
  systolicBp: 'sbp',
  diastolicBp: 'dbp',
  meanBp: 'map',
  respiratoryRate: 'rr',
  spo2: 'spo2',
  fio2: 'fio2',
  bodyWeight: 'wt',
  bodyHeight: 'ht',
  cvp: 'cvp',
  lactate: 'lac',
  albumin: 'alb',
  creatinine: 'cre',
  urineOutput: 'uo',
  fluidIntake: 'in',
  fluidOutput: 'out',
  fluidBalance: 'bal',
  cardiacOutput: 'co',
  ppv: 'ppv',
  svv: 'svv',
  ivcDiameterMax: 'ivcmax',
  ivcDiameterMin: 'ivcmin',
  capillaryRefill: 'crt',
  tidalVolume: 'vt',
  peep: 'peep',
  intraAbdominalPressure: 'iap',
  edemaGrade: 'oed',
  bLineRegions: 'blines',
  bLineRegionsLeft: 'blinesl',
  bLineRegionsRight: 'blinesr',
  portalPulsatility: 'portal',
};

export class Chart {
  readonly resources: FhirResource[] = [];
  private n = 0;

  constructor(
    readonly prefix: string,
    readonly patientId: string,
    readonly now: Date,
  ) {}

  /** ISO instant `minutes` before now. */
  t(minutes: number): string {
    return b.minutesAgo(this.now, minutes);
  }

  id(what: string): string {
    this.n += 1;
    return `${this.prefix}-${what}-${String(this.n).padStart(3, '0')}`;
  }

  add<T extends FhirResource>(r: T): T {
    this.resources.push(r);
    return r;
  }

  patient(gender: 'male' | 'female', birthDate: string, family: string, given: string): this {
    this.add(b.patient(this.patientId, gender, birthDate, family, given));
    return this;
  }

  /** The ICU stay, started `startMinAgo` minutes ago, on an invented ward. */
  encounter(id: string, startMinAgo: number, ward: string): this {
    const e: Encounter = {
      ...b.encounter(id, this.patientId, this.t(startMinAgo)),
      location: [{ location: { display: `${ward}, ${HOSPITAL}` }, status: 'active' }],
      serviceProvider: { display: HOSPITAL },
    };
    this.add(e);
    return this;
  }

  /** A numeric Observation in the kind's canonical unit (or `opts.unit`). */
  obs(kind: NumericKind, value: number, minAgo: number, opts: b.ObsOptions = {}): Observation {
    return this.add(b.numeric(this.id(SHORT[kind] ?? kind), this.patientId, kind, value, this.t(minAgo), opts));
  }

  num(kind: NumericKind, value: number, minAgo: number, opts: b.ObsOptions = {}): this {
    this.obs(kind, value, minAgo, opts);
    return this;
  }

  /** A value with a period: from `fromMinAgo` to `toMinAgo` (intake, output, urine). */
  period(kind: NumericKind, value: number, fromMinAgo: number, toMinAgo: number): this {
    return this.num(kind, value, toMinAgo, { periodStart: this.t(fromMinAgo) });
  }

  series(kind: NumericKind, points: ReadonlyArray<readonly [minAgo: number, value: number]>): this {
    for (const [at, v] of points) this.num(kind, v, at);
    return this;
  }

  coded(kind: CodedKind, answer: string, minAgo: number): this {
    this.add(b.coded(this.id(kind.toLowerCase()), this.patientId, kind, answer, this.t(minAgo)));
    return this;
  }

  /** The same coded answer charted at several times (ventilation state, rhythm). */
  codedSeries(kind: CodedKind, answer: string, times: readonly number[]): this {
    for (const at of times) this.coded(kind, answer, at);
    return this;
  }

  vitals(rows: readonly VitalsRow[]): this {
    for (const r of rows) {
      this.num('heartRate', r.hr, r.at);
      this.num('systolicBp', r.sbp, r.at);
      this.num('diastolicBp', r.dbp, r.at);
      this.num('meanBp', r.map, r.at);
      if (r.rr !== undefined) this.num('respiratoryRate', r.rr, r.at);
      if (r.spo2 !== undefined) this.num('spo2', r.spo2, r.at);
    }
    return this;
  }

  dynamic(kind: DynamicTestKind, measured: DynamicMeasured, before: number, after: number, minAgo: number): this {
    this.add(b.dynamicTest(this.id(kind.toLowerCase()), this.patientId, kind, measured, before, after, this.t(minAgo)));
    return this;
  }

  /** IVC maximum and minimum diameter over one breath, measured together. */
  ivc(maxCm: number, minCm: number, minAgo: number): this {
    this.num('ivcDiameterMax', maxCm, minAgo);
    this.num('ivcDiameterMin', minCm, minAgo);
    return this;
  }

  /** Hourly urine output (each with its hour as period) from `fromMinAgo` down to `toMinAgo`. */
  hourlyUrine(fromMinAgo: number, toMinAgo: number, mlPerHour: (i: number) => number): this {
    let i = 0;
    for (let start = fromMinAgo; start - 60 >= toMinAgo; start -= 60, i += 1) this.period('urineOutput', mlPerHour(i), start, start - 60);
    return this;
  }

  /** Intake and output totals for charting periods (shifts): [fromMinAgo, toMinAgo, intakeMl, outputMl]. */
  shifts(rows: ReadonlyArray<readonly [fromMinAgo: number, toMinAgo: number, intakeMl: number, outputMl: number]>): this {
    for (const [from, to, inMl, outMl] of rows) {
      this.period('fluidIntake', inMl, from, to);
      this.period('fluidOutput', outMl, from, to);
    }
    return this;
  }

  condition(c: { code: string; display: string }, onsetMinAgo?: number, clinicalStatus: 'active' | 'resolved' = 'active'): this {
    const cond: Condition = b.condition(this.id('cond'), this.patientId, SNOMED, c.code, c.display);
    if (clinicalStatus !== 'active')
      cond.clinicalStatus = { coding: [{ system: 'http://terminology.hl7.org/CodeSystem/condition-clinical', code: clinicalStatus }] };
    this.add(onsetMinAgo === undefined ? cond : { ...cond, onsetDateTime: this.t(onsetMinAgo) });
    return this;
  }

  /** A completed IV fluid administration of `ml` from `startMinAgo` to `endMinAgo`. */
  fluidGiven(medication: (typeof b.FLUIDS)[keyof typeof b.FLUIDS], ml: number, startMinAgo: number, endMinAgo: number): this {
    this.add(b.administration(this.id('ma'), this.patientId, medication, ml, this.t(startMinAgo), this.t(endMinAgo)));
    return this;
  }

  /** A running norepinephrine infusion since `startMinAgo` at a steady rate (MedicationAdministration in progress). */
  norepinephrineRunning(startMinAgo: number, mcgPerKgPerMin: number): this {
    const ma = b.administration(this.id('ma'), this.patientId, b.FLUIDS.norepinephrine, undefined, this.t(startMinAgo), this.t(0), {
      value: mcgPerKgPerMin,
      unit: 'ug/kg/min',
    });
    const running: MedicationAdministration = { ...ma, status: 'in-progress', effectivePeriod: { start: this.t(startMinAgo) } };
    this.add(running);
    return this;
  }

  /** A standing (signed) medication order: an active norepinephrine infusion, or a finished one. */
  order(
    medication: (typeof b.FLUIDS)[keyof typeof b.FLUIDS],
    authoredMinAgo: number,
    status: 'active' | 'completed' | 'stopped',
    rate?: { value: number; unit: string },
  ): this {
    const req: MedicationRequest = {
      resourceType: 'MedicationRequest',
      id: this.id('mr'),
      status,
      intent: 'order',
      subject: { reference: `Patient/${this.patientId}` },
      authoredOn: this.t(authoredMinAgo),
      medicationCodeableConcept: structuredClone(medication) as MedicationRequest['medicationCodeableConcept'],
      dosageInstruction: [
        {
          text: rate ? `${rate.value} ${rate.unit} IV, titrated to MAP` : 'IV as directed',
          route: { coding: [{ system: SNOMED, code: '47625008', display: 'Intravenous route' }] },
          ...(rate
            ? {
                doseAndRate: [
                  { rateQuantity: { value: rate.value, unit: rate.unit, system: 'http://unitsofmeasure.org', code: rate.unit } },
                ],
              }
            : {}),
        },
      ],
    };
    this.add(req);
    return this;
  }

  /** The bolus being ordered now (a draft MedicationRequest, not on the server). */
  static bolusDraft(
    id: string,
    patientId: string,
    now: Date,
    medication: (typeof b.FLUIDS)[keyof typeof b.FLUIDS],
    ml: number,
    minutes: number,
  ): MedicationRequest {
    return b.bolusOrder(id, patientId, medication, ml, minutes, b.minutesAgo(now, 1));
  }
}

/** Times every `step` minutes from `from` down to `to` (inclusive), e.g. every(240, 0, 15). */
export function every(from: number, to: number, step: number): number[] {
  const out: number[] = [];
  for (let m = from; m >= to; m -= step) out.push(m);
  return out;
}

/** A gentle deterministic wobble (no randomness: scenarios are reproducible). */
export function wobble(i: number, amplitude: number): number {
  return Math.round(Math.sin(i * 1.7) * amplitude);
}
