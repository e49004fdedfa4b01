/** Condition → a condition entry (codes, text, clinical status, onset); entered-in-error and refuted ones are left out. */
import type { Condition } from 'fhir/r4.js';
import { left, type Read } from './context.js';

export function readCondition(c: Condition, ref: string): Read {
  const verification = c.verificationStatus?.coding?.[0]?.code;
  if (verification === 'entered-in-error') return left(ref, 'entered-in-error', 'verificationStatus is entered-in-error');
  if (verification === 'refuted') return left(ref, 'cancelled', 'verificationStatus is refuted');
  const clinicalStatus = c.clinicalStatus?.coding?.[0]?.code ?? 'unknown';
  const codings = (c.code?.coding ?? [])
    .filter((x) => x.system && x.code)
    .map((x) => ({ system: x.system as string, code: x.code as string, ...(x.display ? { display: x.display } : {}) }));
  return {
    conditions: [
      {
        ref,
        codings,
        ...(c.code?.text ? { text: c.code.text } : {}),
        clinicalStatus,
        ...(c.onsetDateTime ? { onset: c.onsetDateTime } : {}),
      },
    ],
  };
}
