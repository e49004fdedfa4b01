/** Invented patients and CDS Hooks requests for the HTTP and gathering tests. Valid FHIR R4 (checked in tests). */
import type { FhirResource } from 'fhir/r4.js';
import * as b from '../../examples/lib/fhir-builders.js';
import { PREFETCH } from '../../src/hooks/services.js';

export const NOW = new Date('2026-11-20T14:00:00Z');
export const PID = 'tm-pat-ward4-017';
export const EID = 'tm-enc-ward4-017';
export const HOOK_INSTANCE = 'b9d2f1c4-6a3e-4d7b-9c1a-2f8e5d4c3b21';

/** A ventilated invented patient with fresh vitals and a lactate; no dynamic markers. */
export function basicResources(now = NOW): Record<string, FhirResource[]> {
  const t = (m: number) => b.minutesAgo(now, m);
  return {
    patient: [b.patient(PID, 'female', '1958-04-11', 'Quillfeather', 'Norah')],
    encounter: [b.encounter(EID, PID, t(26 * 60))],
    vitals: [
      b.numeric('hr-1', PID, 'heartRate', 112, t(10)),
      b.numeric('sbp-1', PID, 'systolicBp', 92, t(10)),
      b.numeric('dbp-1', PID, 'diastolicBp', 48, t(10)),
      b.numeric('map-1', PID, 'meanBp', 61, t(10)),
      b.numeric('rr-1', PID, 'respiratoryRate', 20, t(10)),
      b.numeric('hr-0', PID, 'heartRate', 104, t(70)),
    ],
    labs: [b.numeric('lac-1', PID, 'lactate', 3.4, t(45))],
    body: [b.numeric('wt-1', PID, 'bodyWeight', 72, t(20 * 60)), b.numeric('ht-1', PID, 'bodyHeight', 168, t(20 * 60))],
    balance: [],
    hemodynamics: [],
    ventilation: [],
    assessments: [],
    conditions: [],
    fluidsGiven: [],
    medications: [],
  };
}

export function allResources(r: Record<string, FhirResource[]>): FhirResource[] {
  return Object.values(r).flat();
}

/** A full prefetch: the read keys hold the resource, the search keys a searchset Bundle. */
export function prefetchOf(r: Record<string, FhirResource[]>): Record<string, unknown> {
  return Object.fromEntries(
    Object.keys(PREFETCH).map((k) => {
      const list = r[k] ?? [];
      if (k === 'patient' || k === 'encounter') return [k, list[0] ?? null];
      return [k, b.searchset(list)];
    }),
  );
}

export function bolusDraft(now = NOW) {
  return b.bolusOrder('draft-bolus-1', PID, b.FLUIDS.lactatedRinger, 500, 30, b.minutesAgo(now, 1));
}

export function orderSelectRequest(
  opts: { prefetch?: Record<string, unknown>; fhirServer?: string; token?: string; draft?: FhirResource[]; selections?: string[] } = {},
) {
  const draft = opts.draft ?? [bolusDraft()];
  return {
    hook: 'order-select',
    hookInstance: HOOK_INSTANCE,
    ...(opts.fhirServer ? { fhirServer: opts.fhirServer } : {}),
    ...(opts.token && opts.fhirServer
      ? {
          fhirAuthorization: {
            access_token: opts.token,
            token_type: 'Bearer',
            expires_in: 300,
            scope: 'patient/Observation.read patient/Patient.read',
            subject: 'tidemark-cds',
            patient: PID,
          },
        }
      : {}),
    context: {
      userId: 'Practitioner/tm-prac-olsen',
      patientId: PID,
      encounterId: EID,
      selections: opts.selections ?? draft.map((d) => `${d.resourceType}/${d.id ?? ''}`),
      draftOrders: { resourceType: 'Bundle', entry: draft.map((resource) => ({ resource })) },
    },
    ...(opts.prefetch ? { prefetch: opts.prefetch } : {}),
  };
}

export function orderSignRequest(prefetch: Record<string, unknown>) {
  const r = orderSelectRequest({ prefetch });
  const { selections: _s, ...context } = r.context;
  return { ...r, hook: 'order-sign', context };
}

export function patientViewRequest(prefetch: Record<string, unknown>) {
  return {
    hook: 'patient-view',
    hookInstance: HOOK_INSTANCE,
    context: { userId: 'Practitioner/tm-prac-olsen', patientId: PID, encounterId: EID },
    prefetch,
  };
}
