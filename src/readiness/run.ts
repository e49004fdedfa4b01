/**
 * Runs the readiness report against a FHIR server: for each patient and each service, the hook request a service
 * would be called with, gathered by the very gather() the services use (with the site's widened searches),
 * normalised through the site's maps and assessed by the real pure rules; then one survey search without a code
 * filter, which finds the codes no map covers. I/O here only; the report itself is pure (report.ts).
 */
import { randomUUID } from 'node:crypto';
import type { Bundle, FhirResource, MedicationRequest } from 'fhir/r4.js';
import { assess } from '../assess/assess.js';
import { resolveThresholds } from '../assess/thresholds.js';
import { loadCatalogue } from '../cards/catalogue.js';
import type { AppConfig } from '../config/config.js';
import { rulesVersion } from '../config/rules-version.js';
import { RXNORM, SNOMED } from '../fhir/codes.js';
import { FhirFetchError, fhirFetcher, resolveUnderBase, type Fetcher } from '../fhir/fetcher.js';
import { gather } from '../hooks/gather.js';
import { EMPTY_SITE_MAP } from '../fhir/site-map.js';
import { hookRequestSchema } from '../hooks/schemas.js';
import { servicesFor, type ServiceDefinition } from '../hooks/services.js';
import { buildSnapshot } from '../snapshot/normalize.js';
import { patientReadiness, type ReadinessReport, type ServiceRun } from './report.js';

export interface ReadinessOptions {
  fhirServer: string;
  token?: string;
  patients: readonly string[];
  cfg: AppConfig;
  now?: Date;
  makeFetcher?: typeof fhirFetcher;
}

/** Observations read by the survey search, newest first (one page; our own bound). */
export const SURVEY_COUNT = 200;

/**
 * A sample draft order for the order hooks, so that the order questions are asked as in a real call: 500 mL of a
 * balanced crystalloid IV over 15 minutes (RxNorm 847630, src/fhir/value-sets/fluids.json; IV route SNOMED CT
 * 47625008). It is the report's own, never written anywhere.
 */
function sampleOrder(patientId: string): MedicationRequest {
  return {
    resourceType: 'MedicationRequest',
    id: 'readiness-sample-bolus',
    status: 'draft',
    intent: 'order',
    subject: { reference: `Patient/${patientId}` },
    medicationCodeableConcept: {
      coding: [
        {
          system: RXNORM,
          code: '847630',
          display:
            'calcium chloride 0.2 MG/ML / potassium chloride 0.3 MG/ML / sodium chloride 6 MG/ML / sodium lactate 3.1 MG/ML Injectable Solution',
        },
      ],
      text: 'Balanced crystalloid 500 mL IV bolus (readiness sample)',
    },
    dosageInstruction: [
      {
        route: { coding: [{ system: SNOMED, code: '47625008', display: 'Intravenous route' }] },
        timing: { repeat: { duration: 15, durationUnit: 'min' } },
        doseAndRate: [{ doseQuantity: { value: 500, unit: 'mL', system: 'http://unitsofmeasure.org', code: 'mL' } }],
      },
    ],
  };
}

/** The CDS Hooks 2.0 request a service would be called with for this patient. */
export function hookRequestFor(
  service: ServiceDefinition,
  patientId: string,
  fhirServer: string,
  token?: string,
  encounterId?: string,
): unknown {
  const order = sampleOrder(patientId);
  const context: Record<string, unknown> = {
    userId: 'Practitioner/tidemark-readiness',
    patientId,
    ...(encounterId ? { encounterId } : {}),
  };
  if (service.hook !== 'patient-view')
    context['draftOrders'] = { resourceType: 'Bundle', type: 'collection', entry: [{ resource: order }] };
  if (service.hook === 'order-select') context['selections'] = [`MedicationRequest/${order.id}`];
  return {
    hook: service.hook,
    hookInstance: randomUUID(),
    fhirServer,
    ...(token
      ? {
          fhirAuthorization: {
            access_token: token,
            token_type: 'Bearer',
            expires_in: 300,
            scope: 'patient/*.read',
            subject: 'tidemark-readiness',
          },
        }
      : {}),
    context,
  };
}

