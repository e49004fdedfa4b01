/**
 * Data gathering (an edge: does I/O). Prefetch first; what is missing is queried from fhirServer with the
 * fhirAuthorization bearer token (src/fhir/fetcher.ts: under the base only, no redirects, byte caps), in
 * parallel, inside one time budget. Every failure becomes a GatherOutcome ("missing data" with its reason),
 * never an exception.
 *
 * Prefetch cases (CDS Hooks 2.0 §Prefetch, cds-hooks/docs#366 and PR #600):
 * - key absent: the client did not or could not fill it → query fhirServer ourselves;
 * - null: the client has no data → no data, no query;
 * - OperationOutcome: the client hit an error → query ourselves;
 * - searchset Bundle: use it, following link[next] (bounded) when it is paged.
 */
import type { FhirResource, Bundle, OperationOutcome } from 'fhir/r4.js';
import type { HookRequest } from './schemas.js';
import { resolvePrefetchTemplate } from './prefetch-tokens.js';
import type { ServiceDefinition } from './services.js';
import { DEFAULT_BYTE_CAPS, FhirFetchError, fhirFetcher, resolveUnderBase, type ByteCaps, type Fetcher } from '../fhir/fetcher.js';
import type { FhirExchange, GatherOptions, GatherOutcome, GatherStatus, Gathered } from './gather-types.js';

/** Settles when `p` does or when the budget runs out, whichever is first, even if the fetcher ignores the signal. */
function withinBudget<T>(p: Promise<T>, signal: AbortSignal): Promise<T> {
  p.catch(() => undefined); // a late failure after the budget has run out is already accounted for
  if (signal.aborted) return Promise.reject(signal.reason as Error);
  return new Promise<T>((resolve, reject) => {
    const onAbort = () => reject(signal.reason as Error);
    signal.addEventListener('abort', onAbort, { once: true });
    p.then(
      (v) => {
        signal.removeEventListener('abort', onAbort);
        resolve(v);
      },
      (e: unknown) => {
        signal.removeEventListener('abort', onAbort);
        reject(e as Error);
      },
    );
  });
}

/**
 * The fetcher inside the call's time budget, each request written down as it settles: the body text as read (or,
 * from a fetcher that does not report it, the parsed body serialised again, marked so) or the failure's class.
 * A request the budget cut short is written down as a timeout; what it reads later is not.
 */
function recording(fetcher: Fetcher, budget: AbortSignal, exchanges: FhirExchange[]): Fetcher {
  return async (url, signal) => {
    let raw: { status: number; text: string } | undefined;
    try {
      const body = await withinBudget(
        fetcher(url, signal, (status, text) => {
          raw = { status, text };
        }),
        budget,
      );
      exchanges.push(raw ? { url, status: raw.status, body: raw.text } : { url, body: JSON.stringify(body), reserialised: true });
      return body;
    } catch (e) {
      const failure = classify(e);
      exchanges.push(raw ? { url, status: raw.status, body: raw.text, failure } : { url, failure });
      throw e;
    }
  };
}

