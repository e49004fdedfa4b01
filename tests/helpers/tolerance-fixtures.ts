/**
 * Builders of invented PatientSnapshots for the tolerance, order and advice tests. Values are already in
 * the canonical units (the snapshot layer's job); `unit` may be overridden to test the wrong-unit guard.
 */
import { CODED_OBSERVATION_CODES, KIND_UNITS, OBSERVATION_CODES, type CodedKind, type NumericKind } from '../../src/fhir/codes.js';
import type {
  CodedMeasurement,
  ConditionEntry,
  DraftOrder,
  FluidClass,
  FluidGiven,
  Measurement,
  PatientSnapshot,
} from '../../src/snapshot/types.js';
import type { Finding, ToleranceFinding } from '../../src/assess/types.js';
import { DEFAULT_TOLERANCE_THRESHOLDS, type ToleranceThresholds } from '../../src/assess/tolerance/thresholds.js';

/** Pinned clock for every test (tests run with TZ=America/Denver). */
export const NOW = new Date('2026-03-14T15:00:00Z');
export const T: ToleranceThresholds = DEFAULT_TOLERANCE_THRESHOLDS;

let seq = 0;
const nextRef = (prefix: string) => `${prefix}/tm-${String(++seq).padStart(5, '0')}`;

export function at(minutesAgo: number, now: Date = NOW): string {
  return new Date(now.getTime() - minutesAgo * 60_000).toISOString();
}

export interface MeasurementOptions {
  /** The amount covers this many minutes before its time (sets periodStart). */
  periodMinutes?: number;
  unit?: string;
  ref?: string;
  now?: Date;
}

export function m(kind: NumericKind, value: number, minutesAgo: number, o: MeasurementOptions = {}): Measurement {
  const now = o.now ?? NOW;
  const code = OBSERVATION_CODES.find((c) => c.kind === kind)!;
  const unit = o.unit ?? KIND_UNITS[kind];
  return {
    kind,
    value,
    unit,
    original: { value, unit, code: code.code, system: code.system },
    effective: at(minutesAgo, now),
    ...(o.periodMinutes !== undefined ? { periodStart: at(minutesAgo + o.periodMinutes, now) } : {}),
    ageMinutes: minutesAgo,
    ref: o.ref ?? nextRef('Observation'),
  };
}

export function coded(kind: CodedKind, answer: string, minutesAgo: number, o: { ref?: string; now?: Date } = {}): CodedMeasurement {
  const code = CODED_OBSERVATION_CODES.find((c) => c.kind === kind)!;
  return {
    kind,
    answer,
    original: { system: code.system, code: answer },
    effective: at(minutesAgo, o.now ?? NOW),
    ageMinutes: minutesAgo,
    ref: o.ref ?? nextRef('Observation'),
  };
}

export function fluid(
  fluidClass: FluidClass,
  volumeMl: number,
  startMinutesAgo: number,
  endMinutesAgo: number,
  o: { ref?: string; now?: Date } = {},
): FluidGiven {
  const now = o.now ?? NOW;
  return {
    ref: o.ref ?? nextRef('MedicationAdministration'),
    fluidClass,
    display: fluidClass,
    volumeMl,
    start: at(startMinutesAgo, now),
    end: at(endMinutesAgo, now),
    status: 'completed',
    ageMinutes: endMinutesAgo,
  };
}

export function condition(system: string, code: string, clinicalStatus = 'active', ref?: string): ConditionEntry {
  return { ref: ref ?? nextRef('Condition'), codings: [{ system, code }], clinicalStatus };
}

export function order(o: Partial<DraftOrder> = {}): DraftOrder {
  return {
    ref: 'draftOrders#MedicationRequest/tm-bolus-1',
    resourceType: 'MedicationRequest',
    id: 'tm-bolus-1',
    selected: true,
    isFluid: true,
    fluidClass: 'balanced-crystalloid',
    display: 'Balanced crystalloid',
    volumeMl: 500,
    durationMin: 30,
    resource: { resourceType: 'MedicationRequest', id: 'tm-bolus-1' },
    ...o,
  };
}

export interface SnapshotParts {
  measurements?: Measurement[];
  coded?: CodedMeasurement[];
  fluids?: FluidGiven[];
  conditions?: ConditionEntry[];
  draftOrders?: DraftOrder[];
  /** Minutes since ICU admission; null for no admission time. Default 3 days. */
  admittedMinutesAgo?: number | null;
  now?: Date;
}

export function snapshot(p: SnapshotParts = {}): PatientSnapshot {
  const now = p.now ?? NOW;
  const admitted = p.admittedMinutesAgo === undefined ? 3 * 1440 : p.admittedMinutesAgo;
  return {
    patient: { ref: 'Patient/tm-pat-bed12', sex: 'male', ageYears: 64 },
    ...(admitted !== null ? { encounter: { ref: 'Encounter/tm-enc-bed12', start: at(admitted, now), status: 'in-progress' } } : {}),
    now: now.toISOString(),
    measurements: [...(p.measurements ?? [])].sort((a, b) => Date.parse(b.effective) - Date.parse(a.effective)),
    coded: p.coded ?? [],
    dynamicTests: [],
    fluids: p.fluids ?? [],
    vasoactives: [],
    conditions: p.conditions ?? [],
    draftOrders: p.draftOrders ?? [],
    excluded: [],
  };
}

/** The one finding of a rule id (fails loudly when absent or repeated). */
export function one(findings: readonly Finding[], ruleId: string): Finding {
  const hits = findings.filter((f) => f.ruleId === ruleId);
  if (hits.length !== 1) throw new Error(`expected one finding ${ruleId}, got ${hits.length}`);
  return hits[0]!;
}

/** The limit of an assessed tolerance finding (undefined when not assessed). */
export function limit(f: Finding): unknown {
  return f.topic === 'tolerance' && f.status === 'assessed' ? f.limit : undefined;
}

/** The typed tolerance fields of a finding (throws for another topic). */
export function tol(f: Finding): ToleranceFinding {
  if (f.topic !== 'tolerance') throw new Error(`not a tolerance finding: ${f.ruleId}`);
  return f;
}

/** Hourly amounts over `hours` hours ending `endMinutesAgo`, each with a one-hour period. */
export function hourly(kind: NumericKind, mlPerHour: number, hours: number, endMinutesAgo = 0, now: Date = NOW): Measurement[] {
  return Array.from({ length: hours }, (_, i) => m(kind, mlPerHour, endMinutesAgo + i * 60, { periodMinutes: 60, now }));
}
