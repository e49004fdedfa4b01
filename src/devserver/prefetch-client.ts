/**
 * What a CDS client does before it calls a service: resolve the service's prefetch templates (CDS Hooks 2.0
 * tokens) for one hook context and run them against its FHIR server. For the demo and the tests, against
 * the embedded server. Searches are read to the end (following `link[next]`) and sent as one searchset Bundle;
 * a read that finds nothing becomes `null`; a failed query becomes the server's OperationOutcome (CDS Hooks 2.0
 * §Prefetch: the service then queries itself when it can).
 */
import type { Bundle, BundleEntry, OperationOutcome } from 'fhir/r4.js';
import { resolvePrefetchTemplate } from '../hooks/prefetch-tokens.js';
import type { ServiceDefinition } from '../hooks/services.js';

export interface PrefetchQueryResult {
  key: string;
  /** The resolved query, relative to the FHIR base. */
  query: string;
  status: number | 'not-applicable' | 'network-error';
  /** Resources returned (a read: 0 or 1). */
  count: number;
  pages: number;
  detail?: string;
}

export interface ClientPrefetch {
  prefetch: Record<string, unknown>;
  queries: PrefetchQueryResult[];
}

const MAX_PAGES = 50;

async function getJson(url: string, token: string | undefined): Promise<{ status: number; body: unknown }> {
  const r = await fetch(url, { headers: { accept: 'application/fhir+json', ...(token ? { authorization: `Bearer ${token}` } : {}) } });
  const text = await r.text();
  let body: unknown;
  try {
    body = JSON.parse(text);
  } catch {
    body = undefined;
  }
  return { status: r.status, body };
}

function operationOutcome(text: string): OperationOutcome {
  return { resourceType: 'OperationOutcome', issue: [{ severity: 'error', code: 'exception', details: { text } }] };
}

/** Runs every prefetch template of `service` for `context` against `baseUrl`, as a CDS client would. */
export async function prefetchFromServer(
  baseUrl: string,
  service: ServiceDefinition,
  context: Record<string, unknown>,
  opts: { accessToken?: string } = {},
): Promise<ClientPrefetch> {
  const base = baseUrl.replace(/\/+$/, '');
  const prefetch: Record<string, unknown> = {};
  const queries: PrefetchQueryResult[] = [];
  for (const [key, q] of Object.entries(service.prefetch)) {
    const resolved = resolvePrefetchTemplate(q.template, service.hook, context);
    if (!resolved.ok) {
      // A client leaves out what it cannot fill (the key is absent).
      queries.push({ key, query: q.template, status: 'not-applicable', count: 0, pages: 0, detail: resolved.reason });
      continue;
    }
    const query = resolved.value;
    try {
      if (!query.includes('?')) {
        const { status, body } = await getJson(`${base}/${query}`, opts.accessToken);
        if (status === 200 && body && typeof body === 'object') prefetch[key] = body;
        else if (status === 404 || status === 410) prefetch[key] = null;
        else
          prefetch[key] =
            body && (body as { resourceType?: string }).resourceType === 'OperationOutcome'
              ? body
              : operationOutcome(`read answered ${status}`);
        queries.push({ key, query, status, count: status === 200 ? 1 : 0, pages: 1 });
        continue;
      }
      const entries: BundleEntry[] = [];
      let url: string | undefined = `${base}/${query}`;
      let pages = 0;
      let last = 200;
      let failure: unknown;
      while (url && pages < MAX_PAGES) {
        const { status, body } = await getJson(url, opts.accessToken);
        pages += 1;
        last = status;
        const bundle = body as Bundle | undefined;
        if (status !== 200 || bundle?.resourceType !== 'Bundle') {
          failure =
            bundle && (bundle as { resourceType?: string }).resourceType === 'OperationOutcome'
              ? bundle
              : operationOutcome(`search answered ${status}`);
          break;
        }
        entries.push(...(bundle.entry ?? []));
        url = bundle.link?.find((l) => l.relation === 'next')?.url;
      }
      if (failure) {
        prefetch[key] = failure;
        const text = ((failure as OperationOutcome).issue ?? []).map((i) => i.details?.text ?? i.diagnostics ?? i.code).join('; ');
        queries.push({ key, query, status: last, count: 0, pages, detail: text });
        continue;
      }
      const searchset: Bundle = { resourceType: 'Bundle', type: 'searchset', total: entries.length, entry: entries };
      if (entries.length === 0) delete searchset.entry;
      prefetch[key] = searchset;
      queries.push({
        key,
        query,
        status: last,
        count: entries.length,
        pages,
        ...(url ? { detail: `stopped after ${MAX_PAGES} pages` } : {}),
      });
    } catch (e) {
      queries.push({ key, query, status: 'network-error', count: 0, pages: 0, detail: (e as Error).message });
    }
  }
  return { prefetch, queries };
}
