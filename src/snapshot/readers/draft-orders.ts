/**
 * The draft orders of order-select / order-sign (context.draftOrders) → DraftOrder: is it an IV fluid, which class,
 * what volume over what time. Orders that are not fluids are kept (isFluid false) so the caller can tell.
 */
import type { MedicationRequest, ServiceRequest } from 'fhir/r4.js';
import { classifyFluid, conceptLabel, conceptText, fluidClassFromText, isIntravenous } from '../../fhir/medications.js';
import { convert } from '../../fhir/units.js';
import type { DraftOrder, Exclusion } from '../types.js';
import { exclusion, roundMl } from './context.js';

export interface DraftOrderInput {
  /** order-select `selections` (Type/id); absent means every draft order is in focus (order-sign). */
  selections?: readonly string[];
  draftOrders?: { entry?: Array<{ resource?: unknown }> };
}

export function readDraftOrders(ctx: DraftOrderInput): { orders: DraftOrder[]; excluded: Exclusion[] } {
  const orders: DraftOrder[] = [];
  const excluded: Exclusion[] = [];
  for (const e of ctx.draftOrders?.entry ?? []) {
    const r = e?.resource as (MedicationRequest | ServiceRequest | { resourceType?: string; id?: string }) | undefined;
    if (!r || typeof r !== 'object' || typeof r.resourceType !== 'string') continue;
    const id = typeof r.id === 'string' ? r.id : '';
    const ref = `${r.resourceType}/${id || '(no id)'}`;
    const selected = ctx.selections ? ctx.selections.includes(`${r.resourceType}/${id}`) : true;
    const base: DraftOrder = { ref, resourceType: r.resourceType, id, selected, isFluid: false, resource: r as Record<string, unknown> };
    try {
      if (r.resourceType === 'MedicationRequest') orders.push(readFluidRequest(r as MedicationRequest, base));
      else if (r.resourceType === 'ServiceRequest') orders.push(readFluidService(r as ServiceRequest, base));
      else orders.push(base);
    } catch (err) {
      // A guard against a reader bug on hostile input, not control flow: the order stays, unread.
      excluded.push(exclusion(ref, 'malformed', `draft order could not be read: ${(err as Error).message}`.slice(0, 200)));
      orders.push(base);
    }
  }
  return { orders, excluded };
}

function readFluidRequest(m: MedicationRequest, base: DraftOrder): DraftOrder {
  const fluidClass = classifyFluid(m.medicationCodeableConcept);
  const dose = m.dosageInstruction?.[0];
  const iv = isIntravenous(dose?.route);
  if (!fluidClass || iv === false) return base;
  const order: DraftOrder = { ...base, isFluid: true, fluidClass, display: conceptLabel(m.medicationCodeableConcept) || 'IV fluid' };
  const dr = dose?.doseAndRate?.[0];
  const durationMin = durationMinutes(dose?.timing?.repeat?.duration, dose?.timing?.repeat?.durationUnit);
  if (durationMin !== undefined) order.durationMin = durationMin;
  const doseMl = dr?.doseQuantity ? convert(dr.doseQuantity.value ?? NaN, dr.doseQuantity.code ?? dr.doseQuantity.unit, 'mL') : undefined;
  if (doseMl !== undefined && Number.isFinite(doseMl) && doseMl > 0) return { ...order, volumeMl: roundMl(doseMl) };
  const rate = dr?.rateQuantity ? convert(dr.rateQuantity.value ?? NaN, dr.rateQuantity.code ?? dr.rateQuantity.unit, 'mL/min') : undefined;
  if (rate !== undefined && Number.isFinite(rate) && durationMin !== undefined) return { ...order, volumeMl: roundMl(rate * durationMin) };
  if (rate !== undefined) return { ...order, volumeProblem: 'a rate with no duration: a continuous infusion, not a bolus volume' };
  return { ...order, volumeProblem: 'no volume in dosageInstruction (doseQuantity in mL, or rate and duration)' };
}

function readFluidService(s: ServiceRequest, base: DraftOrder): DraftOrder {
  const text = [conceptText(s.code), ...(s.orderDetail ?? []).map(conceptText)].join(' ');
  const fluidClass = fluidClassFromText(text);
  if (!fluidClass) return base;
  const order: DraftOrder = { ...base, isFluid: true, fluidClass, display: conceptLabel(s.code) || 'IV fluid' };
  const q = s.quantityQuantity;
  const ml = q ? convert(q.value ?? NaN, q.code ?? q.unit, 'mL') : undefined;
  if (ml !== undefined && Number.isFinite(ml) && ml > 0) return { ...order, volumeMl: roundMl(ml) };
  return { ...order, volumeProblem: 'no volume in ServiceRequest.quantityQuantity (mL)' };
}

/** Longest infusion duration read from an order, minutes: one week (our own bound; a longer one is not a plausible single order). */
const MAX_DURATION_MIN = 7 * 1440;

function durationMinutes(value: number | undefined, unit: string | undefined): number | undefined {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) return undefined;
  const per: Record<string, number> = { s: 1 / 60, min: 1, h: 60, d: 1440 };
  const f = unit ? per[unit] : undefined;
  if (f === undefined || value * f > MAX_DURATION_MIN) return undefined;
  return value * f;
}
