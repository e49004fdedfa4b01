/**
 * Prints a CDS Hooks request for the quick start, with times relative to now so the data is fresh:
 *   npx tsx examples/make-request.ts | curl -s -H 'content-type: application/json' -d @- http://localhost:8080/cds-services/bolus-review-select
 * An invented patient on an invented ward; the prefetch carries all the data, so no FHIR server is needed.
 */
import * as b from './lib/fhir-builders.js';
import { PREFETCH } from '../src/hooks/services.js';

const now = new Date();
const t = (m: number) => b.minutesAgo(now, m);
const P = 'quickstart-pat-1';
const byKey: Record<string, unknown[]> = {
  vitals: [
    b.numeric('qs-hr', P, 'heartRate', 118, t(8)),
    b.numeric('qs-sbp', P, 'systolicBp', 88, t(8)),
    b.numeric('qs-dbp', P, 'diastolicBp', 46, t(8)),
    b.numeric('qs-map', P, 'meanBp', 60, t(8)),
    b.numeric('qs-rr', P, 'respiratoryRate', 18, t(8)),
    b.numeric('qs-cvp', P, 'cvp', 4, t(8)),
    b.numeric('qs-spo2', P, 'spo2', 95, t(8)),
  ],
  labs: [b.numeric('qs-lac', P, 'lactate', 3.8, t(40)), b.numeric('qs-alb', P, 'albumin', 3.4, t(600), { unit: 'g/dL' })],
  body: [b.numeric('qs-wt', P, 'bodyWeight', 81, t(1200)), b.numeric('qs-ht', P, 'bodyHeight', 178, t(1200))],
  hemodynamics: [b.numeric('qs-ppv', P, 'ppv', 17, t(6))],
  ventilation: [b.numeric('qs-vt', P, 'tidalVolume', 600, t(10)), b.numeric('qs-fio2', P, 'fio2', 35, t(10))],
  assessments: [
    b.coded('qs-vent', P, 'ventilationMode', 'controlled-no-effort', t(10)),
    b.coded('qs-rhythm', P, 'heartRhythm', 'sinus', t(10)),
    b.coded('qs-chest', P, 'chestStatus', 'closed', t(240)),
    b.numeric('qs-iap', P, 'intraAbdominalPressure', 8, t(120)),
  ],
};
const prefetch: Record<string, unknown> = {};
for (const key of Object.keys(PREFETCH)) {
  if (key === 'patient') prefetch[key] = b.patient(P, 'male', '1961-03-14', 'Harrowgate', 'Emil');
  else if (key === 'encounter') prefetch[key] = b.encounter('quickstart-enc-1', P, t(30 * 60));
  else prefetch[key] = b.searchset((byKey[key] ?? []) as never);
}
const draft = b.bolusOrder('quickstart-bolus', P, b.FLUIDS.lactatedRinger, 500, 20, t(0));
process.stdout.write(
  JSON.stringify({
    hook: 'order-select',
    hookInstance: crypto.randomUUID(),
    context: {
      userId: 'Practitioner/quickstart-prescriber',
      patientId: P,
      encounterId: 'quickstart-enc-1',
      selections: ['MedicationRequest/quickstart-bolus'],
      draftOrders: { resourceType: 'Bundle', entry: [{ resource: draft }] },
    },
    prefetch,
  }),
);
