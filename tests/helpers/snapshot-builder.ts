/**
 * A small builder for PatientSnapshot objects in tests (invented data). Times are given as minutes before `now`
 * (`ageMin`) or as ISO instants (`at`); values are in the canonical unit of their kind unless `unit` says otherwise.
 * References are generated ("Observation/heartRate-3") unless given.
 *
 *   const s = new SnapshotBuilder({ sex: 'male' })
 *     .measure('heartRate', 110, { ageMin: 5 })
 *     .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 })
 *     .dynamicTest('plr', 'cardiacOutput', 4.0, 4.5, { ageMin: 15 })
 *     .fluid({ volumeMl: 500, startAgeMin: 90, endAgeMin: 70 })
 *     .vasoactive({ drug: 'norepinephrine', startAgeMin: 60, rate: { value: 0.1, unit: 'ug/kg/min' } })
 *     .build();
 */
import {
  KIND_UNITS,
  OBSERVATION_CODES,
  TIDEMARK_ANSWERS,
  type CodedKind,
  type DynamicMeasured,
  type DynamicTestKind,
  type NumericKind,
} from '../../src/fhir/codes.js';
import type {
  CodedMeasurement,
  ConditionEntry,
  DraftOrder,
  DynamicTestResult,
  Exclusion,
  FluidClass,
  FluidGiven,
  Measurement,
  PatientSnapshot,
  VasoactiveDrug,
} from '../../src/snapshot/types.js';

/** The default instant of test snapshots (a fixed, invented time). */
export const DEFAULT_NOW = '2026-03-10T12:00:00.000Z';

export type Sex = PatientSnapshot['patient']['sex'];

export interface When {
  /** Minutes before `now` (default 0). */
  ageMin?: number;
  /** An ISO instant instead of ageMin. */
  at?: string;
  ref?: string;
}

/** Canonical unit of each measured variable of a dynamic test. */
export const DYNAMIC_MEASURED_UNITS: Record<DynamicMeasured, string> = {
  cardiacOutput: 'L/min',
  cardiacIndex: 'L/min/m2',
  strokeVolume: 'mL',
  pulsePressure: 'mm[Hg]',
  vti: 'cm',
  ppv: '%',
  svv: '%',
};

export class SnapshotBuilder {
  readonly now: Date;
  private readonly snapshot: PatientSnapshot;
  private counter = 0;

  constructor(
    opts: { now?: string | Date; sex?: Sex; patientRef?: string; birthDate?: string; ageYears?: number; encounterRef?: string } = {},
  ) {
    this.now = new Date(opts.now ?? DEFAULT_NOW);
    this.snapshot = {
      patient: {
        ref: opts.patientRef ?? 'Patient/test-1',
        sex: opts.sex ?? 'male',
        ...(opts.birthDate !== undefined ? { birthDate: opts.birthDate } : {}),
        ...(opts.ageYears !== undefined ? { ageYears: opts.ageYears } : {}),
      },
      ...(opts.encounterRef ? { encounter: { ref: opts.encounterRef, status: 'in-progress' } } : {}),
      now: this.now.toISOString(),
      measurements: [],
      coded: [],
      dynamicTests: [],
      fluids: [],
      vasoactives: [],
      conditions: [],
      draftOrders: [],
      excluded: [],
    };
  }

  /** ISO instant `ageMin` minutes before now. */
  time(ageMin: number): string {
    return new Date(this.now.getTime() - ageMin * 60_000).toISOString();
  }

  private resolve(w: When): { effective: string; ageMinutes: number } {
    const effective = w.at ?? this.time(w.ageMin ?? 0);
    return { effective, ageMinutes: (this.now.getTime() - Date.parse(effective)) / 60_000 };
  }

  private nextRef(prefix: string, name: string): string {
    this.counter += 1;
    return `${prefix}/${name}-${this.counter}`;
  }

  /** A numeric measurement of any kind. */
  measure(kind: NumericKind, value: number, w: When & { unit?: string; periodStartAgeMin?: number } = {}): this {
    const code = OBSERVATION_CODES.find((c) => c.kind === kind);
    const unit = w.unit ?? KIND_UNITS[kind];
    const m: Measurement = {
      kind,
      value,
      unit,
      original: { value, unit, code: code?.code ?? kind, system: code?.system ?? 'urn:test' },
      ...this.resolve(w),
      ...(w.periodStartAgeMin !== undefined ? { periodStart: this.time(w.periodStartAgeMin) } : {}),
      ref: w.ref ?? this.nextRef('Observation', kind),
    };
    this.snapshot.measurements.push(m);
    return this;
  }

