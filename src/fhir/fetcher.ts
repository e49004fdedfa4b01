/**
 * How Tidemark reads from a call's FHIR server (an edge: does I/O), on Node's global fetch (undici) rather than
 * fhir-kit-client (docs/decisions/0004-fhir-reads-on-fetch.md). The rules hold for every request:
 * - only URLs under fhirServer's base (same scheme, host and port, same base path) are fetched, and exactly the
 *   URL that was checked: a reference is resolved against the base once, and that absolute URL is what goes out;
 * - redirects are never followed (a 3xx is a failure with its reason), so the bearer token stays on that origin;
 * - bodies are read as a stream and counted after decompression (fetch undoes gzip/deflate/br), with a cap per
 *   response and one for all responses of the call; at a cap, or when the call's time budget ends, the request
 *   is aborted and nothing more is read.
 */

/** Byte caps for FHIR answers, counted after decompression. */
export interface ByteCaps {
  /** Largest single answer. */
  maxResponseBytes: number;
  /** Largest sum of all answers of one hook call. */
  maxCallBytes: number;
}

/**
 * Defaults (common practice, sized from our own data): a day of minute-by-minute vitals for one ICU patient is
 * about 5 MB of searchset JSON, so 16 MiB per answer leaves room; 48 MiB per call bounds a call's memory.
 */
export const DEFAULT_BYTE_CAPS: ByteCaps = { maxResponseBytes: 16 * 1024 * 1024, maxCallBytes: 48 * 1024 * 1024 };

/**
 * Reads one absolute URL (already checked with `resolveUnderBase`) and returns its parsed JSON body. `onBody`, when
 * given, is told the HTTP status and the body's text exactly as read, before it is parsed (the audit record keeps it).
 */
export type Fetcher = (url: string, signal: AbortSignal, onBody?: (status: number, text: string) => void) => Promise<unknown>;

/** A FHIR request that failed for a reason of its own; gather turns it into a GatherOutcome. */
export class FhirFetchError extends Error {
  override name = 'FhirFetchError';
  constructor(
    readonly status: 'too-large' | 'redirect' | 'http-error' | 'not-fhir' | 'outside-base',
    readonly detail: string,
    readonly httpStatus?: number,
  ) {
    super(detail);
  }
}

/**
 * `ref` (absolute, or relative to fhirServer) as one absolute URL, or undefined when it would leave fhirServer:
 * another scheme, host or port, credentials in the URL, or a path outside the base path. `http:/h/x`, `http:h/x`
 * and `HTTP:/…` resolve relative to an http base (WHATWG URL) but name host `h` when parsed alone (as a client
 * library that fetches the raw string does): a reference whose two readings differ is refused. The URL returned
 * is the one to fetch, never `ref` itself.
 */
export function resolveUnderBase(ref: string, base: string): URL | undefined {
  let b: URL;
  let u: URL;
  try {
    b = new URL(base);
    const dir = new URL(b.href);
    if (!dir.pathname.endsWith('/')) dir.pathname += '/';
    dir.search = '';
    dir.hash = '';
    u = new URL(ref, dir);
  } catch {
    return undefined;
  }
  // `http:h/x` reads as relative here but as host `h` to anything that parses it alone: such a reference is refused.
  if (URL.canParse(ref) && new URL(ref).href !== u.href) return undefined;
  if (u.protocol !== 'https:' && u.protocol !== 'http:') return undefined;
  if (u.origin !== b.origin || u.username !== '' || u.password !== '') return undefined;
  const root = b.pathname.replace(/\/+$/, '');
  if (u.pathname !== root && !u.pathname.startsWith(`${root}/`)) return undefined;
  u.hash = '';
  return u;
}

const MIB = 1024 * 1024;
const mb = (n: number): string => (n >= MIB ? `${Math.round((n / MIB) * 10) / 10} MiB` : `${Math.round(n / 1024)} KiB`);

/** A fetcher bound to one call's FHIR server, token and byte caps. The token is used for this call only. */
export function fhirFetcher(baseUrl: string, accessToken?: string, caps: ByteCaps = DEFAULT_BYTE_CAPS): Fetcher {
  const headers: Record<string, string> = { accept: 'application/fhir+json' };
  if (accessToken) headers['authorization'] = `Bearer ${accessToken}`;
  let callBytes = 0;

  return async (url, signal, onBody) => {
    let target: URL | undefined;
    try {
      target = resolveUnderBase(new URL(url).href, baseUrl);
    } catch {
      target = undefined;
    }
    if (target === undefined) throw new FhirFetchError('outside-base', 'not an absolute URL under fhirServer: not fetched');
    const stop = new AbortController();
    const res = await fetch(target, { method: 'GET', headers, redirect: 'manual', signal: AbortSignal.any([signal, stop.signal]) });
    if (res.status >= 300 && res.status < 400) {
      stop.abort();
      throw new FhirFetchError('redirect', `the FHIR server answered ${res.status} (a redirect): not followed`, res.status);
    }
    if (!res.ok) {
      stop.abort();
      throw new FhirFetchError('http-error', `FHIR server answered ${res.status}`, res.status);
    }
    const reader = res.body?.getReader();
    const chunks: Uint8Array[] = [];
    let bytes = 0;
    if (reader) {
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        bytes += value.byteLength;
        callBytes += value.byteLength;
        let over = callBytes > caps.maxCallBytes ? `the call's answers passed ${mb(caps.maxCallBytes)} in all` : undefined;
        if (bytes > caps.maxResponseBytes) over = `an answer was larger than ${mb(caps.maxResponseBytes)}`;
        if (over !== undefined) {
          stop.abort();
          throw new FhirFetchError('too-large', `${over}: reading stopped`);
        }
        chunks.push(value);
      }
    }
    const text = Buffer.concat(chunks).toString('utf8');
    onBody?.(res.status, text);
    if (text === '') return {};
    try {
      return JSON.parse(text) as unknown;
    } catch {
      throw new FhirFetchError('not-fhir', 'body is not JSON', res.status);
    }
  };
}
