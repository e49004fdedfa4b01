/**
 * The shape of an invented ICU scenario: who the patient is, what a careful intensivist would conclude, and a
 * build(now) that writes the chart (valid FHIR R4, UTC Z times, all relative to `now`).
 */
import type { FhirResource, Resource } from 'fhir/r4.js';

export type ExpectedResponsiveness = 'likely' | 'unlikely' | 'indeterminate';
/** 'not-known': too few tolerance markers could be assessed to call tolerance adequate (docs/clinical-logic). */
export type ExpectedTolerance = 'adequate' | 'limited' | 'poor' | 'not-known';
/** 'no-card': Tidemark should stay silent (not a fluid order). */
export type ExpectedIndicator = 'info' | 'warning' | 'critical' | 'no-card';

export interface ScenarioExpectation {
  /** null: not checked (no card is expected, so no verdict is shown). */
  responsiveness: ExpectedResponsiveness | null;
  tolerance: ExpectedTolerance | null;
  indicator: ExpectedIndicator;
  /** What the advice should do (src/assess/advice/types.ts AdviceAction); checked when given. */
  action?: string;
  /** The test the card should offer (NextTestKind), or null for none; checked when given. */
  nextTest?: string | null;
}

export type OrderHook = 'order-select' | 'order-sign';

export interface BuiltScenario {
  /** Everything on the chart: Patient, Encounter, Observations, Conditions, MedicationAdministrations, MedicationRequests. */
  resources: FhirResource[];
  /** The orders being written (context.draftOrders); not on the FHIR server. */
  draftOrders: Resource[];
  /** order-select `selections` (Type/id); ignored for order-sign. */
  selections: string[];
  hook: OrderHook;
}

export interface Scenario {
  /** Plain kebab-case id, unique. */
  id: string;
  title: string;
  /** Invented ward of the invented Harbourside General Hospital. */
  ward: string;
  patientId: string;
  encounterId: string;
  /** Practitioner/… of the invented prescriber. */
  userId: string;
  expect: ScenarioExpectation;
  /** What a careful intensivist would conclude, one or two sentences. */
  conclusion: string;
  build(now: Date): BuiltScenario;
}
