/**
 * Suggestion actions: real FHIR R4 resources (validated in tests with the registry validator).
 * - update the draft MedicationRequest to a smaller aliquot with a reassessment note;
 * - create a ServiceRequest for a dynamic test or a reassessment;
 * - delete the draft bolus (delete uses resourceId, no resource: CDS Hooks 2.0, cds-hooks/docs#400).
 */
import { randomUUID } from 'node:crypto';
import type { MedicationRequest, ServiceRequest } from 'fhir/r4.js';
import { TIDEMARK_MARKERS, UCUM } from '../fhir/codes.js';
import type { Action, Suggestion } from '../hooks/schemas.js';
import type { DraftOrder } from '../snapshot/types.js';
import { fill } from './markdown.js';

/** Tidemark's own codes for what a suggestion asks for (docs/codes.md). */
export const TIDEMARK_PROCEDURES = 'https://tidemark.invalid/fhir/CodeSystem/procedure';

export type TestKind =
  | 'passive-leg-raise' | 'bedside-ultrasound' | 'reassess-after-bolus' | 'mini-fluid-challenge' | 'tidal-volume-challenge' | 'end-expiratory-occlusion';

const TEST_CODES: Record<TestKind, { system: string; code: string }> = {
  'passive-leg-raise': { system: TIDEMARK_MARKERS, code: 'passive-leg-raise' },
  'mini-fluid-challenge': { system: TIDEMARK_MARKERS, code: 'mini-fluid-challenge' },
  'tidal-volume-challenge': { system: TIDEMARK_MARKERS, code: 'tidal-volume-challenge' },
  'end-expiratory-occlusion': { system: TIDEMARK_MARKERS, code: 'end-expiratory-occlusion' },
  'bedside-ultrasound': { system: TIDEMARK_PROCEDURES, code: 'bedside-ultrasound-fluid' },
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

/**
 * Update the draft MedicationRequest to `volumeMl` given over `durationMin` (the ordered rate kept), keeping everything
 * else, with a note to reassess. A rate in the order stays as it was; a duration is shortened in proportion.
 */
export function smallerAliquot(order: DraftOrder, volumeMl: number, durationMin: number | undefined, t: SuggestionText, vars: Record<string, string>): Suggestion | undefined {
  if (order.resourceType !== 'MedicationRequest' || !order.id) return undefined;
  const mr = structuredClone(order.resource) as unknown as MedicationRequest;
  const dose = mr.dosageInstruction?.[0];
  if (!dose) return undefined;
  const dr = dose.doseAndRate?.[0];
  const rest = (dose.doseAndRate ?? []).slice(1);
  dose.doseAndRate = [{
    ...(dr?.type ? { type: dr.type } : {}), doseQuantity: { value: volumeMl, unit: 'mL', system: UCUM, code: 'mL' },
    ...(dr?.rateQuantity ? { rateQuantity: dr.rateQuantity } : {}),
  }, ...rest];
  if (durationMin !== undefined) {
    dose.timing = { ...dose.timing, repeat: { ...dose.timing?.repeat, duration: durationMin, durationUnit: 'min' } };
  }
  dose.text = `${volumeMl} mL IV${durationMin !== undefined ? ` over ${durationMin} min` : ''}`;
  mr.note = [...(mr.note ?? []), { text: fill(t.text, vars) }];
  return {
    label: fill(t.label, vars),
    uuid: randomUUID(),
    actions: [{ type: 'update', description: fill(t.description, vars), resource: mr as unknown as Action['resource'] & object }],
  };
}

/** Create a draft ServiceRequest for a test or reassessment. */
export function requestTest(kind: TestKind, ctx: SuggestionContext, t: SuggestionText, vars: Record<string, string>, authoredOn: string): Suggestion {
  const sr: ServiceRequest = {
    resourceType: 'ServiceRequest',
    status: 'draft',
    intent: 'proposal',
    code: { coding: [{ ...TEST_CODES[kind], display: fill(t.text, vars) }], text: fill(t.text, vars) },
    subject: { reference: `Patient/${ctx.patientId}` },
    ...(ctx.encounterId ? { encounter: { reference: `Encounter/${ctx.encounterId}` } } : {}),
    authoredOn,
    ...(/^(Practitioner|PractitionerRole)\//.test(ctx.userId) ? { requester: { reference: ctx.userId } } : {}),
  };
  return { label: fill(t.label, vars), uuid: randomUUID(), actions: [{ type: 'create', description: fill(t.description, vars), resource: sr as unknown as Action['resource'] & object }] };
}

/** Delete the draft order (resourceId only). */
export function withdrawDraft(order: DraftOrder, t: SuggestionText, vars: Record<string, string>): Suggestion | undefined {
  if (!order.id) return undefined;
  return { label: fill(t.label, vars), uuid: randomUUID(), actions: [{ type: 'delete', description: fill(t.description, vars), resourceId: `${order.resourceType}/${order.id}` }] };
}
