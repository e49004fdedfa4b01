/**
 * `npm run bench` (tsx bench/run.ts): how fast an ordering-time advisory is, side by side with the ceiling of
 * this stack (a bare express app that parses the same body and answers a fixed small JSON) and with the durable-audit
 * limit (the same app that first appends the raw body to SQLite, synchronous=FULL, hash-chained, group-committed:
 * bench/durable-limit.ts), on loopback only.
 *
 * Every process under load runs in a child of its own: the service (bench/serve-for-bench.ts, the real app from
 * buildService, local trial mode, a temporary SQLite audit file, log level warn), the ceiling (bench/ceiling.ts)
 * and the embedded FHIR server (bench/fhir-for-bench.ts). The load generator (autocannon) runs here.
 *
 * Cases, each at a fixed number of connections (closed loop) and at a fixed arrival rate:
 *   (1) order-select with a full prefetch (an invented patient, bench/patient.ts);
 *   (2) order-select with no prefetch: the service queries the embedded FHIR server holding the same patient;
 *       FHIR wait vs own time comes from the audit records (timings) written during the run;
 *   (3) patient-view with a full prefetch;
 *   audit: case (1) against the same service with a store that stores nothing (bench/noop-store.ts);
 *   jwt: case (1) with a fresh ES384-signed client JWT on every call (real deployments verify one per call);
 *   soak: case (1) at a steady rate; RSS of the service at the start and the end;
 *   record, pg, replay: the audit record's size before (format 1) and after (format 2, decision 0006), PostgreSQL
 *   appends per second with 1 and 2 replicas, and replay (impact report) speed in records per second.
 *
 * Flags (or environment variables):
 *   --quick                     short runs for development (3 s each, 1 s warm-up, 20 s soak)
 *   --duration=S  BENCH_DURATION     seconds per measured run (default 10)
 *   --warmup=S    BENCH_WARMUP       seconds of warm-up before each measured run (default 3)
 *   --connections=N                  connections of the closed-loop runs (default 10)
 *   --rate=N                         arrivals per second of the fixed-rate runs (default 300)
 *   --rate-connections=N             connections the fixed-rate runs spread over (default 10)
 *   --rate-shape=paced|autocannon-burst  (default paced; see bench/load.ts)
 *   --fhir-rate=N                    arrivals per second of case (2)'s fixed-rate run (default 5: the embedded FHIR
 *                                    server answers about 150–200 searches a second on this machine, 12 per call)
 *   --fhir-concurrency=N             TIDEMARK_FHIR_CONCURRENCY of case (2)'s service (default: the service's, 8)
 *   --soak-seconds=S BENCH_SOAK_SECONDS  (default 300)   --soak-rate=N (default 100)
 *   --only=select,fhir,view,audit,jwt,soak,record,pg,replay  run only these parts (the ceiling and the durable limit run
 *                                    when a case needs them); the last three run bench/record-size.ts (the audit record
 *                                    in both formats, bytes per answer and MB per 1,000), bench/pg-appends.ts (1 and 2
 *                                    replicas) and bench/impact.ts (replay speed, both formats), one after the other
 *   --cpu-prof                       profile the service children (node --cpu-prof) and print the top entries
 *   --keep                           keep the temporary folder (audit files, logs, profiles)
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { availableParallelism, cpus, freemem, loadavg, release, tmpdir, totalmem } from 'node:os';
import { join } from 'node:path';
import { randomUUID } from 'node:crypto';
import Database from 'better-sqlite3';
import { calculateJwkThumbprint, exportJWK, generateKeyPair, SignJWT } from 'jose';
import type { FhirResource } from 'fhir/r4.js';
import { transaction } from '../examples/lib/fhir-builders.js';
import { prefetchFromServer } from '../src/devserver/prefetch-client.js';
import { findService } from '../src/hooks/services.js';
import { startChild, type Child } from './children.js';
import { runLoad, type LoadResult } from './load.js';
import { formatSummary, summarise } from './profile-summary.js';
import { benchContext, benchRequest, buildBenchPatient, type BenchHook, type BenchPatient } from './patient.js';

// ---------------------------------------------------------------- options

const argv = process.argv.slice(2);
const flag = (name: string): string | undefined => {
  const hit = argv.find((a) => a === `--${name}` || a.startsWith(`--${name}=`));
  if (!hit) return undefined;
  return hit.includes('=') ? hit.slice(hit.indexOf('=') + 1) : 'true';
};
const quick = flag('quick') === 'true';
const num = (name: string, env: string | undefined, dflt: number, quickValue?: number): number => {
  const raw = flag(name) ?? (env ? process.env[env] : undefined);
  if (raw === undefined) return quick && quickValue !== undefined ? quickValue : dflt;
  const n = Number(raw);
  if (!Number.isFinite(n) || n <= 0) throw new Error(`--${name}: expected a positive number, got ${raw}`);
  return n;
};
const opts = {
  duration: num('duration', 'BENCH_DURATION', 10, 3),
  warmup: num('warmup', 'BENCH_WARMUP', 3, 1),
  connections: num('connections', undefined, 10),
  rate: num('rate', undefined, 300),
  rateConnections: num('rate-connections', undefined, 10),
  rateShape: (flag('rate-shape') ?? 'paced') as 'paced' | 'autocannon-burst',
  fhirRate: num('fhir-rate', undefined, 5),
  fhirConcurrency: flag('fhir-concurrency') === undefined ? undefined : num('fhir-concurrency', undefined, 8),
  soakSeconds: num('soak-seconds', 'BENCH_SOAK_SECONDS', 300, 20),
  soakRate: num('soak-rate', undefined, 100),
  cpuProf: flag('cpu-prof') === 'true',
  keep: flag('keep') === 'true',
  only: new Set((flag('only') ?? 'select,fhir,view,audit,jwt,soak,record,pg,replay').split(',').map((s) => s.trim())),
};
if (opts.rateShape !== 'paced' && opts.rateShape !== 'autocannon-burst') throw new Error('--rate-shape: paced or autocannon-burst');
for (const part of opts.only)
  if (!['select', 'fhir', 'view', 'audit', 'jwt', 'soak', 'record', 'pg', 'replay'].includes(part))
    throw new Error(`--only: unknown part ${part}`);
// Hard bounds, whatever the flags say: the benchmark must stop by itself.
if (opts.duration > 120 || opts.warmup > 60 || opts.soakSeconds > 3600)
  throw new Error('durations are bounded: --duration ≤ 120, --warmup ≤ 60, --soak-seconds ≤ 3600');

const out = (line = '') => process.stdout.write(`${line}\n`);
const f1 = (n: number) => (Number.isFinite(n) ? n.toFixed(1) : '–');
const f2 = (n: number) => (Number.isFinite(n) ? n.toFixed(2) : '–');
const mb = (bytes: number) => `${(bytes / 1024 / 1024).toFixed(1)} MB`;
const median = (xs: number[]): number => {
  if (!xs.length) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? (s[m] as number) : ((s[m - 1] as number) + (s[m] as number)) / 2;
};

// ---------------------------------------------------------------- processes

const dir = mkdtempSync(join(tmpdir(), 'tidemark-bench-'));
const BENCH_DIR = fileURLToPath(new URL('.', import.meta.url));
const FHIR_TOKEN = 'bench-fhir-token-7f3a9c';
const children: Child[] = [];
let serviceCount = 0;

async function startService(
  label: string,
  store: 'sqlite' | 'noop',
  extraEnv: Record<string, string> = {},
  extraArgv: string[] = [],
): Promise<{ child: Child; dbPath: string; profDir: string }> {
  serviceCount += 1;
  const dbPath = join(dir, `${serviceCount}-${label}.sqlite`);
  const profDir = join(dir, `${serviceCount}-${label}-prof`);
  const child = await startChild({
    name: `service (${label})`,
    script: 'serve-for-bench.ts',
    logFile: join(dir, `${serviceCount}-${label}.log`),
    env: {
      TIDEMARK_TRIAL_MODE: 'true',
      TIDEMARK_SQLITE_PATH: dbPath,
      TIDEMARK_LOG_LEVEL: 'warn',
      PORT: '0',
      HOST: '127.0.0.1',
      ...(store === 'noop' ? { BENCH_STORE: 'noop' } : {}),
      ...extraEnv,
    },
    execArgv: [...(opts.cpuProf ? ['--cpu-prof', `--cpu-prof-dir=${profDir}`] : []), ...extraArgv],
  });
  children.push(child);
  return { child, dbPath, profDir };
}

// ---------------------------------------------------------------- measuring

/** A load run and the CPU time (user + system, every thread of the process under load) it cost per 2xx answer. */
type Measured = LoadResult & { cpuMsPerAnswer: number };
interface Run {
  closed: Measured;
  rate: Measured;
}

