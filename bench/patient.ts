/**
 * The benchmark's invented patient (no real person): a ventilated adult in septic shock on an invented ward,
 * charted over the last 24 h with the shared builders. Heart rate and mean pressure every 30 min over the last
 * 12 h (50 vital-sign Observations), plus labs, weight and height, venous pressure, PPV, ventilator settings,
 * ventilation state, rhythm, chest, abdominal pressure, urine output and shift totals, two conditions and one
 * earlier litre of fluid. The order being written is a 500 mL bolus of lactated Ringer's over 20 min.
 */
import type { FhirResource, Resource } from 'fhir/r4.js';
import * as b from '../examples/lib/fhir-builders.js';
import { Chart, CONDITIONS, every, wobble } from '../examples/scenarios/chart.js';

export const BENCH_PATIENT = 'bench-heron-11';
export const BENCH_ENCOUNTER = 'bench-heron-11-stay';
export const BENCH_USER = 'Practitioner/bench-dr-lindqvist';
export const BENCH_DRAFT_ID = 'bench-order-bolus';

export interface BenchPatient {
  resources: FhirResource[];
  draftOrders: Resource[];
  /** Resource counts by type, for the printed header. */
  counts: Record<string, number>;
}

export function buildBenchPatient(now: Date): BenchPatient {
  const c = new Chart('bh', BENCH_PATIENT, now);
  c.patient('female', '1963-09-02', 'Ashworth', 'Maren').encounter(BENCH_ENCOUNTER, 24 * 60, 'Heron ICU, bed 11');
  c.condition(CONDITIONS.pneumonia, 30 * 60);
  c.condition(CONDITIONS.sepsis, 26 * 60);
  c.num('bodyWeight', 70, 23 * 60).num('bodyHeight', 168, 23 * 60);
  // Every 30 min over 12 h: heart rate and mean pressure (25 × 2 = 50 Observations).
  for (const [i, at] of every(12 * 60, 0, 30).entries()) {
    c.num('heartRate', 98 + Math.round(i / 3) + wobble(i, 2), at);
    c.num('meanBp', 70 - Math.round(i / 4) + wobble(i, 1), at);
  }
  c.series('cvp', [
    [18 * 60, 5],
    [12 * 60, 6],
    [6 * 60, 6],
    [20, 7],
  ]);
  c.series('lactate', [
    [20 * 60, 2.2],
    [8 * 60, 3.0],
    [35, 3.6],
  ]);
  c.series('albumin', [[20 * 60, 34]]).series('creatinine', [
    [20 * 60, 0.9],
    [35, 1.0],
  ]);
  c.codedSeries('ventilationMode', 'controlled-no-effort', [6 * 60, 60]);
  c.codedSeries('heartRhythm', 'sinus', [6 * 60, 60]);
  c.series('tidalVolume', [
    [6 * 60, 480],
    [60, 480],
  ]);
  c.series('peep', [
    [6 * 60, 8],
    [60, 8],
  ]).series('fio2', [
    [6 * 60, 40],
    [60, 40],
  ]);
  c.coded('chestStatus', 'closed', 10 * 60);
  c.num('intraAbdominalPressure', 9, 3 * 60);
  c.series('ppv', [
    [90, 14],
    [12, 16],
  ]);
  c.fluidGiven(b.FLUIDS.lactatedRinger, 1000, 22 * 60, 21 * 60);
  c.shifts([
    [24 * 60, 12 * 60, 1800, 700],
    [12 * 60, 0, 900, 520],
  ]);
  c.hourlyUrine(6 * 60, 0, (i) => 48 + wobble(i, 5));
  const draft = Chart.bolusDraft(BENCH_DRAFT_ID, BENCH_PATIENT, now, b.FLUIDS.lactatedRinger, 500, 20);
  const counts: Record<string, number> = {};
  for (const r of c.resources) counts[r.resourceType] = (counts[r.resourceType] ?? 0) + 1;
  return { resources: c.resources, draftOrders: [draft], counts };
}

export type BenchHook = 'order-select' | 'patient-view';

export function benchContext(p: BenchPatient, hook: BenchHook): Record<string, unknown> {
  const base = { userId: BENCH_USER, patientId: BENCH_PATIENT, encounterId: BENCH_ENCOUNTER };
  if (hook === 'patient-view') return base;
  return {
    ...base,
    selections: [`MedicationRequest/${BENCH_DRAFT_ID}`],
    draftOrders: { resourceType: 'Bundle', type: 'collection', entry: p.draftOrders.map((resource) => ({ resource })) },
  };
}

/** A fixed hookInstance for every request of a run (the service does not require a unique one). */
export const BENCH_HOOK_INSTANCE = '5b0f3c2e-8d41-4a6f-9e27-1c3d5a7b9f10';

export function benchRequest(
  p: BenchPatient,
  hook: BenchHook,
  route: { prefetch: Record<string, unknown> } | { fhirServer: string; accessToken: string },
): Record<string, unknown> {
  return {
    hook,
    hookInstance: BENCH_HOOK_INSTANCE,
    ...('fhirServer' in route
      ? {
          fhirServer: route.fhirServer,
          fhirAuthorization: {
            access_token: route.accessToken,
            token_type: 'Bearer',
            expires_in: 3600,
            scope:
              'patient/Patient.read patient/Encounter.read patient/Observation.read patient/Condition.read patient/MedicationAdministration.read patient/MedicationRequest.read',
            subject: 'tidemark-bench-client',
            patient: BENCH_PATIENT,
          },
        }
      : {}),
    context: benchContext(p, hook),
    ...('prefetch' in route ? { prefetch: route.prefetch } : {}),
  };
}
