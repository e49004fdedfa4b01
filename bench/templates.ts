/**
 * Real audit records to copy: the benchmark's invented patient (bench/patient.ts, its prefetch read from the
 * embedded FHIR server) answered once per hook by evaluateHook, with a store that keeps the one record it is given.
 * Used by the impact benchmark (bench/impact.ts) and the PostgreSQL append benchmark (bench/pg-appends.ts).
 */
import type { FhirResource } from 'fhir/r4.js';
import { transaction } from '../examples/lib/fhir-builders.js';
import { resolveThresholds } from '../src/assess/thresholds.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { loadCatalogue } from '../src/cards/catalogue.js';
import { rulesVersion } from '../src/config/rules-version.js';
import { startEmbeddedFhir } from '../src/devserver/embedded-fhir.js';
import { prefetchFromServer } from '../src/devserver/prefetch-client.js';
import { evaluateHook } from '../src/hooks/evaluate.js';
import { findService } from '../src/hooks/services.js';
import { NoopAuditStore } from './noop-store.js';
import { benchContext, benchRequest, buildBenchPatient, type BenchHook } from './patient.js';

/** A store that keeps the one record it is given. */
class CaptureStore extends NoopAuditStore {
  last: AdviceRecord | undefined;
  override append = async (...args: unknown[]): Promise<{ seq: number; hash: string }> => {
    this.last = args[0] as AdviceRecord;
    return { seq: 1, hash: '0'.repeat(64) };
  };
}

/** [order-select record, patient-view record], and the catalogue they were rendered with. */
export async function answerTemplates(
  now: Date,
): Promise<{ templates: AdviceRecord[]; catalogue: ReturnType<typeof loadCatalogue>['catalogue']; digest: string }> {
  const patient = buildBenchPatient(now);
  const fhir = await startEmbeddedFhir();
  try {
    await fhir.load(transaction(patient.resources as FhirResource[]));
    const { catalogue, digest } = loadCatalogue();
    const thresholds = resolveThresholds({});
    const capture = new CaptureStore();
    const deps = {
      store: capture,
      catalogue,
      thresholds,
      rulesVersion: rulesVersion(digest, thresholds),
      publicUrl: 'http://127.0.0.1:8080',
      now: () => now,
      log: { info() {}, warn() {}, error() {} },
      gatherOptions: { budgetMs: 2000, maxPages: 5, concurrency: 8 },
    };
    const templates: AdviceRecord[] = [];
    for (const [hook, id] of [
      ['order-select', 'bolus-review-select'],
      ['patient-view', 'fluid-overview'],
    ] as Array<[BenchHook, string]>) {
      const service = findService(id);
      if (!service) throw new Error(`no service ${id}`);
      const client = await prefetchFromServer(fhir.baseUrl, service, benchContext(patient, hook), {});
      const request = benchRequest(patient, hook, { prefetch: client.prefetch });
      // The body's text as a client would send it, so the record keeps it as received.
      const r = await evaluateHook(service, request, deps as never, undefined, JSON.stringify(request));
      if (r.status !== 200 || !capture.last) throw new Error(`template ${id}: status ${r.status}`);
      templates.push(capture.last);
    }
    return { templates, catalogue, digest };
  } finally {
    await fhir.close();
  }
}