async function cpuUsedMs(child: Child): Promise<number> {
  const answer = child.next('usage', 5000);
  child.send({ type: 'usage' });
  const m = await answer;
  return m.type === 'usage' ? (m.userUs + m.systemUs) / 1000 : Number.NaN;
}

/** runLoad, with the CPU the child used meanwhile (read over IPC just before and just after). */
async function loadWithCpu(child: Child, o: Parameters<typeof runLoad>[0]): Promise<Measured> {
  const before = await cpuUsedMs(child);
  const r = await runLoad(o);
  const after = await cpuUsedMs(child);
  return { ...r, cpuMsPerAnswer: r.ok ? (after - before) / r.ok : Number.NaN };
}

async function measure(child: Child, url: string, body: string, rate: number): Promise<Run> {
  await runLoad({ url, body, connections: opts.connections, durationSec: opts.warmup });
  const closed = await loadWithCpu(child, { url, body, connections: opts.connections, durationSec: opts.duration });
  const fixed = await loadWithCpu(child, {
    url,
    body,
    connections: Math.min(opts.rateConnections, rate),
    durationSec: opts.duration,
    rate,
    shape: opts.rateShape,
  });
  return { closed, rate: fixed };
}

/** The durable-audit limit's own count of commits and rows (bench/durable-limit.ts), for its mean batch size. */
async function durableBatches(base: string): Promise<{ batches: number; rows: number }> {
  return (await (await fetch(`${base}/batches`)).json()) as { batches: number; rows: number };
}

