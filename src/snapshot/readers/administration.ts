/**
 * MedicationAdministration → a fluid given (class, volume, period) or a vasoactive period (drug, rate). A volume is
 * dosage.dose in mL, or the rate over the period when no dose is given.
 */
import type { MedicationAdministration } from 'fhir/r4.js';
import { classifyFluid, classifyVasoactive, conceptLabel } from '../../fhir/medications.js';
import { convert } from '../../fhir/units.js';
import { exclusion, left, readTime, round2, roundMl, type Read, type ReadContext } from './context.js';

export function readAdministration(m: MedicationAdministration, ref: string, ctx: ReadContext): Read {
  const fluidClass = classifyFluid(m.medicationCodeableConcept);
  const vaso = fluidClass ? undefined : classifyVasoactive(m.medicationCodeableConcept);
  if (!fluidClass && !vaso) return {};
  const kind = fluidClass ? 'fluid' : 'vasoactive';
  if (m.status === 'entered-in-error') return left(ref, 'entered-in-error', 'status is entered-in-error', kind);
  if (m.status === 'not-done' || (m.status === 'stopped' && !fluidClass)) return left(ref, 'cancelled', `status is ${m.status}`, kind);
  const start = readTime(ctx, ref, m.effectivePeriod?.start ?? m.effectiveDateTime, kind);
  if (!start.ok) return { excluded: [start.excluded] };
  const endRaw = m.effectivePeriod?.end ?? m.effectiveDateTime;
  const endRead = endRaw ? readTime(ctx, ref, endRaw) : undefined;
  // An end that cannot be used is left out on its own; the administration still counts from its start.
  const excluded = endRead && !endRead.ok ? [endRead.excluded] : [];
  const end = endRead?.ok ? endRead : undefined;
  if (vaso) {
    const rate = m.dosage?.rateQuantity;
    return {
      vasoactives: [
        {
          ref,
          drug: vaso,
          start: start.iso,
          ...(end && m.effectivePeriod?.end ? { end: end.iso } : {}),
          status: m.status ?? 'unknown',
          ...(rate && typeof rate.value === 'number' ? { rate: { value: rate.value, unit: rate.unit ?? rate.code ?? '' } } : {}),
        },
      ],
      excluded,
    };
  }
  if (m.status !== 'completed' && m.status !== 'in-progress' && m.status !== 'stopped')
    return { excluded: [...excluded, exclusion(ref, 'no-value', `status ${String(m.status)}`, 'fluid')] };
  let volumeMl = convert(m.dosage?.dose?.value ?? NaN, m.dosage?.dose?.code ?? m.dosage?.dose?.unit, 'mL');
  if ((volumeMl === undefined || Number.isNaN(volumeMl)) && m.dosage?.rateQuantity && end && m.effectivePeriod?.end) {
    const perMin = convert(m.dosage.rateQuantity.value ?? NaN, m.dosage.rateQuantity.code ?? m.dosage.rateQuantity.unit, 'mL/min');
    if (perMin !== undefined) volumeMl = perMin * ((end.ms - start.ms) / 60_000);
  }
  if (volumeMl === undefined || !Number.isFinite(volumeMl)) {
    return { excluded: [...excluded, exclusion(ref, 'no-value', 'no volume (dosage.dose in mL, or rate over a period)', 'fluid')] };
  }
  if (volumeMl <= 0 || volumeMl > 10_000) {
    return {
      excluded: [
        ...excluded,
        exclusion(ref, 'impossible-value', `${round2(volumeMl)} mL is not a plausible single administration`, 'fluid'),
      ],
    };
  }
  const last = end ?? start;
  return {
    fluids: [
      {
        ref,
        fluidClass: fluidClass as NonNullable<typeof fluidClass>,
        display: conceptLabel(m.medicationCodeableConcept) || 'IV fluid',
        volumeMl: roundMl(volumeMl),
        start: start.iso,
        end: last.iso,
        status: m.status,
        ageMinutes: last.ageMinutes,
      },
    ],
    excluded,
  };
}
