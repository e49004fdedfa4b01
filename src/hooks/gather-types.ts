/** What gathering (src/hooks/gather.ts, the I/O) is asked and answers: plain data, for the rooms that read it. */
import type { FhirResource } from 'fhir/r4.js';

/** `too-large`: an answer, or all answers of the call, passed a byte cap; `redirect`: a 3xx, not followed. */
export type GatherStatus =
  | 'ok'
  | 'no-data'
  | 'not-applicable'
  | 'unavailable'
  | 'http-error'
  | 'timeout'
  | 'network-error'
  | 'not-fhir'
  | 'truncated'
  | 'too-large'
  | 'redirect';

export interface GatherOutcome {
  key: string;
  source: 'prefetch' | 'fhir-server' | 'none';
  status: GatherStatus;
  /** Resources kept from this key. */
  count: number;
  pages?: number;
  ms?: number;
  httpStatus?: number;
  detail?: string;
}

/**
 * One FHIR request Tidemark made for a call, as the audit record keeps it: the URL fetched and either the answer's
 * status and body text as read (`body`; `reserialised` when a fetcher gave only the parsed JSON, as a test double may)
 * or why it failed (`failure`, the same classification as the key's outcome). In the order the answers settled.
 */
export interface FhirExchange {
  url: string;
  status?: number;
  body?: string;
  reserialised?: true;
  failure?: { status: GatherStatus; httpStatus?: number; detail?: string };
}

export interface Gathered {
  /** All resources, de-duplicated by type/id (the first copy wins). */
  resources: FhirResource[];
  outcomes: GatherOutcome[];
  /** Required keys that neither prefetch nor a FHIR server could supply (→ 412). */
  unobtainableRequired: string[];
  /** Every FHIR request made for the call and what came back (none when all came by prefetch). */
  exchanges: FhirExchange[];
  /** Wall time of the gathering step, ms; fhirWaitMs = the longest single query. */
  ms: number;
  fhirWaitMs: number;
}

export interface GatherOptions {
  budgetMs: number;
  maxPages: number;
  concurrency: number;
  /** Byte caps on the answers (TIDEMARK_FHIR_MAX_RESPONSE_BYTES, TIDEMARK_FHIR_MAX_CALL_BYTES). */
  maxResponseBytes?: number;
  maxCallBytes?: number;
  /** For tests: a fixed clock for timings. */
  clock?: () => number;
}
