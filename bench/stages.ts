/**
 * `npx tsx bench/stages.ts [iterations]`: where one order-select call with the benchmark's full prefetch spends
 * its time, stage by stage, in this process (no HTTP, no load generator, no audit store): the same request body
 * as `npm run bench` case (1) through evaluateHook, whose stages (src/hooks/evaluate.ts) report their times to
 * `observe`, with the route's JSON.parse and JSON.stringify around it. Prints the median and mean of each stage in
 * microseconds, and their sum beside the whole call. A development aid for finding what to make faster; it
 * asserts nothing beyond a 200 answer with its record text.
 */
import type { FhirResource } from 'fhir/r4.js';
import { transaction } from '../examples/lib/fhir-builders.js';
import { resolveThresholds } from '../src/assess/thresholds.js';
import { prepareRecord } from '../src/audit/sqlite-append.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { loadCatalogue } from '../src/cards/catalogue.js';
import { rulesVersion } from '../src/config/rules-version.js';
import { startEmbeddedFhir } from '../src/devserver/embedded-fhir.js';
import { prefetchFromServer } from '../src/devserver/prefetch-client.js';
import { evaluateHook, type EvaluateDeps, type Stage } from '../src/hooks/evaluate.js';
import { findService, type ServiceDefinition } from '../src/hooks/services.js';
import { NoopAuditStore } from './noop-store.js';
import { benchContext, benchRequest, buildBenchPatient } from './patient.js';

const iterations = Number(process.argv[2] ?? 2000);
if (!Number.isInteger(iterations) || iterations < 10 || iterations > 100_000)
  throw new Error('iterations: a whole number from 10 to 100000');

const service = findService('bolus-review-select');
if (!service) throw new Error('no service bolus-review-select');
const svc: ServiceDefinition = service;
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

/** The no-op store, but preparing each record as the SQLite store does on the caller's thread (its column texts). */
class TextOnlyStore extends NoopAuditStore {
  override async append(rec?: AdviceRecord): Promise<{ seq: number; hash: string }> {
    if (!rec || prepareRecord(rec).serialised.text.length === 0) throw new Error('empty record text');
    return super.append();
  }
}

const STAGES: ReadonlyArray<[Stage, string]> = [
  ['parse', 'parse the call (zod schemas)'],
  ['gather', 'gather (prefetch checks)'],
  ['snapshot', 'snapshot (normalize)'],
  ['advise', 'advise (rules)'],
  ['compose', 'compose (cards)'],
  ['record', 'record (its texts; no store)'],
];
const samples = new Map<string, number[]>([['body', []], ...STAGES.map(([s]) => [s, []] as [string, number[]]), ['answer', []]]);
let recording = false;
const deps: EvaluateDeps = {
  store: new TextOnlyStore(),
  catalogue,
  thresholds,
  rulesVersion: version,
  publicUrl: 'http://127.0.0.1:8080',
  now: () => now,
  log: silent,
  gatherOptions: { budgetMs: 2000, maxPages: 5, concurrency: 8 },
  observe: (stage, ms) => {
    if (recording) samples.get(stage)?.push(ms);
  },
};
const whole: number[] = [];

/** One call as the service makes it: the route's JSON.parse, evaluateHook (its stages told to `observe`), the answer's JSON.stringify. */
async function once(record: boolean): Promise<void> {
  recording = record;
  const t0 = performance.now();
  const parsed: unknown = JSON.parse(body);
  const t1 = performance.now();
  const r = await evaluateHook(svc, parsed, deps, undefined, body); // the body text, as the route passes it
  const t2 = performance.now();
  const answer = JSON.stringify(r.body);
  const t3 = performance.now();
  if (r.status !== 200 || !answer) throw new Error(`status ${r.status}`);
  if (!record) return;
  samples.get('body')?.push(t1 - t0);
  samples.get('answer')?.push(t3 - t2);
  whole.push(t3 - t0);
}

const warm = Math.min(500, iterations);
for (let i = 0; i < warm; i += 1) await once(false);
for (let i = 0; i < iterations; i += 1) await once(true);

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)] ?? 0;
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
const us = (ms: number) => `${(ms * 1000).toFixed(0).padStart(7)} µs`;
const rows: Array<[string, string]> = [['body', 'JSON.parse of the body'], ...STAGES, ['answer', 'JSON.stringify of the answer']];
console.log(
  `Stages of one order-select call, full prefetch (${(body.length / 1024).toFixed(1)} kB body), ${iterations} times after ${warm} warm-up, node ${process.version}`,
);
console.log(`${'stage'.padEnd(40)}   median      mean`);
let sumMedian = 0;
let sumMean = 0;
for (const [key, name] of rows) {
  const xs = samples.get(key) ?? [];
  sumMedian += median(xs);
  sumMean += mean(xs);
  console.log(`${name.padEnd(40)}${us(median(xs))}${us(mean(xs))}`);
}
console.log(`${'sum of the stages'.padEnd(40)}${us(sumMedian)}${us(sumMean)}`);
console.log(`${'whole call (parse + evaluateHook + stringify)'.padEnd(40)}${us(median(whole))}${us(mean(whole))}`);