export async function runReadiness(opts: ReadinessOptions): Promise<ReadinessReport> {
  const now = opts.now ?? new Date();
  const siteMap = opts.cfg.siteMap ?? EMPTY_SITE_MAP;
  const thresholds = resolveThresholds(opts.cfg.file.thresholds ?? {});
  const version = rulesVersion(loadCatalogue().digest, thresholds, undefined, opts.cfg.siteMap);
  const gatherOptions = {
    budgetMs: opts.cfg.TIDEMARK_FHIR_BUDGET_MS,
    maxPages: opts.cfg.TIDEMARK_FHIR_MAX_PAGES,
    concurrency: opts.cfg.TIDEMARK_FHIR_CONCURRENCY,
    maxResponseBytes: opts.cfg.TIDEMARK_FHIR_MAX_RESPONSE_BYTES,
    maxCallBytes: opts.cfg.TIDEMARK_FHIR_MAX_CALL_BYTES,
  };
  const makeFetcher = opts.makeFetcher ?? fhirFetcher;
  const services = servicesFor(opts.cfg.siteMap);
  const patients = [];
  for (const patientId of opts.patients) {
    const runs: ServiceRun[] = [];
    // The report's own two searches, with the same byte caps as a call.
    const fetcher = makeFetcher(opts.fhirServer, opts.token, {
      maxResponseBytes: gatherOptions.maxResponseBytes,
      maxCallBytes: gatherOptions.maxCallBytes,
    });
    const search = (path: string) => searchUnder(fetcher, opts.fhirServer, path, gatherOptions.budgetMs);
    // The EHR names the encounter in the hook context; the report takes the patient's newest one in progress.
    const encounterId = await currentEncounter(search, patientId);
    for (const service of services) {
      const request = hookRequestSchema.parse(hookRequestFor(service, patientId, opts.fhirServer, opts.token, encounterId));
      const gathered = await gather(request, service, gatherOptions, makeFetcher);
      const ctx = request.context as { draftOrders?: { entry?: Array<{ resource?: unknown }> }; selections?: string[] };
      const snapshot = buildSnapshot(
        gathered.resources,
        {
          patientId,
          ...(encounterId ? { encounterId } : {}),
          ...(ctx.draftOrders ? { draftOrders: ctx.draftOrders } : {}),
          ...(ctx.selections ? { selections: ctx.selections } : {}),
        },
        now,
        siteMap,
      );
      runs.push({
        serviceId: service.id,
        hook: service.hook,
        outcomes: gathered.outcomes,
        resources: gathered.resources,
        snapshot,
        advice: assess(snapshot, now, thresholds, version),
      });
    }
    const survey = await surveyObservations(search, patientId);
    patients.push({
      ...patientReadiness(patientId, runs, survey.resources, siteMap),
      ...(encounterId ? { encounterId } : {}),
      survey: { count: survey.resources.length, ...(survey.problem ? { problem: survey.problem } : {}) },
    });
  }
  return { rulesVersion: version, now: now.toISOString(), patients };
}

type Search = (path: string) => Promise<unknown>;

/** One search, its URL resolved under fhirServer as gather resolves its own (src/fhir/fetcher.ts resolveUnderBase). */
async function searchUnder(fetcher: Fetcher, base: string, path: string, budgetMs: number): Promise<unknown> {
  const url = resolveUnderBase(path, base);
  if (!url) throw new FhirFetchError('outside-base', 'not under fhirServer');
  return fetcher(url.href, AbortSignal.timeout(budgetMs));
}

/** The id of the patient's newest Encounter in progress, if the server has one. */
async function currentEncounter(search: Search, patientId: string): Promise<string | undefined> {
  try {
    const body = (await search(`Encounter?patient=Patient/${patientId}&status=in-progress&_sort=-date&_count=1`)) as Bundle;
    const id = body?.entry?.[0]?.resource?.id;
    return typeof id === 'string' && /^[A-Za-z0-9\-.]{1,64}$/.test(id) ? id : undefined;
  } catch {
    return undefined;
  }
}

/** The patient's newest Observations whatever their code (one page), or why the server gave none. */
async function surveyObservations(search: Search, patientId: string): Promise<{ resources: FhirResource[]; problem?: string }> {
  try {
    const body = (await search(`Observation?patient=Patient/${patientId}&_sort=-date&_count=${SURVEY_COUNT}`)) as Bundle;
    if (body?.resourceType !== 'Bundle') return { resources: [], problem: 'the answer was not a Bundle' };
    return { resources: (body.entry ?? []).map((e) => e.resource).filter((r): r is FhirResource => r?.resourceType === 'Observation') };
  } catch (e) {
    if (e instanceof FhirFetchError) return { resources: [], problem: e.detail };
    return { resources: [], problem: (e as Error)?.name === 'TimeoutError' ? 'timed out' : 'connection failed' };
  }
}
