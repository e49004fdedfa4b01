/**
 * Sends one scenario to a running Tidemark over real HTTP, by one of two routes, and reads back its audit record:
 *   fhir-server — fhirServer + fhirAuthorization, no prefetch: Tidemark queries the FHIR server itself;
 *   prefetch    — the service's own prefetch templates run against the FHIR server first, as a CDS client
 *                 would, and everything sent in `prefetch` (no fhirServer).
 * Used by the demo and the end-to-end tests.
 */
import { findService } from '../../src/hooks/services.js';
import { prefetchFromServer, type PrefetchQueryResult } from '../../src/devserver/prefetch-client.js';
import { hookContext, hookRequest, serviceIdFor } from './index.js';
import type { BuiltScenario, Scenario } from './types.js';

export type RouteKind = 'fhir-server' | 'prefetch';

export interface ScenarioRun {
  route: RouteKind;
  serviceId: string;
  status: number;
  /** The response body: `{ cards }` on 200, an OperationOutcome otherwise. */
  body: { cards?: Array<Record<string, unknown>> } & Record<string, unknown>;
  ms: number;
  /** The audit record of this call (GET /audit/advice/{id}), when it could be found. */
  record?: Record<string, unknown>;
  /** For the prefetch route: what the client-side queries returned. */
  prefetchQueries?: PrefetchQueryResult[];
}

export interface RunTargets {
  /** Tidemark base URL, e.g. http://127.0.0.1:8080 */
  serviceUrl: string;
  /** FHIR base URL of the server holding the scenario's chart. */
  fhirBaseUrl: string;
  /** Bearer token the FHIR server expects (sent as fhirAuthorization.access_token, or used by the client for prefetch). */
  fhirToken: string;
  /** Bearer token for the audit API, when it is guarded. */
  auditToken?: string;
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any -- untyped JSON answers, read field by field
async function json(url: string, init: RequestInit = {}): Promise<{ status: number; body: any }> {
  const r = await fetch(url, init);
  const text = await r.text();
  let body: unknown = text;
  try {
    body = JSON.parse(text);
  } catch {
    /* keep the text */
  }
  return { status: r.status, body };
}

/** The audit record of one call: the newest of this patient and service, if it carries the call's hookInstance. */
export async function latestRecord(
  t: RunTargets,
  patientId: string,
  serviceId: string,
  hookInstance: string,
): Promise<Record<string, unknown> | undefined> {
  const headers: Record<string, string> = t.auditToken ? { authorization: `Bearer ${t.auditToken}` } : {};
  const list = await json(`${t.serviceUrl}/audit/advice?${new URLSearchParams({ patient: patientId, service: serviceId, limit: '1' })}`, {
    headers,
  });
  const id = list.status === 200 ? (list.body?.items?.[0]?.id as string | undefined) : undefined;
  if (!id) return undefined;
  const rec = await json(`${t.serviceUrl}/audit/advice/${encodeURIComponent(id)}`, { headers });
  return rec.status === 200 && rec.body?.hookInstance === hookInstance ? (rec.body as Record<string, unknown>) : undefined;
}

export async function runScenario(t: RunTargets, s: Scenario, built: BuiltScenario, route: RouteKind): Promise<ScenarioRun> {
  const serviceId = serviceIdFor(built.hook);
  let request: Record<string, unknown>;
  let prefetchQueries: PrefetchQueryResult[] | undefined;
  if (route === 'fhir-server') {
    request = hookRequest(s, built, { kind: 'fhir-server', fhirServer: t.fhirBaseUrl, accessToken: t.fhirToken });
  } else {
    const service = findService(serviceId);
    if (!service) throw new Error(`no service ${serviceId}`);
    const client = await prefetchFromServer(t.fhirBaseUrl, service, hookContext(s, built), { accessToken: t.fhirToken });
    prefetchQueries = client.queries;
    request = hookRequest(s, built, { kind: 'prefetch', prefetch: client.prefetch });
  }
  const t0 = performance.now();
  const res = await json(`${t.serviceUrl}/cds-services/${serviceId}`, {
    method: 'POST',
    headers: { 'content-type': 'application/json' },
    body: JSON.stringify(request),
  });
  const ms = performance.now() - t0;
  const record = await latestRecord(t, s.patientId, serviceId, String(request['hookInstance']));
  return {
    route,
    serviceId,
    status: res.status,
    body: res.body,
    ms,
    ...(record ? { record } : {}),
    ...(prefetchQueries ? { prefetchQueries } : {}),
  };
}
