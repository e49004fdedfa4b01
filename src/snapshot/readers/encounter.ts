/** Encounter → its start (the admission time the rules measure early resuscitation and admission weight from) and status. */
import type { Encounter } from 'fhir/r4.js';
import { fhirDateTime } from '../time.js';
import type { PatientSnapshot } from '../types.js';

export function readEncounter(e: Encounter, ref: string): NonNullable<PatientSnapshot['encounter']> {
  // The start of the stay dates the shock (phase rules count hours from it): a date alone is taken as the start of that day.
  const t = e.period?.start ? fhirDateTime(e.period.start) : undefined;
  const start = t && (t.precision === 'second' || t.precision === 'day') ? t.iso : undefined;
  return {
    ref,
    ...(start ? { start } : {}),
    ...(start && t?.precision === 'day' ? { timeAssumed: 'date-only' as const } : {}),
    ...(e.status ? { status: e.status } : {}),
  };
}