export async function gather(
  request: HookRequest,
  service: ServiceDefinition,
  opts: GatherOptions,
  makeFetcher = fhirFetcher,
): Promise<Gathered> {
  const clock = opts.clock ?? (() => performance.now());
  const t0 = clock();
  const deadline = AbortSignal.timeout(opts.budgetMs);
  const caps: ByteCaps = {
    maxResponseBytes: opts.maxResponseBytes ?? DEFAULT_BYTE_CAPS.maxResponseBytes,
    maxCallBytes: opts.maxCallBytes ?? DEFAULT_BYTE_CAPS.maxCallBytes,
  };
  const exchanges: FhirExchange[] = [];
  const plain = request.fhirServer ? makeFetcher(request.fhirServer, request.fhirAuthorization?.access_token, caps) : undefined;
  const fetcher = plain ? recording(plain, deadline, exchanges) : undefined;
  const limit = semaphore(opts.concurrency);
  const context = request.context;
  const hook = service.hook;

  const jobs = Object.entries(service.prefetch).map(async ([key, q]): Promise<{ outcome: GatherOutcome; resources: FhirResource[] }> => {
    const resolved = resolvePrefetchTemplate(q.template, hook, context);
    if (!resolved.ok)
      return { outcome: { key, source: 'none', status: 'not-applicable', count: 0, detail: resolved.reason }, resources: [] };
    const has = request.prefetch !== undefined && Object.hasOwn(request.prefetch, key);
    const given = has ? request.prefetch?.[key] : undefined;
    if (has && given === null)
      return { outcome: { key, source: 'prefetch', status: 'no-data', count: 0, detail: 'the client sent null: no data' }, resources: [] };
    let clientProblem: string | undefined;
    if (given && given.resourceType !== 'OperationOutcome') {
      const first = readAnswer(given, q.resourceTypes);
      if (first.kind === 'resources') {
        const next = first.next;
        if (!next)
          return {
            outcome: { key, source: 'prefetch', status: first.resources.length ? 'ok' : 'no-data', count: first.resources.length },
            resources: first.resources,
          };
        if (!fetcher) {
          return {
            outcome: {
              key,
              source: 'prefetch',
              status: 'truncated',
              count: first.resources.length,
              detail: 'prefetch Bundle is paged but no fhirServer was given to follow link[next]',
            },
            resources: first.resources,
          };
        }
        return limit(() =>
          follow(key, 'prefetch', fetcher, request.fhirServer as string, first.resources, next, 1, q.resourceTypes, opts, deadline, clock),
        );
      }
      clientProblem = `prefetch value unusable: ${first.detail}`;
    } else if (given) {
      clientProblem = `the client reported an error: ${outcomeText(given as unknown as OperationOutcome)}`;
    }
    if (!fetcher) {
      return {
        outcome: {
          key,
          source: 'none',
          status: 'unavailable',
          count: 0,
          detail: clientProblem ?? 'not prefetched and no fhirServer given',
        },
        resources: [],
      };
    }
    const target = resolveUnderBase(resolved.value, request.fhirServer as string);
    if (!target)
      return {
        outcome: { key, source: 'none', status: 'not-applicable', count: 0, detail: 'the query would leave fhirServer: not sent' },
        resources: [],
      };
    return limit(async () => {
      const started = clock();
      try {
        const body = await fetcher(target.href, deadline);
        const ans = readAnswer(body, q.resourceTypes);
        if (ans.kind === 'problem')
          return {
            outcome: { key, source: 'fhir-server', status: 'not-fhir', count: 0, ms: clock() - started, detail: ans.detail },
            resources: [],
          };
        if (!ans.next) {
          return {
            outcome: {
              key,
              source: 'fhir-server',
              status: ans.resources.length ? 'ok' : 'no-data',
              count: ans.resources.length,
              pages: 1,
              ms: clock() - started,
            },
            resources: ans.resources,
          };
        }
        return await follow(
          key,
          'fhir-server',
          fetcher,
          request.fhirServer as string,
          ans.resources,
          ans.next,
          1,
          q.resourceTypes,
          opts,
          deadline,
          clock,
          started,
        );
      } catch (e) {
        return { outcome: { key, source: 'fhir-server', ms: clock() - started, count: 0, ...classify(e) }, resources: [] };
      }
    });
  });

  const results = await Promise.all(jobs);
  const seen = new Set<string>();
  const resources: FhirResource[] = [];
  for (const r of results) {
    for (const res of r.resources) {
      const id = `${res.resourceType}/${res.id ?? ''}`;
      if (res.id && seen.has(id)) continue;
      seen.add(id);
      resources.push(res);
    }
  }
  const outcomes = results.map((r) => r.outcome);
  const unobtainableRequired = service.required.filter((k) => {
    const o = outcomes.find((x) => x.key === k);
    return !o || o.status === 'unavailable' || o.status === 'not-applicable';
  });
  return {
    resources,
    outcomes,
    unobtainableRequired,
    exchanges,
    ms: clock() - t0,
    fhirWaitMs: Math.max(0, ...outcomes.filter((o) => o.source === 'fhir-server').map((o) => o.ms ?? 0)),
  };
}

