/**
 * PatientSnapshot: everything the rules may look at, normalized from FHIR R4 resources at the edge.
 * Every value is in the canonical UCUM unit of its kind (fhir/codes.ts KIND_UNITS) and keeps its
 * original value, unit, time and the FHIR reference it came from (provenance).
 * The snapshot is plain JSON: it is stored in the audit record and can be replayed.
 */
import type { CodedKind, DynamicMeasured, DynamicTestKind, NumericKind } from '../fhir/codes.js';
import type { FluidClass } from '../fhir/value-sets.js';

/** "Observation/abc" (relative reference), or "draftOrders#MedicationRequest/x" for draft resources. */
export type FhirRef = string;

export interface Measurement {
  kind: NumericKind;
  /** Value in the canonical unit of `kind`. */
  value: number;
  /** Canonical UCUM unit of `kind`. */
  unit: string;
  /** As the record carried it: value, unit text, and the code that was read (a site's own code when read through a map). */
  original: { value: number; unit: string; code: string; system: string };
  /**
   * Set when the code was read through a site ConceptMap (src/fhir/site-map.ts): the Tidemark code it was read as,
   * with the map's equivalence and which map said so. `original` keeps the site's code.
   */
  readAs?: { system: string; code: string; equivalence: string; map: string };
  /** Set when the unit text was read through the site's unit hints: the UCUM code it was taken to mean. */
  unitReadAs?: string;
  /** ISO 8601 instant (UTC) of effectiveDateTime, or the end of effectivePeriod. */
  effective: string;
  /** Start of the period for amounts over a period (intake, output, urine), when the source had one. */
  periodStart?: string;
  /** Minutes between effective and `now`. */
  ageMinutes: number;
  ref: FhirRef;
  /** Set when the record gave a date without a clock time: `effective` is the start of that day (UTC), assumed. */
  timeAssumed?: 'date-only';
}

export interface CodedMeasurement {
  kind: CodedKind;
  /** Answer code from TIDEMARK_ANSWERS (mapped), e.g. 'sinus'. */
  answer: string;
  original: { system: string; code: string; display?: string };
  effective: string;
  ageMinutes: number;
  ref: FhirRef;
}

export interface DynamicTestResult {
  kind: DynamicTestKind;
  measured: DynamicMeasured;
  /** Before and after values in `unit` (the same unit for both, canonical for the measured variable). */
  before: number;
  after: number;
  unit: string;
  effective: string;
  ageMinutes: number;
  ref: FhirRef;
}

export type { FluidClass };

export interface FluidGiven {
  ref: FhirRef;
  fluidClass: FluidClass;
  display: string;
  /** Volume given, mL. */
  volumeMl: number;
  start: string;
  end: string;
  /** MedicationAdministration.status: 'completed' or 'in-progress' (others are not kept). */
  status: string;
  ageMinutes: number;
}

export interface VasoactiveDrug {
  ref: FhirRef;
  drug: string;
  /** Dose rate when recorded (original unit kept), for confounder detection. */
  rate?: { value: number; unit: string };
  /** When it started; absent when the record does not say (an active MedicationRequest without authoredOn). */
  start?: string;
  end?: string;
  status: string;
}

export interface ConditionEntry {
  ref: FhirRef;
  codings: Array<{ system: string; code: string; display?: string }>;
  text?: string;
  clinicalStatus: string;
  onset?: string;
}

/** A draft order read from context.draftOrders. */
export interface DraftOrder {
  ref: FhirRef;
  resourceType: 'MedicationRequest' | 'ServiceRequest' | string;
  id: string;
  /** True if listed in order-select `selections` (or if the hook has none: order-sign). */
  selected: boolean;
  isFluid: boolean;
  fluidClass?: FluidClass;
  display?: string;
  /** Ordered volume in mL (doseQuantity, or rate × duration). */
  volumeMl?: number;
  /** Infusion duration in minutes when known. */
  durationMin?: number;
  /** Why the volume could not be read, if not. */
  volumeProblem?: string;
  /** The draft resource as received, for suggestions that update it. */
  resource: Record<string, unknown>;
}

export type ExclusionReason =
  | 'unknown-code'
  | 'unknown-unit'
  | 'incompatible-unit'
  | 'impossible-value'
  | 'future-time'
  | 'entered-in-error'
  | 'cancelled'
  | 'no-value'
  | 'censored-value'
  | 'no-time'
  | 'unknown-answer'
  | 'other-patient'
  | 'malformed';

export interface Exclusion {
  ref: FhirRef;
  reason: ExclusionReason;
  detail: string;
  kind?: string;
}

export interface PatientSnapshot {
  patient: { ref: FhirRef; sex: 'male' | 'female' | 'other' | 'unknown'; birthDate?: string; ageYears?: number };
  encounter?: {
    ref: FhirRef;
    start?: string;
    status?: string;
    /** The period start was a date alone, taken as the start of that day (UTC). */ timeAssumed?: 'date-only';
  };
  /** Instant the snapshot was built for (the injected clock). */
  now: string;
  /** All usable numeric measurements, newest first within each kind. */
  measurements: Measurement[];
  coded: CodedMeasurement[];
  dynamicTests: DynamicTestResult[];
  fluids: FluidGiven[];
  vasoactives: VasoactiveDrug[];
  conditions: ConditionEntry[];
  draftOrders: DraftOrder[];
  /** Resources or values that were left out, with the reason. */
  excluded: Exclusion[];
}
