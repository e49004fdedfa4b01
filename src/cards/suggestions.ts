/**
 * Suggestion actions: real FHIR R4 resources (validated in tests with the registry validator).
 * - update the draft MedicationRequest to a smaller aliquot with a reassessment note;
 * - create a ServiceRequest for a dynamic test or a reassessment;
 * - delete the draft bolus (delete uses resourceId, no resource: CDS Hooks 2.0, cds-hooks/docs#400).
 */
import { randomUUID } from 'node:crypto';
import type { MedicationRequest, ServiceRequest } from 'fhir/r4.js';
import { SNOMED, TIDEMARK_MARKERS, UCUM } from '../fhir/codes.js';
import type { Suggestion } from '../hooks/schemas.js';
import type { DraftOrder } from '../snapshot/types.js';
import { fill } from './markdown.js';

/** Tidemark's own codes for what a suggestion asks for (docs/codes.md). */
export const TIDEMARK_PROCEDURES = 'https://tidemark.invalid/fhir/CodeSystem/procedure';

export type TestKind =
  | 'passive-leg-raise'
  | 'bedside-ultrasound'
  | 'reassess-after-bolus'
  | 'mini-fluid-challenge'
  | 'tidal-volume-challenge'
  | 'end-expiratory-occlusion';

/**
 * The code of what each request asks for: a standard code where one exists, with the display its code system gives
 * and the source named; Tidemark's own code (docs/codes.md) where we found none.
 */
const TEST_CODES: Record<TestKind, { system: string; code: string; display?: string }> = {
  // No SNOMED CT or LOINC concept for these bedside manoeuvres was found (searched public FHIR and SNOMED CT value
  // sets): our own codes, the ones the dynamic-test Observations carry.
  'passive-leg-raise': { system: TIDEMARK_MARKERS, code: 'passive-leg-raise' },
  'mini-fluid-challenge': { system: TIDEMARK_MARKERS, code: 'mini-fluid-challenge' },
  'tidal-volume-challenge': { system: TIDEMARK_MARKERS, code: 'tidal-volume-challenge' },
  'end-expiratory-occlusion': { system: TIDEMARK_MARKERS, code: 'end-expiratory-occlusion' },
  // SNOMED CT 16310003 "Ultrasonography (procedure)", preferred term "Ultrasonography" (SNOMED CT International
  // Edition; the same code and term in several public FHIR questionnaires and DICOM mappings). The request's text
  // says which views (heart, IVC, lungs).
  'bedside-ultrasound': { system: SNOMED, code: '16310003', display: 'Ultrasonography' },
  // No standard code for "reassess response and tolerance after a bolus" was found: our own.
  'reassess-after-bolus': { system: TIDEMARK_PROCEDURES, code: 'reassess-after-bolus' },
};

export interface SuggestionText {
  label: string;
  description: string;
  /** Text of the resource (ServiceRequest.code.text or the MedicationRequest note). */
  text: string;
}

export interface SuggestionContext {
  patientId: string;
  encounterId?: string;
  userId: string;
}

/** The draft as the client sent it, read by the snapshot as a MedicationRequest (context.draftOrders passed the wire schema). */
function isMedicationRequest(r: Record<string, unknown>): r is Record<string, unknown> & MedicationRequest {
  return r['resourceType'] === 'MedicationRequest';
}

/**
 * Update the draft MedicationRequest to `volumeMl` given over `durationMin` (the ordered rate kept), keeping everything
 * else, with a note to reassess. A rate in the order stays as it was; a duration is shortened in proportion.
 */
export function smallerAliquot(
  order: DraftOrder,
  volumeMl: number,
  durationMin: number | undefined,
  t: SuggestionText,
  vars: Record<string, string>,
): Suggestion | undefined {
  const draft = order.resource;
  if (!isMedicationRequest(draft) || !order.id) return undefined;
  const mr: MedicationRequest = structuredClone(draft);
  const dose = mr.dosageInstruction?.[0];
  if (!dose) return undefined;
  const dr = dose.doseAndRate?.[0];
  const rest = (dose.doseAndRate ?? []).slice(1);
  dose.doseAndRate = [
    {
      ...(dr?.type ? { type: dr.type } : {}),
      doseQuantity: { value: volumeMl, unit: 'mL', system: UCUM, code: 'mL' },
      ...(dr?.rateQuantity ? { rateQuantity: dr.rateQuantity } : {}),
    },
    ...rest,
  ];
  if (durationMin !== undefined) {
    dose.timing = { ...dose.timing, repeat: { ...dose.timing?.repeat, duration: durationMin, durationUnit: 'min' } };
  }
  dose.text = `${volumeMl} mL IV${durationMin !== undefined ? ` over ${durationMin} min` : ''}`;
  mr.note = [...(mr.note ?? []), { text: fill(t.text, vars) }];
  return {
    label: fill(t.label, vars),
    uuid: randomUUID(),
    actions: [{ type: 'update', description: fill(t.description, vars), resource: mr }],
  };
}

/**
 * Create a draft ServiceRequest for a test or reassessment, to be done at `occurrence` (from the injected clock:
 * a test now, before any volume; a reassessment when the bolus has run and the interval has passed).
 */
export function requestTest(
  kind: TestKind,
  ctx: SuggestionContext,
  t: SuggestionText,
  vars: Record<string, string>,
  authoredOn: string,
  occurrence: string,
): Suggestion {
  const c = TEST_CODES[kind];
  const sr: ServiceRequest = {
    resourceType: 'ServiceRequest',
    status: 'draft',
    intent: 'proposal',
    code: { coding: [{ system: c.system, code: c.code, display: c.display ?? fill(t.text, vars) }], text: fill(t.text, vars) },
    subject: { reference: `Patient/${ctx.patientId}` },
    ...(ctx.encounterId ? { encounter: { reference: `Encounter/${ctx.encounterId}` } } : {}),
    occurrenceDateTime: occurrence,
    authoredOn,
    ...(/^(Practitioner|PractitionerRole)\//.test(ctx.userId) ? { requester: { reference: ctx.userId } } : {}),
  };
  return {
    label: fill(t.label, vars),
    uuid: randomUUID(),
    actions: [{ type: 'create', description: fill(t.description, vars), resource: sr }],
  };
}

/** Delete the draft order (resourceId only). */
export function withdrawDraft(order: DraftOrder, t: SuggestionText, vars: Record<string, string>): Suggestion | undefined {
  if (!order.id) return undefined;
  return {
    label: fill(t.label, vars),
    uuid: randomUUID(),
    actions: [{ type: 'delete', description: fill(t.description, vars), resourceId: `${order.resourceType}/${order.id}` }],
  };
}
