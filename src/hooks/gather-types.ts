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

export interface Gathered {
  /** All resources, de-duplicated by type/id (the first copy wins). */
  resources: FhirResource[];
  outcomes: GatherOutcome[];
  /** Required keys that neither prefetch nor a FHIR server could supply (→ 412). */
  unobtainableRequired: string[];
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
