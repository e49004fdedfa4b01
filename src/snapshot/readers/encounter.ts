/** Encounter → its start (the admission time the rules measure early resuscitation and admission weight from) and status. */
import type { Encounter } from 'fhir/r4.js';
import { isoInstant } from '../time.js';
import type { PatientSnapshot } from '../types.js';

export function readEncounter(e: Encounter, ref: string): NonNullable<PatientSnapshot['encounter']> {
  const start = e.period?.start ? isoInstant(e.period.start)?.iso : undefined;
  return { ref, ...(start ? { start } : {}), ...(e.status ? { status: e.status } : {}) };
}