async function checkOnce(
  url: string,
  body: string,
  authorization?: () => string,
): Promise<{ status: number; cards: number; text: string }> {
  const r = await fetch(url, {
    method: 'POST',
    headers: { 'content-type': 'application/json', ...(authorization ? { authorization: authorization() } : {}) },
    body,
  });
  const text = await r.text();
  let cards = 0;
  try {
    cards = ((JSON.parse(text) as { cards?: unknown[] }).cards ?? []).length;
  } catch {
    /* not JSON */
  }
  return { status: r.status, cards, text: text.slice(0, 300) };
}

/** Mean audit write time from the service's own metrics (tidemark_audit_write_duration_seconds). */
async function auditWriteStats(base: string): Promise<{ sum: number; count: number; commits: number; committed: number }> {
  const text = await (await fetch(`${base}/metrics`)).text();
  const read = (re: RegExp) => Number(re.exec(text)?.[1] ?? 0);
  return {
    sum: read(/^tidemark_audit_write_duration_seconds_sum\{ok="true"\} (\S+)$/m),
    count: read(/^tidemark_audit_write_duration_seconds_count\{ok="true"\} (\S+)$/m),
    // The store's group commits (AuditStore.commitStats): records per commit is the size of its groups.
    commits: read(/^tidemark_audit_commits (\S+)$/m),
    committed: read(/^tidemark_audit_committed_records (\S+)$/m),
  };
}

interface Timings {
  n: number;
  totalMs: number;
  gatherMs: number;
  fhirWaitMs: number;
  assessMs: number;
}

function maxSeq(dbPath: string): number {
  const db = new Database(dbPath, { readonly: true, fileMustExist: true });
  try {
    return Number((db.prepare('SELECT COALESCE(MAX(seq), 0) AS m FROM advice').get() as { m: number }).m);
  } finally {
    db.close();
  }
}

/** Size in bytes of the newest record as stored: its text (format 1) or its index, outputs and inputs (format 2). */
function lastRecordBytes(dbPath: string): number {
  const db = new Database(dbPath, { readonly: true, fileMustExist: true });
  try {
    return Number(
      (
        db
          .prepare(
            'SELECT length(CAST(record AS BLOB)) + COALESCE(length(outputs), 0) + COALESCE(length(inputs), 0) AS n FROM advice ORDER BY seq DESC LIMIT 1',
          )
          .get() as { n: number } | undefined
      )?.n ?? 0,
    );
  } finally {
    db.close();
  }
}

/** Medians of the timings of the audit records with afterSeq < seq ≤ upToSeq (a sample of at most 2000, spread evenly). */
function recordTimings(dbPath: string, afterSeq: number, upToSeq = Number.MAX_SAFE_INTEGER): Timings {
  const db = new Database(dbPath, { readonly: true, fileMustExist: true });
  try {
    const { n } = db.prepare('SELECT COUNT(*) AS n FROM advice WHERE seq > ? AND seq <= ?').get(afterSeq, upToSeq) as { n: number };
    const step = Math.max(1, Math.floor(n / 2000));
    const rows = db
      .prepare(
        `SELECT json_extract(record, '$.timings.totalMs') AS t, json_extract(record, '$.timings.gatherMs') AS g,
                json_extract(record, '$.timings.fhirWaitMs') AS w, json_extract(record, '$.timings.assessMs') AS a
         FROM advice WHERE seq > ? AND seq <= ? AND (seq - ?) % ? = 0`,
      )
      .all(afterSeq, upToSeq, afterSeq, step) as Array<{ t: number; g: number; w: number; a: number }>;
    return {
      n: rows.length,
      totalMs: median(rows.map((r) => r.t)),
      gatherMs: median(rows.map((r) => r.g)),
      fhirWaitMs: median(rows.map((r) => r.w)),
      assessMs: median(rows.map((r) => r.a)),
    };
  } finally {
    db.close();
  }
}

// ---------------------------------------------------------------- printing

const HEAD = `    ${''.padEnd(22)}${'req/s'.padStart(9)}${'p50 ms'.padStart(9)}${'p90 ms'.padStart(9)}${'p99 ms'.padStart(9)}${'max ms'.padStart(9)}   non-2xx/errors`;
function row(label: string, r: LoadResult): string {
  const late = r.late ? `  (${r.late} sent late)` : '';
  return `    ${label.padEnd(22)}${f1(r.rps).padStart(9)}${f2(r.p50).padStart(9)}${f2(r.p90).padStart(9)}${f2(r.p99).padStart(9)}${f1(r.max).padStart(9)}   ${r.non2xx}/${r.errors + r.timeouts}${late}`;
}
function ratioRow(a: LoadResult, c: LoadResult, label = 'Tidemark/ceiling'): string {
  const x = (p: number, q: number) => `${(p / q).toFixed(2)}×`;
  return `    ${label.padEnd(22)}${x(a.rps, c.rps).padStart(9)}${x(a.p50, c.p50).padStart(9)}${x(a.p90, c.p90).padStart(9)}${x(a.p99, c.p99).padStart(9)}`;
}
const rateLabel = (rate = opts.rate) =>
  `${rate} req/s ${opts.rateShape === 'paced' ? 'paced' : 'autocannon overallRate'} over ${Math.min(opts.rateConnections, rate)} connections`;

