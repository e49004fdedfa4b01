/** Patient → sex and age in whole years at `now` (a year-only birth date is taken as 1 July, a year-month as the 15th: common practice). */
import type { Patient } from 'fhir/r4.js';
import type { PatientSnapshot } from '../types.js';

const MID: Record<number, string> = { 4: '-07-01', 7: '-15', 10: '' };

export function readPatient(p: Patient, ref: string, now: Date): PatientSnapshot['patient'] {
  const sex = p.gender === 'male' || p.gender === 'female' || p.gender === 'other' ? p.gender : 'unknown';
  const out: PatientSnapshot['patient'] = { ref, sex };
  if (p.birthDate && /^\d{4}(-\d{2}(-\d{2})?)?$/.test(p.birthDate)) {
    out.birthDate = p.birthDate;
    const b = new Date(`${p.birthDate}${MID[p.birthDate.length] ?? ''}T00:00:00Z`);
    let years = now.getUTCFullYear() - b.getUTCFullYear();
    if (now.getUTCMonth() < b.getUTCMonth() || (now.getUTCMonth() === b.getUTCMonth() && now.getUTCDate() < b.getUTCDate())) years -= 1;
    if (years >= 0 && years < 130) out.ageYears = years;
  }
  return out;
}
