/**
 * An active MedicationRequest for a vasoactive drug → a vasoactive that is running. Its start is `authoredOn`; a
 * request without one has no known start (it is not taken to have started now, which would read as a dose change
 * at this moment and set aside every test taken before it).
 */
import type { MedicationRequest } from 'fhir/r4.js';
import { classifyVasoactive } from '../../fhir/medications.js';
import { readTime, type Read, type ReadContext } from './context.js';

export function readActiveRequest(m: MedicationRequest, ref: string, ctx: ReadContext): Read {
  if (m.status !== 'active') return {};
  const vaso = classifyVasoactive(m.medicationCodeableConcept);
  if (!vaso) return {};
  const start = m.authoredOn ? readTime(ctx, ref, m.authoredOn, 'vasoactive') : undefined;
  const rate = m.dosageInstruction?.[0]?.doseAndRate?.[0]?.rateQuantity;
  return {
    vasoactives: [
      {
        ref,
        drug: vaso,
        ...(start?.ok ? { start: start.iso } : {}),
        status: 'active',
        ...(rate && typeof rate.value === 'number' ? { rate: { value: rate.value, unit: rate.unit ?? rate.code ?? '' } } : {}),
      },
    ],
    ...(start && !start.ok ? { excluded: [start.excluded] } : {}),
  };
}