function printCase(title: string, t: Run, c: Run | undefined, rate = opts.rate, d?: Run, cLabel = 'ceiling'): void {
  out(title);
  out(HEAD);
  const side = (mode: 'closed' | 'rate') => {
    out(row('Tidemark', t[mode]));
    if (c) out(row(cLabel, c[mode]));
    if (d) out(row('durable-audit limit', d[mode]));
    if (c) out(ratioRow(t[mode], c[mode], `Tidemark/${cLabel}`));
    if (d) out(ratioRow(t[mode], d[mode], 'Tidemark/durable'));
    if (c && d) out(ratioRow(d[mode], c[mode], 'durable/ceiling'));
  };
  out(`  ${opts.connections} connections, closed loop, ${opts.duration} s`);
  side('closed');
  out(`  ${rateLabel(rate)}, ${opts.duration} s`);
  side('rate');
  const cpu = (label: string, a: Measured, b: Measured | undefined) =>
    out(
      `    CPU per answer, ${label}: Tidemark ${f2(a.cpuMsPerAnswer)} ms${b ? `, ceiling ${f2(b.cpuMsPerAnswer)} ms: ${(a.cpuMsPerAnswer / b.cpuMsPerAnswer).toFixed(2)}×` : ''}`,
    );
  out('  (CPU: user + system time of the whole process, every thread, over the run, divided by its 2xx answers)');
  cpu('closed loop', t.closed, c?.closed);
  cpu('fixed rate', t.rate, c?.rate);
  if (t.rate.late > 0.01 * (t.rate.ok + t.rate.late)) {
    out(
      `    (Tidemark did not keep up with ${rate} req/s: ${t.rate.late} requests went out late, and their wait to be sent is not in the latency)`,
    );
  }
}

function printTimings(label: string, t: Timings): void {
  out(
    `    audit timings, ${label} (median of ${t.n} records): total ${f2(t.totalMs)} ms = gather ${f2(t.gatherMs)} + assess and render ${f2(t.assessMs)} + rest ${f2(t.totalMs - t.gatherMs - t.assessMs)}`,
  );
}

function printFhirTimings(label: string, t: Timings): void {
  out(
    `    FHIR, ${label} (median of ${t.n} records): slowest single query (fhirWaitMs) ${f2(t.fhirWaitMs)} ms, all queries (gather) ${f2(t.gatherMs)} ms: ` +
      `gather/slowest ${(t.gatherMs / t.fhirWaitMs).toFixed(2)}×`,
  );
  out(
    `      of total ${f2(t.totalMs)} ms: waiting on FHIR (gather) ${f2(t.gatherMs)} ms, own work ${f2(t.totalMs - t.gatherMs)} ms (snapshot, rules, cards ${f2(t.assessMs)} ms)`,
  );
}

// ---------------------------------------------------------------- main

