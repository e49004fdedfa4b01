/**
 * `npx tsx bench/stages.ts [iterations]`: where one order-select call with the benchmark's full prefetch spends
 * its time, stage by stage, in this process (no HTTP, no load generator, no audit store): the same request body
 * as `npm run bench` case (1), each stage run in turn on the output of the one before, many times over. Prints
 * the median and mean of each stage in microseconds, and the sum beside the whole call (evaluateHook) timed
 * on its own. A development aid for finding what to make faster; it asserts nothing.
 */
import type { FhirResource } from 'fhir/r4.js';
import { transaction } from '../examples/lib/fhir-builders.js';
import { assess } from '../src/assess/assess.js';
import { resolveThresholds } from '../src/assess/thresholds.js';
import { recordText } from '../src/audit/chain.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { loadCatalogue } from '../src/cards/catalogue.js';
import { composeCards } from '../src/cards/compose.js';
import { renderCard } from '../src/cards/render.js';
import { rulesVersion } from '../src/config/rules-version.js';
import { startEmbeddedFhir } from '../src/devserver/embedded-fhir.js';
import { prefetchFromServer } from '../src/devserver/prefetch-client.js';
import { gather } from '../src/fhir/gather.js';
import { evaluateHook } from '../src/hooks/evaluate.js';
import { HOOK_CONTEXT_SCHEMAS, hookRequestSchema, type Card } from '../src/hooks/schemas.js';
import { findService } from '../src/hooks/services.js';
import { buildSnapshot } from '../src/snapshot/normalize.js';
import { NoopAuditStore } from './noop-store.js';
import { benchContext, benchRequest, buildBenchPatient } from './patient.js';

const iterations = Number(process.argv[2] ?? 2000);
if (!Number.isInteger(iterations) || iterations < 10 || iterations > 100_000) throw new Error('iterations: a whole number from 10 to 100000');

const service = findService('bolus-review-select');
if (!service) throw new Error('no service bolus-review-select');
const now = new Date();
const patient = buildBenchPatient(now);
const fhir = await startEmbeddedFhir();
await fhir.load(transaction(patient.resources as FhirResource[]));
const client = await prefetchFromServer(fhir.baseUrl, service, benchContext(patient, 'order-select'), {});
await fhir.close();
const body = JSON.stringify(benchRequest(patient, 'order-select', { prefetch: client.prefetch }));

const { catalogue, digest } = loadCatalogue();
const thresholds = resolveThresholds({});
const version = rulesVersion(digest, thresholds);
const silent = { info() {}, warn() {}, error() {} };
const deps = {
  store: new NoopAuditStore(), catalogue, thresholds, rulesVersion: version, publicUrl: 'http://127.0.0.1:8080', now: () => now, log: silent,
  gatherOptions: { budgetMs: 2000, maxPages: 5, concurrency: 8 },
};

const stageNames = ['JSON.parse of the body', 'request and context schemas (zod)', 'gather (prefetch checks)', 'snapshot (normalize)', 'rules (assess)', 'cards (compose + render)', 'JSON.stringify of the answer', 'audit record text (recordText)'] as const;
const samples: number[][] = stageNames.map(() => []);
const whole: number[] = [];

async function once(record: boolean): Promise<void> {
  const t: number[] = [performance.now()];
  const mark = () => t.push(performance.now());
  const parsedBody: unknown = JSON.parse(body);
  mark();
  const req = hookRequestSchema.parse(parsedBody);
  const ctx = HOOK_CONTEXT_SCHEMAS['order-select'].parse(req.context) as { patientId: string; encounterId?: string; selections?: string[]; draftOrders?: { entry?: Array<{ resource?: unknown }> } };
  mark();
  const gathered = await gather(req, service as NonNullable<typeof service>, deps.gatherOptions);
  mark();
  const snapshot = buildSnapshot(gathered.resources as FhirResource[], {
    patientId: ctx.patientId, ...(ctx.encounterId ? { encounterId: ctx.encounterId } : {}),
    ...(ctx.selections ? { selections: ctx.selections } : {}), ...(ctx.draftOrders ? { draftOrders: ctx.draftOrders } : {}),
  }, now);
  mark();
  const advice = assess(snapshot, now, thresholds, version);
  mark();
  const purposes = Object.fromEntries(Object.entries(service?.prefetch ?? {}).map(([k, q]) => [k, q.purpose]));
  const models = composeCards({ hook: 'order-select', advice, snapshot, gathering: gathered.outcomes, purposes, catalogue, context: { patientId: ctx.patientId, userId: 'u' } });
  const cards: Card[] = models.map((m) => renderCard(m, catalogue, { hook: 'order-select', publicUrl: deps.publicUrl }));
  mark();
  const answer = JSON.stringify({ cards });
  mark();
  const rec = {
    id: 'x', recordedAt: now.toISOString(), service: 'bolus-review-select', hook: 'order-select', hookInstance: req.hookInstance, rulesVersion: version,
    outcome: 'answered', snapshot, findings: advice.findings, advice, cards, cardKinds: {}, gathering: gathered.outcomes,
    timings: { totalMs: 0, gatherMs: 0, fhirWaitMs: 0, assessMs: 0 },
  } satisfies AdviceRecord;
  const text = recordText(rec);
  mark();
  if (answer.length === 0 || text.length === 0) throw new Error('empty output');
  if (record) for (let i = 0; i < stageNames.length; i += 1) samples[i]?.push((t[i + 1] ?? 0) - (t[i] ?? 0));
}

async function wholeCall(record: boolean): Promise<void> {
  const t = performance.now();
  const r = await evaluateHook(service as NonNullable<typeof service>, JSON.parse(body), deps as never);
  const answer = JSON.stringify(r.body);
  if (record) whole.push(performance.now() - t);
  if (r.status !== 200 || !answer) throw new Error(`status ${r.status}`);
}

const warm = Math.min(500, iterations);
for (let i = 0; i < warm; i += 1) (await once(false), await wholeCall(false));
for (let i = 0; i < iterations; i += 1) (await once(true), await wholeCall(true));

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? 0;
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
const us = (ms: number) => `${(ms * 1000).toFixed(0).padStart(7)} µs`;
console.log(`Stages of one order-select call, full prefetch (${(body.length / 1024).toFixed(1)} kB body), ${iterations} times after ${warm} warm-up, node ${process.version}`);
console.log(`${'stage'.padEnd(40)}   median      mean`);
let sumMedian = 0;
let sumMean = 0;
stageNames.forEach((name, i) => {
  const xs = samples[i] ?? [];
  sumMedian += median(xs);
  sumMean += mean(xs);
  console.log(`${name.padEnd(40)}${us(median(xs))}${us(mean(xs))}`);
});
console.log(`${'sum of the stages'.padEnd(40)}${us(sumMedian)}${us(sumMean)}`);
console.log(`${'whole call (parse + evaluateHook + stringify)'.padEnd(40)}${us(median(whole))}${us(mean(whole))}`);
