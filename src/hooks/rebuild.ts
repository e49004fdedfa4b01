/**
 * The snapshot of a stored record rebuilt from its inputs as received (docs/decisions/0006-store-what-was-received.md):
 * the request body is checked again, gathering runs again against the FHIR answers the record kept (played back in
 * the order they were read; a failure is replayed as that failure), and the snapshot is built at the clock reading
 * the call was assessed at, by the normaliser and site maps given, so that replay and the impact report can try
 * a change in normalisation as well as in the rules. No network: nothing is fetched.
 */
import type { AdviceRecord } from '../audit/types.js';
import { FhirFetchError, type Fetcher } from '../fhir/fetcher.js';
import type { SiteMap } from '../fhir/site-map.js';
import type { PatientSnapshot } from '../snapshot/types.js';
import { parseCall, snapshotOf, type ParsedCall } from './evaluate.js';
import { gather } from './gather.js';
import type { FhirExchange, GatherOptions, Gathered } from './gather-types.js';
import { findService, servicesFor } from './services.js';

/** Played back, the budget and the page limit never cut gathering short: what the call read is what it gets. */
const PLAYBACK: GatherOptions = {
  budgetMs: 600_000,
  maxPages: 10_000,
  concurrency: 4,
  maxResponseBytes: Number.MAX_SAFE_INTEGER,
  maxCallBytes: Number.MAX_SAFE_INTEGER,
};

const quiet = { info: () => undefined, warn: () => undefined, error: () => undefined };

/** Why a record's snapshot could not be rebuilt. */
export class RebuildError extends Error {
  override name = 'RebuildError';
}

/**
 * The record's snapshot: the one it holds (a record of format 1, or one just made), else rebuilt from its inputs.
 * Undefined for a record with neither (a 412 answer). Throws RebuildError when the inputs no longer make a call.
 */
export async function snapshotOfRecord(rec: AdviceRecord, siteMap?: SiteMap): Promise<PatientSnapshot | undefined> {
  if (rec.snapshot) return rec.snapshot;
  if (rec.outcome !== 'answered' || !rec.inputs) return undefined;
  return (await rebuildCall(rec, siteMap)).snapshot;
}

/** The call a record's inputs make again: the checked request, what gathering gets from the recorded answers, the snapshot. */
export async function rebuildCall(
  rec: AdviceRecord,
  siteMap?: SiteMap,
): Promise<{ call: ParsedCall; gathered: Gathered; snapshot: PatientSnapshot }> {
  const inputs = rec.inputs;
  if (!inputs) throw new RebuildError('the record holds no inputs (it was stored with its snapshot)');
  const service = findService(rec.service, servicesFor(siteMap));
  if (!service) throw new RebuildError(`no service ${rec.service} to rebuild the call with`);
  let body: unknown;
  try {
    body = JSON.parse(inputs.request.body);
  } catch {
    throw new RebuildError('the stored request body is not JSON');
  }
  let call: ParsedCall;
  try {
    call = parseCall(service, body, { log: quiet });
  } catch (e) {
    throw new RebuildError(`the stored request is no longer a valid call: ${String((e as Error).message).slice(0, 200)}`);
  }
  const gathered = await gather(call.req, service, PLAYBACK, playback(inputs.fhir));
  return { call, gathered, snapshot: snapshotOf(call, gathered, new Date(inputs.now), siteMap) };
}

/** The record with its snapshot in place (rebuilt when it holds inputs instead). */
export async function withSnapshot<T extends AdviceRecord>(rec: T, siteMap?: SiteMap): Promise<T> {
  if (rec.snapshot || rec.outcome !== 'answered') return rec;
  const snapshot = await snapshotOfRecord(rec, siteMap);
  return snapshot ? { ...rec, snapshot } : rec;
}

/** A fetcher factory that answers from the recorded exchanges: each URL's answers in the order they were read. */
function playback(exchanges: readonly FhirExchange[]): () => Fetcher {
  return () => {
    const byUrl = new Map<string, FhirExchange[]>();
    for (const x of exchanges) {
      const list = byUrl.get(x.url);
      if (list) list.push(x);
      else byUrl.set(x.url, [x]);
    }
    return async (url, _signal, onBody) => {
      const x = byUrl.get(url)?.shift();
      if (!x) throw new Error('not read by the call');
      if (x.failure) throw failureOf(x.failure);
      const text = x.body ?? '';
      if (x.status !== undefined) onBody?.(x.status, text);
      return text === '' ? {} : (JSON.parse(text) as unknown);
    };
  };
}

function failureOf(f: NonNullable<FhirExchange['failure']>): Error {
  switch (f.status) {
    case 'too-large':
    case 'redirect':
    case 'http-error':
    case 'not-fhir':
      return new FhirFetchError(f.status, f.detail ?? f.status, f.httpStatus);
    case 'not-applicable':
      return new FhirFetchError('outside-base', f.detail ?? 'outside fhirServer');
    case 'timeout':
      return Object.assign(new Error(f.detail ?? 'timeout'), { name: 'TimeoutError' });
    default:
      return new Error(f.detail ?? 'connection failed');
  }
}
