/**
 * FHIR R4 resources → one PatientSnapshot. Pure: the clock is passed in.
 * Every measurement gets its canonical unit, original value/unit, time, age and source reference.
 * Unknown codes are ignored quietly only when they are not ours to read; everything we do read but cannot
 * use (bad unit, impossible value, future time, entered-in-error…) is listed in `excluded` with a reason.
 * One reader per resource type (./readers/), each `(resource, ref, context) → Read`, called from a dispatch
 * table; this module checks ids and subjects, merges what the readers found, and sorts it.
 */
import type { FhirResource, MedicationAdministration, MedicationRequest, Observation, Condition } from 'fhir/r4.js';
import { EMPTY_SITE_MAP, type SiteMap } from '../fhir/site-map.js';
import { readAdministration } from './readers/administration.js';
import { readCondition } from './readers/condition.js';
import { exclusion, type Read, type ReadContext } from './readers/context.js';
import { readDraftOrders } from './readers/draft-orders.js';
import { readEncounter } from './readers/encounter.js';
import { readActiveRequest } from './readers/medication-request.js';
import { readObservation } from './readers/observation.js';
import { readPatient } from './readers/patient.js';
import { parseTimeMs } from './time.js';
import type {
  CodedMeasurement,
  ConditionEntry,
  DynamicTestResult,
  Exclusion,
  FluidGiven,
  Measurement,
  PatientSnapshot,
  VasoactiveDrug,
} from './types.js';

export { kindLookup } from './readers/observation.js';

export interface SnapshotContext {
  patientId: string;
  encounterId?: string;
  /** order-select `selections` (Type/id); absent means every draft order is in focus (order-sign). */
  selections?: readonly string[];
  draftOrders?: { entry?: Array<{ resource?: unknown }> };
}

/** FHIR R4 id datatype: [A-Za-z0-9\-\.]{1,64} (FHIR R4, Datatypes "id"). */
const FHIR_ID = /^[A-Za-z0-9\-.]{1,64}$/;

/** The readers of the resources that belong to the patient in context (their subject is checked first). */
const SUBJECT_READERS: Record<string, (r: FhirResource, ref: string, ctx: ReadContext) => Read> = {
  Observation: (r, ref, ctx) => readObservation(r as Observation, ref, ctx),
  Condition: (r, ref) => readCondition(r as Condition, ref),
  MedicationAdministration: (r, ref, ctx) => readAdministration(r as MedicationAdministration, ref, ctx),
  MedicationRequest: (r, ref, ctx) => readActiveRequest(r as MedicationRequest, ref, ctx),
};
/** The resource types buildSnapshot reads. */
const TYPES_READ: ReadonlySet<string> = new Set(['Patient', 'Encounter', ...Object.keys(SUBJECT_READERS)]);

function belongs(ref: string, subject: { reference?: string | undefined } | undefined, patientRef: string): Exclusion | undefined {
  if (subject?.reference === patientRef || subject?.reference?.endsWith(`/${patientRef}`)) return undefined;
  return exclusion(ref, 'other-patient', `subject ${subject?.reference ?? '(none)'} is not ${patientRef}`);
}

const newestFirst = (a: { effective: string }, b: { effective: string }) => parseTimeMs(b.effective) - parseTimeMs(a.effective);

/** `siteMap`: the site's ConceptMaps and unit hints, loaded and checked at start (src/fhir/site-map.ts); none by default. */
export function buildSnapshot(
  resources: readonly FhirResource[],
  ctx: SnapshotContext,
  now: Date,
  siteMap: SiteMap = EMPTY_SITE_MAP,
): PatientSnapshot {
  const patientRef = `Patient/${ctx.patientId}`;
  const read: ReadContext = { now, nowMs: now.getTime(), patientRef, siteMap };
  const excluded: Exclusion[] = [];
  const measurements: Measurement[] = [];
  const coded: CodedMeasurement[] = [];
  const dynamicTests: DynamicTestResult[] = [];
  const fluids: FluidGiven[] = [];
  const vasoactives: VasoactiveDrug[] = [];
  const conditions: ConditionEntry[] = [];
  let patient: PatientSnapshot['patient'] = { ref: patientRef, sex: 'unknown' };
  let encounter: PatientSnapshot['encounter'];
  const merge = (r: Read) => {
    if (r.measurements) measurements.push(...r.measurements);
    if (r.coded) coded.push(...r.coded);
    if (r.dynamicTests) dynamicTests.push(...r.dynamicTests);
    if (r.fluids) fluids.push(...r.fluids);
    if (r.vasoactives) vasoactives.push(...r.vasoactives);
    if (r.conditions) conditions.push(...r.conditions);
    if (r.excluded) excluded.push(...r.excluded);
  };

  for (const r of resources) {
    if (!r || typeof r !== 'object') continue;
    // An id that is not a FHIR id (1–64 of A-Z a-z 0-9 - .) would be copied into every finding's reference.
    if (r.id !== undefined && !FHIR_ID.test(r.id)) {
      if (TYPES_READ.has(r.resourceType))
        excluded.push(
          exclusion(
            `${r.resourceType}/(invalid id)`,
            'malformed',
            `the id is not a FHIR id (1-64 of A-Z a-z 0-9 - .; ${String(r.id).length} characters)`,
          ),
        );
      continue;
    }
    const ref = `${r.resourceType}/${r.id ?? '(no id)'}`;
    try {
      if (r.resourceType === 'Patient') {
        if (r.id === ctx.patientId) patient = readPatient(r, patientRef, now);
      } else if (r.resourceType === 'Encounter') {
        if (!ctx.encounterId || r.id === ctx.encounterId) encounter = readEncounter(r, ref);
      } else {
        const reader = SUBJECT_READERS[r.resourceType];
        if (!reader) continue;
        const other = belongs(ref, (r as { subject?: { reference?: string } }).subject, patientRef);
        if (other) excluded.push(other);
        else merge(reader(r, ref, read));
      }
    } catch (e) {
      // A guard against a reader bug on hostile input, not control flow: the resource is left out, the call goes on.
      excluded.push(exclusion(ref, 'malformed', `could not be read: ${(e as Error).message}`.slice(0, 200)));
    }
  }

  // Newest first within each kind; kinds in code-unit order.
  measurements.sort((a, b) =>
    a.kind === b.kind ? parseTimeMs(b.effective) - parseTimeMs(a.effective) : Number(a.kind > b.kind) - Number(a.kind < b.kind),
  );
  coded.sort(newestFirst);
  dynamicTests.sort(newestFirst);
  fluids.sort((a, b) => parseTimeMs(b.end) - parseTimeMs(a.end));
  const drafts = readDraftOrders(ctx);
  excluded.push(...drafts.excluded);

  return {
    patient,
    ...(encounter ? { encounter } : {}),
    now: now.toISOString(),
    measurements,
    coded,
    dynamicTests,
    fluids,
    vasoactives,
    conditions,
    draftOrders: drafts.orders,
    excluded,
  };
}