async function follow(
  key: string,
  source: 'prefetch' | 'fhir-server',
  fetcher: Fetcher,
  base: string,
  acc: FhirResource[],
  next: string,
  pages: number,
  types: readonly string[],
  opts: GatherOptions,
  deadline: AbortSignal,
  clock: () => number,
  started = clock(),
): Promise<{ outcome: GatherOutcome; resources: FhirResource[] }> {
  let url: string | undefined = next;
  let n = pages;
  const out = [...acc];
  // Stopped early: the pages read so far are kept, and the key says why it stopped.
  const truncated = (detail: string) => ({
    outcome: { key, source, status: 'truncated' as const, count: out.length, pages: n, ms: clock() - started, detail },
    resources: out,
  });
  while (url) {
    if (n >= opts.maxPages) {
      return truncated(`stopped after ${opts.maxPages} pages`);
    }
    // Resolved once; the URL checked is the URL fetched (a raw `http:/host/x` would reach another host).
    const target = resolveUnderBase(url, base);
    if (!target) {
      return truncated('link[next] points outside fhirServer: not followed');
    }
    try {
      const ans = readAnswer(await fetcher(target.href, deadline), types);
      n += 1;
      if (ans.kind === 'problem') return truncated(`page ${n}: ${ans.detail}`);
      out.push(...ans.resources);
      url = ans.next;
    } catch (e) {
      const c = classify(e);
      // A cap or a redirect keeps its own status (the pages before it are kept); other faults make the key 'truncated'.
      const status: GatherStatus = c.status === 'too-large' || c.status === 'redirect' ? c.status : 'truncated';
      return {
        outcome: {
          key,
          source,
          count: out.length,
          pages: n,
          ms: clock() - started,
          ...c,
          status,
          detail: `page ${n + 1}: ${c.status}${c.detail ? `: ${c.detail}` : ''}`,
        },
        resources: out,
      };
    }
  }
  return {
    outcome: { key, source, status: out.length ? 'ok' : 'no-data', count: out.length, pages: n, ms: clock() - started },
    resources: out,
  };
}

type Answer = { kind: 'resources'; resources: FhirResource[]; next?: string } | { kind: 'problem'; detail: string };

/** A read answer (one resource) or a searchset Bundle → resources of the expected types. */
function readAnswer(body: unknown, types: readonly string[]): Answer {
  if (!body || typeof body !== 'object' || Array.isArray(body)) return { kind: 'problem', detail: 'body is not a FHIR resource' };
  const r = body as { resourceType?: unknown };
  if (r.resourceType === 'Bundle') {
    const b = body as Bundle;
    if (b.entry !== undefined && !Array.isArray(b.entry)) return { kind: 'problem', detail: 'Bundle.entry is not an array' };
    const resources = (b.entry ?? [])
      .map((e) => e?.resource)
      .filter((x): x is FhirResource => !!x && typeof x === 'object' && types.includes((x as FhirResource).resourceType));
    const next = Array.isArray(b.link) ? b.link.find((l) => l?.relation === 'next')?.url : undefined;
    return next ? { kind: 'resources', resources, next } : { kind: 'resources', resources };
  }
  if (typeof r.resourceType === 'string' && types.includes(r.resourceType)) return { kind: 'resources', resources: [body as FhirResource] };
  if (r.resourceType === 'OperationOutcome')
    return { kind: 'problem', detail: `OperationOutcome: ${outcomeText(body as OperationOutcome)}` };
  return { kind: 'problem', detail: typeof r.resourceType === 'string' ? `unexpected ${r.resourceType}` : 'body is not a FHIR resource' };
}

function outcomeText(o: OperationOutcome): string {
  const t = (o.issue ?? [])
    .map((i) => i.details?.text ?? i.diagnostics ?? i.code)
    .filter(Boolean)
    .join('; ');
  return (t || 'no details').slice(0, 300);
}

function classify(e: unknown): { status: GatherStatus; httpStatus?: number; detail?: string } {
  if (e instanceof FhirFetchError) {
    const status: GatherStatus = e.status === 'outside-base' ? 'not-applicable' : e.status;
    return e.httpStatus === undefined ? { status, detail: e.detail } : { status, httpStatus: e.httpStatus, detail: e.detail };
  }
  const err = e as { name?: string; message?: string; cause?: { code?: string; name?: string } };
  if (err?.name === 'TimeoutError' || err?.name === 'AbortError' || err?.cause?.name === 'TimeoutError')
    return { status: 'timeout', detail: 'time budget for FHIR queries ran out' };
  const code = err?.cause?.code;
  return { status: 'network-error', detail: code ? `connection failed (${code})` : 'connection failed' };
}

function semaphore(n: number) {
  let active = 0;
  const queue: Array<() => void> = [];
  return async <T>(fn: () => Promise<T>): Promise<T> => {
    if (active >= n) await new Promise<void>((r) => queue.push(r));
    active += 1;
    try {
      return await fn();
    } finally {
      active -= 1;
      queue.shift()?.();
    }
  };
}