async function main(): Promise<void> {
  const started = Date.now();
  const now = new Date();
  const patient: BenchPatient = buildBenchPatient(now);
  const cpuModel = cpus()[0]?.model ?? 'unknown CPU';
  out('Tidemark benchmark (bench/run.ts)');
  out(
    `  machine: ${availableParallelism()} cores available (nproc), ${cpuModel}, ${mb(totalmem())} memory (${mb(freemem())} free), Linux ${release()}`,
  );
  out(
    `  node ${process.version}; load average at start ${loadavg()
      .map((l) => l.toFixed(2))
      .join(' ')}`,
  );
  out(
    `  runs: ${opts.warmup} s warm-up + ${opts.duration} s measured; closed loop at ${opts.connections} connections; ${rateLabel()} (case 2: ${opts.fhirRate} req/s); soak ${opts.soakSeconds} s at ${opts.soakRate} req/s`,
  );
  out(
    `  invented patient: ${Object.entries(patient.counts)
      .map(([k, v]) => `${v} ${k}`)
      .join(', ')} (charted over 24 h)`,
  );
  out(`  temporary folder: ${dir}`);
  out();

  // The embedded FHIR server with the patient; the prefetch is what a CDS client would build from it.
  const fhir = await startChild({
    name: 'embedded FHIR',
    script: 'fhir-for-bench.ts',
    logFile: join(dir, 'fhir.log'),
    env: { BENCH_FHIR_TOKEN: FHIR_TOKEN },
  });
  children.push(fhir);
  const loaded = fhir.next('ready');
  fhir.send({ type: 'load', bundle: transaction(patient.resources as FhirResource[]) });
  await loaded;
  const bodies: Record<'select' | 'fhir' | 'view', string> = { select: '', fhir: '', view: '' };
  for (const [key, hook, serviceId] of [
    ['select', 'order-select', 'bolus-review-select'],
    ['view', 'patient-view', 'fluid-overview'],
  ] as const) {
    const service = findService(serviceId);
    if (!service) throw new Error(`no service ${serviceId}`);
    const client = await prefetchFromServer(fhir.url, service, benchContext(patient, hook as BenchHook), { accessToken: FHIR_TOKEN });
    const failed = client.queries.filter((q) => q.status !== 200);
    if (failed.length) throw new Error(`prefetch queries failed: ${JSON.stringify(failed)}`);
    bodies[key] = JSON.stringify(benchRequest(patient, hook, { prefetch: client.prefetch }));
  }
  bodies.fhir = JSON.stringify(benchRequest(patient, 'order-select', { fhirServer: fhir.url, accessToken: FHIR_TOKEN }));
  out(
    `  request bodies: order-select with prefetch ${(bodies.select.length / 1024).toFixed(1)} kB, patient-view with prefetch ${(bodies.view.length / 1024).toFixed(1)} kB, order-select without prefetch ${(bodies.fhir.length / 1024).toFixed(1)} kB`,
  );
  out();

  const ceiling = await startChild({ name: 'ceiling', script: 'ceiling.ts', logFile: join(dir, 'ceiling.log'), env: {} });
  children.push(ceiling);
  const ceilingRuns = new Map<string, Run>();
  const ceilingFor = async (key: 'select' | 'fhir' | 'view', rate = opts.rate): Promise<Run> => {
    const have = ceilingRuns.get(key);
    if (have) return have;
    const run = await measure(ceiling, `${ceiling.url}/cds-services/bolus-review-select`, bodies[key], rate);
    ceilingRuns.set(key, run);
    return run;
  };

  // The durable-audit limit: one SQLite file for the whole run (its rows only grow, as an audit trail does).
  const durable = await startChild({
    name: 'durable-audit limit',
    script: 'durable-limit.ts',
    logFile: join(dir, 'durable.log'),
    env: { BENCH_DURABLE_PATH: join(dir, 'durable-limit.sqlite') },
  });
  children.push(durable);
  const durableRuns = new Map<string, Run>();
  const durableFor = async (key: 'select' | 'view'): Promise<Run> => {
    const have = durableRuns.get(key);
    if (have) return have;
    const b0 = await durableBatches(durable.url);
    const run = await measure(durable, `${durable.url}/cds-services/bolus-review-select`, bodies[key], opts.rate);
    const b1 = await durableBatches(durable.url);
    out(
      `    (durable-audit limit, ${key}: ${b1.rows - b0.rows} rows in ${b1.batches - b0.batches} commits, ${f2((b1.rows - b0.rows) / Math.max(1, b1.batches - b0.batches))} rows per commit, warm-up included)`,
    );
    durableRuns.set(key, run);
    return run;
  };

  const profiles: Array<{ label: string; profDir: string }> = [];
  const serviceCase = async (
    label: string,
    key: 'select' | 'fhir' | 'view',
    path: string,
    store: 'sqlite' | 'noop',
    rateValue = opts.rate,
    env: Record<string, string> = {},
    authorization?: () => string,
  ) => {
    const svc = await startService(label, store, env);
    const url = `${svc.child.url}${path}`;
    const once = await checkOnce(url, bodies[key], authorization);
    if (once.status !== 200) throw new Error(`${label}: expected 200, got ${once.status}: ${once.text}`);
    const auth = authorization ? { authorization } : {};
    await runLoad({ url, body: bodies[key], connections: opts.connections, durationSec: opts.warmup, ...auth });
    const a0 = await auditWriteStats(svc.child.url);
    const seqA = store === 'sqlite' ? maxSeq(svc.dbPath) : 0;
    const closed = await loadWithCpu(svc.child, {
      url,
      body: bodies[key],
      connections: opts.connections,
      durationSec: opts.duration,
      ...auth,
    });
    const a1 = await auditWriteStats(svc.child.url);
    const seqB = store === 'sqlite' ? maxSeq(svc.dbPath) : 0;
    const rate = await loadWithCpu(svc.child, {
      url,
      body: bodies[key],
      connections: Math.min(opts.rateConnections, rateValue),
      durationSec: opts.duration,
      rate: rateValue,
      shape: opts.rateShape,
      ...auth,
    });
    const a2 = await auditWriteStats(svc.child.url);
    const timings =
      store === 'sqlite' ? { closed: recordTimings(svc.dbPath, seqA, seqB), rate: recordTimings(svc.dbPath, seqB) } : undefined;
    const dbBytes = store === 'sqlite' ? statSync(svc.dbPath).size : 0;
    const records = store === 'sqlite' ? maxSeq(svc.dbPath) : 0;
    const recordBytes = store === 'sqlite' ? lastRecordBytes(svc.dbPath) : 0;
    await svc.child.stop();
    if (opts.cpuProf) profiles.push({ label, profDir: svc.profDir });
    type Stats = Awaited<ReturnType<typeof auditWriteStats>>;
    const writeMs = (x: Stats, y: Stats) => (y.count > x.count ? ((y.sum - x.sum) / (y.count - x.count)) * 1000 : Number.NaN);
    const perCommit = (x: Stats, y: Stats) => (y.commits > x.commits ? (y.committed - x.committed) / (y.commits - x.commits) : Number.NaN);
    return {
      run: { closed, rate },
      cards: once.cards,
      timings,
      audit: { closed: writeMs(a0, a1), rate: writeMs(a1, a2) },
      perCommit: { closed: perCommit(a0, a1), rate: perCommit(a1, a2) },
      dbBytes,
      records,
      recordBytes,
    };
  };

  const results: Record<string, Awaited<ReturnType<typeof serviceCase>>> = {};

  if (opts.only.has('select') || opts.only.has('audit')) {
    const r = await serviceCase('select-prefetch', 'select', '/cds-services/bolus-review-select', 'sqlite');
    results['select'] = r;
    const c = await ceilingFor('select');
    const d = await durableFor('select');
    printCase(`(1) order-select, full prefetch (${r.cards} cards per answer; SQLite audit, synchronous=FULL)`, r.run, c, opts.rate, d);
    if (r.timings) {
      printTimings('closed loop', r.timings.closed);
      printTimings('fixed rate', r.timings.rate);
    }
    out(
      `    audit write, from the service's metrics (mean, including the wait for its group commit): ${f2(r.audit.closed)} ms closed loop, ${f2(r.audit.rate)} ms fixed rate; ${r.records} records of ${(r.recordBytes / 1024).toFixed(1)} kB each in ${mb(r.dbBytes)} (WAL not counted)`,
    );
    out(
      `    audit size: ${(r.dbBytes / Math.max(1, r.records) / 1024).toFixed(1)} kB of database per answer, ${f1(((r.dbBytes / Math.max(1, r.records)) * 1000) / 1024 / 1024)} MB per 1,000 answers; request body ${(bodies.select.length / 1024).toFixed(1)} kB`,
    );
    out(
      `    group commit: ${f2(r.perCommit.closed)} records per commit closed loop, ${f2(r.perCommit.rate)} at the fixed rate (each answer still waits for its own commit)`,
    );
    out();
  }

  if (opts.only.has('fhir')) {
    const env = opts.fhirConcurrency !== undefined ? { TIDEMARK_FHIR_CONCURRENCY: String(opts.fhirConcurrency) } : {};
    const r = await serviceCase('select-fhir', 'fhir', '/cds-services/bolus-review-select', 'sqlite', opts.fhirRate, env);
    results['fhir'] = r;
    const c = await ceilingFor('fhir', opts.fhirRate);
    printCase(
      `(2) order-select, no prefetch: the service queries the embedded FHIR server, 12 queries a call, at most ${opts.fhirConcurrency ?? 8} at once (${r.cards} cards per answer)`,
      r.run,
      c,
      opts.fhirRate,
    );
    if (r.timings) {
      printFhirTimings('closed loop', r.timings.closed);
      printFhirTimings('fixed rate', r.timings.rate);
    }
    out(
      '    (the ceiling parses the small body and does no FHIR query: the ratio shows the whole cost of gathering; under the closed loop the',
    );
    out('    embedded FHIR server, one process, is the bottleneck and its queue is in every query time)');
    out();
  }

  if (opts.only.has('view')) {
    const r = await serviceCase('view-prefetch', 'view', '/cds-services/fluid-overview', 'sqlite');
    results['view'] = r;
    const c = await ceilingFor('view');
    const d = await durableFor('view');
    printCase(`(3) patient-view, full prefetch (${r.cards} cards per answer)`, r.run, c, opts.rate, d);
    if (r.timings) {
      printTimings('closed loop', r.timings.closed);
      printTimings('fixed rate', r.timings.rate);
    }
    out();
  }

  if (opts.only.has('audit')) {
    const sqlite = results['select'];
    const noop = await serviceCase('select-noop', 'select', '/cds-services/bolus-review-select', 'noop');
    if (sqlite) {
      out('Cost of the durable audit write, case (1): SQLite (WAL, synchronous=FULL) vs a store that stores nothing');
      out(HEAD);
      for (const mode of ['closed', 'rate'] as const) {
        out(`  ${mode === 'closed' ? `${opts.connections} connections, closed loop` : rateLabel()}`);
        const s = sqlite.run[mode];
        const n = noop.run[mode];
        out(row('SQLite store', s));
        out(row('no-op store', n));
        const perReq = mode === 'closed' ? `per request ${f2(1000 / s.rps - 1000 / n.rps)} ms more service time (1/throughput), ` : '';
        out(`    ${'difference'.padEnd(22)}${perReq}p50 ${f2(s.p50 - n.p50)} ms, p99 ${f2(s.p99 - n.p99)} ms`);
        out(
          `    ${'CPU per answer'.padEnd(22)}SQLite store ${f2(s.cpuMsPerAnswer)} ms, no-op store ${f2(n.cpuMsPerAnswer)} ms: the audit write costs ${f2(s.cpuMsPerAnswer - n.cpuMsPerAnswer)} ms of CPU (all threads)`,
        );
      }
      out();
    }
  }

  if (opts.only.has('jwt')) {
    // A CDS client with an ES384 key (jose), trusted through the config file's `issuers`; every call carries a
    // token signed for it alone (a fresh jti: the service refuses a replay). Tokens are signed before the runs, so
    // the load generator's own signing does not share the cores with the service while it is measured.
    const iss = 'https://ehr.bench.invalid';
    const aud = 'https://tidemark.bench.invalid';
    const pair = await generateKeyPair('ES384', { extractable: true });
    const jwk = { ...(await exportJWK(pair.publicKey)), alg: 'ES384', use: 'sig' };
    const kid = await calculateJwkThumbprint(jwk);
    const configFile = join(dir, 'jwt-config.json');
    writeFileSync(configFile, JSON.stringify({ issuers: [{ iss, jwks: { keys: [{ ...jwk, kid }] } }] }));
    const need = Math.ceil((opts.warmup + opts.duration) * 1500 + opts.duration * opts.rate * 1.2) + 10;
    const signStarted = performance.now();
    const tokens: string[] = [];
    const iat = Math.floor(Date.now() / 1000);
    for (let i = 0; i < need; i += 1) {
      tokens.push(
        await new SignJWT({})
          .setProtectedHeader({ alg: 'ES384', kid, typ: 'JWT' })
          .setIssuer(iss)
          .setAudience(`${aud}/cds-services/bolus-review-select`)
          .setIssuedAt(iat)
          .setExpirationTime(iat + 290)
          .setJti(randomUUID())
          .sign(pair.privateKey),
      );
    }
    const signMs = (performance.now() - signStarted) / need;
    let used = 0;
    const authorization = () => `Bearer ${tokens[used++ % tokens.length]}`;
    const env = { TIDEMARK_TRIAL_MODE: 'false', TIDEMARK_CONFIG_FILE: configFile, TIDEMARK_PUBLIC_URL: aud };
    const r = await serviceCase('select-jwt', 'select', '/cds-services/bolus-review-select', 'sqlite', opts.rate, env, authorization);
    const plain = results['select'];
    printCase(
      `(1j) order-select, full prefetch, a fresh ES384 client JWT verified on every call (${r.cards} cards per answer)`,
      r.run,
      plain?.run,
      opts.rate,
      undefined,
      'no token',
    );
    if (plain)
      out('    ("no token" is case (1) as measured above, in trial mode: the ratio prices the signature check and the jti record)');
    out(
      `    ${used} tokens used of ${tokens.length} signed${used > tokens.length ? ' (some were reused and refused as replays: sign more)' : ''}; signing one took ${f2(signMs)} ms in the load generator`,
    );
    out();
  }

  if (opts.only.has('soak')) {
    // --expose-gc only lets the benchmark ask for a full collection at the two ends of the soak; it changes nothing else.
    const svc = await startService('soak', 'sqlite', {}, ['--expose-gc']);
    const collected = async () => {
      const answer = svc.child.next('collected', 10_000);
      svc.child.send({ type: 'collect' });
      const m = await answer;
      return m.type === 'collected' && m.ran ? m : undefined;
    };
    const url = `${svc.child.url}/cds-services/bolus-review-select`;
    const soakWarm = Math.min(30, Math.max(2, Math.round(opts.soakSeconds / 10)));
    await runLoad({
      url,
      body: bodies.select,
      connections: opts.rateConnections,
      durationSec: soakWarm,
      rate: opts.soakRate,
      shape: opts.rateShape,
    });
    const heldStart = await collected();
    await new Promise((r) => setTimeout(r, 1100));
    const t0 = Date.now();
    const r = await runLoad({
      url,
      body: bodies.select,
      connections: opts.rateConnections,
      durationSec: opts.soakSeconds,
      rate: opts.soakRate,
      shape: opts.rateShape,
    });
    await new Promise((res) => setTimeout(res, 1100));
    const t1 = Date.now();
    // Held memory at the two ends: RSS after a full collection, once after the warm-up and once after the soak
    // (taken outside the sampled span, so the collections do not show in the saw-tooth below).
    const heldEnd = await collected();
    const samples = svc.child.rss.filter((s) => s.at >= t0 - 1000 && s.at <= t1);
    const first = samples[0];
    const last = samples[samples.length - 1];
    const records = maxSeq(svc.dbPath);
    await svc.child.stop();
    if (opts.cpuProf) profiles.push({ label: 'soak', profDir: svc.profDir });
    out(`Memory soak: case (1) at ${opts.soakRate} req/s for ${opts.soakSeconds} s (after ${soakWarm} s warm-up at the same rate)`);
    out(HEAD);
    out(row('Tidemark', r));
    if (first && last) {
      // RSS moves in a saw-tooth with the garbage collector (tens of MB, a period of minutes), so a single sample at
      // either end can land on a tooth. Growth is read from the least-squares line through every one-second sample
      // (fitted start → fitted end), and shown beside the lowest RSS of each half (what the collector gets back to).
      const t0 = first.at;
      const xs = samples.map((s) => (s.at - t0) / 1000);
      const ys = samples.map((s) => s.rss);
      const mx = xs.reduce((a, b) => a + b, 0) / xs.length;
      const my = ys.reduce((a, b) => a + b, 0) / ys.length;
      const slope = xs.reduce((acc, x, i) => acc + (x - mx) * ((ys[i] as number) - my), 0) / xs.reduce((acc, x) => acc + (x - mx) ** 2, 0);
      const fitStart = my - slope * mx;
      const fitEnd = fitStart + slope * (xs[xs.length - 1] as number);
      const growth = ((fitEnd - fitStart) / fitStart) * 100;
      const half = Math.floor(samples.length / 2);
      const low1 = Math.min(...ys.slice(0, half));
      const low2 = Math.min(...ys.slice(half));
      const peak = Math.max(...ys);
      out(
        `    RSS at start ${mb(fitStart)}, at end ${mb(fitEnd)}: ${growth >= 0 ? '+' : ''}${growth.toFixed(1)} % (least-squares line through ${samples.length} one-second samples, ${((slope * 60) / 1024 / 1024).toFixed(2)} MB/min)`,
      );
      out(
        `    lowest RSS in the first half ${mb(low1)}, in the second half ${mb(low2)}; peak ${mb(peak)}; single samples first ${mb(first.rss)}, last ${mb(last.rss)}`,
      );
      const marks = [0.2, 0.4, 0.6, 0.8]
        .map((q) => samples[Math.floor(q * (samples.length - 1))])
        .filter((s): s is NonNullable<typeof s> => !!s);
      out(
        `    RSS along the soak: ${[first, ...marks, last].map((s) => `${Math.round((s.at - first.at) / 1000)} s ${mb(s.rss)}`).join(', ')}; V8 heap used ${mb(first.heapUsed)} → ${mb(last.heapUsed)}`,
      );
      if (heldStart && heldEnd) {
        const g = ((heldEnd.rss - heldStart.rss) / heldStart.rss) * 100;
        out(
          `    after a full garbage collection: RSS ${mb(heldStart.rss)} at the start, ${mb(heldEnd.rss)} at the end: ${g >= 0 ? '+' : ''}${g.toFixed(1)} %; V8 heap used ${mb(heldStart.heapUsed)} → ${mb(heldEnd.heapUsed)}`,
        );
      } else out('    (no reading after a full garbage collection: the child could not run one)');
      if (opts.keep)
        writeFileSync(
          join(dir, 'soak-rss.csv'),
          `seconds,rss_bytes,heap_used_bytes\n${samples.map((s) => `${((s.at - t0) / 1000).toFixed(0)},${s.rss},${s.heapUsed}`).join('\n')}\n`,
        );
    }
    out(`    ${records} audit records written in all`);
    out();
  }

  for (const p of profiles) {
    let files: string[] = [];
    try {
      files = readdirSync(p.profDir)
        .filter((f) => f.endsWith('.cpuprofile'))
        .sort((a, b) => statSync(join(p.profDir, b)).size - statSync(join(p.profDir, a)).size);
    } catch {
      /* none written */
    }
    // One profile per thread: the largest is the main thread's; of the others (tsx's loader threads, the audit
    // writer thread) only those that were busy for a second or more are shown.
    files.forEach((f, i) => {
      const file = join(p.profDir, f);
      if (i > 0 && summarise(file, 1).total < 1000) return;
      out(`CPU profile of the service, ${p.label}, ${i === 0 ? 'main thread' : 'another thread (the audit writer)'}`);
      out(formatSummary(file, 20));
      out();
    });
  }

  // The audit record's own measurements, each a script of its own run here one after the other (no load runs
  // beside them), so that one run prints every figure issue 18 asks for.
  const script = (label: string, file: string, args: string[]) => {
    out(label);
    const r = spawnSync(process.execPath, ['--import', 'tsx', join(BENCH_DIR, file), ...args], { encoding: 'utf8', timeout: 600_000 });
    for (const line of (r.stdout ?? '').trimEnd().split('\n')) if (line) out(`  ${line}`);
    if (r.status !== 0) out(`  (${file} failed: ${(r.stderr ?? '').trim().split('\n').slice(-3).join(' ')})`);
    out();
  };
  if (opts.only.has('record'))
    script('The audit record, before (format 1) and after (format 2: stored as received)', 'record-size.ts', ['--answers=1000']);
  if (opts.only.has('pg'))
    script('PostgreSQL appends, 1 and 2 replicas on one chain', 'pg-appends.ts', [`--seconds=${quick ? 3 : 10}`, '--replicas=1,2']);
  if (opts.only.has('replay')) {
    const records = quick ? 1000 : 5000;
    script('Replay speed (the impact report, every record re-run in full): format 2', 'impact.ts', [`--records=${records}`]);
    script('Replay speed: format 1 (the snapshot stored), for comparison', 'impact.ts', [`--records=${records}`, '--format=1']);
  }

  out(
    `done in ${Math.round((Date.now() - started) / 1000)} s; load average at the end ${loadavg()
      .map((l) => l.toFixed(2))
      .join(' ')}${opts.keep ? `; files kept in ${dir}` : ''}`,
  );
}

main()
  .catch((e: unknown) => {
    process.stderr.write(`benchmark failed: ${(e as Error).stack ?? String(e)}\n`);
    process.exitCode = 1;
  })
  .finally(async () => {
    await Promise.all(children.map((c) => c.stop()));
    if (!opts.keep) rmSync(dir, { recursive: true, force: true });
  });
