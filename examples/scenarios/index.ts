/**
 * The invented ICU scenarios of Harbourside General Hospital (no real patients), in order, with the helpers
 * that turn one into a transaction Bundle and a CDS Hooks request. Used by the demo (src/cli/demo.ts), the
 * end-to-end tests (tests/e2e/scenarios.test.ts) and write-bundles.ts.
 */
import { randomUUID } from 'node:crypto';
import type { Bundle } from 'fhir/r4.js';
import * as b from '../lib/fhir-builders.js';
import { SERVICES } from '../../src/hooks/services.js';
import { scenario as clearResponder } from './01-clear-responder.js';
import { scenario as responderPoorTolerance } from './02-responder-poor-tolerance.js';
import { scenario as fixedFullIvc } from './03-fixed-full-ivc.js';
import { scenario as ppvNotValid } from './04-ppv-not-valid.js';
import { scenario as legRaiseFirst } from './05-leg-raise-first.js';
import { scenario as bolusAnswered } from './06-bolus-answered.js';
import { scenario as bolusUnanswered } from './07-bolus-unanswered.js';
import { scenario as oldDataOnly } from './08-old-data-only.js';
import { scenario as notAFluidOrder } from './09-not-a-fluid-order.js';
import { scenario as tidalVolumeChallenge } from './10-tidal-volume-challenge.js';
import { scenario as responsiveWellPerfused } from './11-responsive-well-perfused.js';
import { scenario as ppvHighLowTidalVolume } from './12-ppv-high-low-tidal-volume.js';
import { scenario as cvpOnPeep } from './13-cvp-on-peep.js';
import { scenario as legRaiseBeforeBolus } from './14-leg-raise-before-bolus.js';
import { scenario as raisedAbdominalPressure } from './15-raised-abdominal-pressure.js';
import { scenario as oneSidedLungUltrasound } from './16-one-sided-lung-ultrasound.js';
import { scenario as perfusedAfIvcOnly } from './17-perfused-af-ivc-only.js';
import { scenario as earlySepticShock } from './18-early-septic-shock.js';
import { scenario as cirrhosisLungWater } from './19-cirrhosis-lung-water.js';
import type { BuiltScenario, OrderHook, Scenario } from './types.js';

export type { BuiltScenario, Scenario, ScenarioExpectation } from './types.js';

export const SCENARIOS: readonly Scenario[] = [
  clearResponder,
  responderPoorTolerance,
  fixedFullIvc,
  ppvNotValid,
  legRaiseFirst,
  bolusAnswered,
  bolusUnanswered,
  oldDataOnly,
  notAFluidOrder,
  tidalVolumeChallenge,
  responsiveWellPerfused,
  ppvHighLowTidalVolume,
  cvpOnPeep,
  legRaiseBeforeBolus,
  raisedAbdominalPressure,
  oneSidedLungUltrasound,
  perfusedAfIvcOnly,
  earlySepticShock,
  cirrhosisLungWater,
];

/** The Tidemark service that answers a hook (from the registry, not hard-coded). */
export function serviceIdFor(hook: OrderHook): string {
  const s = SERVICES.find((x) => x.hook === hook);
  if (!s) throw new Error(`no Tidemark service for ${hook}`);
  return s.id;
}

/** The chart as a FHIR transaction Bundle (PUT with the ids kept). */
export function scenarioBundle(built: BuiltScenario): Bundle {
  return b.transaction(built.resources);
}

/** The hook context of a scenario (order-sign has no selections). */
export function hookContext(s: Scenario, built: BuiltScenario): Record<string, unknown> {
  return {
    userId: s.userId,
    patientId: s.patientId,
    encounterId: s.encounterId,
    ...(built.hook === 'order-select' ? { selections: built.selections } : {}),
    draftOrders: { resourceType: 'Bundle', type: 'collection', entry: built.draftOrders.map((resource) => ({ resource })) },
  };
}

export type DataRoute =
  { kind: 'fhir-server'; fhirServer: string; accessToken: string } | { kind: 'prefetch'; prefetch: Record<string, unknown> };

/** A CDS Hooks 2.0 request for the scenario: either Tidemark queries the FHIR server, or everything is in prefetch. */
export function hookRequest(s: Scenario, built: BuiltScenario, route: DataRoute): Record<string, unknown> {
  return {
    hook: built.hook,
    hookInstance: randomUUID(),
    ...(route.kind === 'fhir-server'
      ? {
          fhirServer: route.fhirServer,
          fhirAuthorization: {
            access_token: route.accessToken,
            token_type: 'Bearer',
            expires_in: 300,
            scope:
              'patient/Patient.read patient/Encounter.read patient/Observation.read patient/Condition.read patient/MedicationAdministration.read patient/MedicationRequest.read',
            subject: 'tidemark-demo-client',
            patient: s.patientId,
          },
        }
      : {}),
    context: hookContext(s, built),
    ...(route.kind === 'prefetch' ? { prefetch: route.prefetch } : {}),
  };
}