  /** Several vital signs at one time; SBP and DBP share the time so that MAP can be computed from them. */
  vitals(v: { hr?: number; sbp?: number; dbp?: number; map?: number; rr?: number }, w: When = {}): this {
    const at = w.at ?? this.time(w.ageMin ?? 0);
    if (v.hr !== undefined) this.measure('heartRate', v.hr, { at });
    if (v.sbp !== undefined) this.measure('systolicBp', v.sbp, { at });
    if (v.dbp !== undefined) this.measure('diastolicBp', v.dbp, { at });
    if (v.map !== undefined) this.measure('meanBp', v.map, { at });
    if (v.rr !== undefined) this.measure('respiratoryRate', v.rr, { at });
    return this;
  }

  /** A coded observation (answer code from TIDEMARK_ANSWERS, e.g. 'sinus'). */
  coded(kind: CodedKind, answer: string, w: When = {}): this {
    const c: CodedMeasurement = {
      kind,
      answer,
      original: { system: TIDEMARK_ANSWERS, code: answer },
      ...this.resolve(w),
      ref: w.ref ?? this.nextRef('Observation', kind),
    };
    this.snapshot.coded.push(c);
    return this;
  }

  /** A before/after dynamic test. */
  dynamicTest(kind: DynamicTestKind, measured: DynamicMeasured, before: number, after: number, w: When & { unit?: string } = {}): this {
    const d: DynamicTestResult = {
      kind,
      measured,
      before,
      after,
      unit: w.unit ?? DYNAMIC_MEASURED_UNITS[measured],
      ...this.resolve(w),
      ref: w.ref ?? this.nextRef('Observation', kind),
    };
    this.snapshot.dynamicTests.push(d);
    return this;
  }

  /** A fluid given (default: completed 500 mL balanced crystalloid). */
  fluid(f: {
    volumeMl?: number;
    startAgeMin: number;
    endAgeMin: number;
    fluidClass?: FluidClass;
    display?: string;
    status?: string;
    ref?: string;
  }): this {
    const end = this.time(f.endAgeMin);
    const g: FluidGiven = {
      ref: f.ref ?? this.nextRef('MedicationAdministration', 'fluid'),
      fluidClass: f.fluidClass ?? 'balanced-crystalloid',
      display: f.display ?? 'Ringer lactate',
      volumeMl: f.volumeMl ?? 500,
      start: this.time(f.startAgeMin),
      end,
      status: f.status ?? 'completed',
      ageMinutes: f.endAgeMin,
    };
    this.snapshot.fluids.push(g);
    return this;
  }

  /** A vasoactive administration period (no endAgeMin: still running). */
  vasoactive(v: {
    drug: string;
    startAgeMin: number;
    endAgeMin?: number;
    rate?: { value: number; unit: string };
    status?: string;
    ref?: string;
  }): this {
    const d: VasoactiveDrug = {
      ref: v.ref ?? this.nextRef('MedicationAdministration', 'vasoactive'),
      drug: v.drug,
      ...(v.rate ? { rate: v.rate } : {}),
      start: this.time(v.startAgeMin),
      ...(v.endAgeMin !== undefined ? { end: this.time(v.endAgeMin) } : {}),
      status: v.status ?? (v.endAgeMin === undefined ? 'in-progress' : 'completed'),
    };
    this.snapshot.vasoactives.push(d);
    return this;
  }

  condition(c: Omit<ConditionEntry, 'ref'> & { ref?: string }): this {
    this.snapshot.conditions.push({ ...c, ref: c.ref ?? this.nextRef('Condition', 'condition') });
    return this;
  }

  draftOrder(o: DraftOrder): this {
    this.snapshot.draftOrders.push(o);
    return this;
  }

  exclude(e: Exclusion): this {
    this.snapshot.excluded.push(e);
    return this;
  }

  /** A deep copy, so that one builder can make several variants. */
  build(): PatientSnapshot {
    return structuredClone(this.snapshot);
  }
}
