/**
 * `npx tsx bench/pg-appends.ts [--replicas=1,2,4] [--seconds=10] [--concurrency=10]`: audit appends per second and
 * their p99 on PostgreSQL with 1, 2 (and more) replicas writing to one schema, each replica a process with its own
 * store and pool (bench/pg-append-child.ts). The record is a real answer (bench/templates.ts, about the size the
 * service stores for the benchmark's patient), copied with fresh ids. Every append takes the schema's chain lock
 * (a transaction-scoped advisory lock, src/audit/postgres-store.ts) once per group commit of a replica, so this
 * measures what one hash chain allows; it prints the records per commit.
 * Needs PostgreSQL (TIDEMARK_TEST_PG_URL, default postgres://postgres@127.0.0.1:5432/test); the schema is made for
 * the run and dropped after it. A development aid: it checks only that the chain still verifies.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import pg from 'pg';
import { PostgresAuditStore } from '../src/audit/postgres-store.js';
import { encodeRecord } from '../src/audit/record-format.js';
import { startChild, type Child } from './children.js';
import { answerTemplates } from './templates.js';

const arg = (name: string): string | undefined => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];
const replicaCounts = (arg('replicas') ?? '1,2').split(',').map(Number);
const seconds = Number(arg('seconds') ?? 10);
const concurrency = Number(arg('concurrency') ?? 10);
if (replicaCounts.some((n) => !Number.isInteger(n) || n < 1 || n > 8)) throw new Error('--replicas: whole numbers from 1 to 8');
if (!(seconds > 0 && seconds <= 120) || !(Number.isInteger(concurrency) && concurrency >= 1 && concurrency <= 64))
  throw new Error('--seconds ≤ 120, --concurrency 1–64');
const PG_URL = process.env['TIDEMARK_TEST_PG_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
const out = (s: string) => process.stdout.write(`${s}\n`);
const quantile = (xs: number[], q: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))] ?? Number.NaN;
};

const { templates } = await answerTemplates(new Date());
const record = templates[0];
if (!record) throw new Error('no template record');
const stored = encodeRecord(record);
const storedBytes = stored.text.length + (stored.outputs?.byteLength ?? 0) + (stored.inputs?.byteLength ?? 0);
const dir = mkdtempSync(join(tmpdir(), 'tidemark-bench-pg-'));
const admin = new pg.Client({ connectionString: PG_URL });
await admin.connect();
out(
  `PostgreSQL audit appends (bench/pg-appends.ts): ${seconds} s per run, ${concurrency} appends in flight per replica, record stored as ${(storedBytes / 1024).toFixed(1)} kB (format ${stored.format}; ${(JSON.stringify(record).length / 1024).toFixed(0)} kB as an object with its snapshot)`,
);
try {
  for (const n of replicaCounts) {
    const schema = `tm_bench_appends_${process.pid}_${randomUUID().slice(0, 8)}`;
    const replicas: Child[] = [];
    try {
      for (let i = 0; i < n; i += 1) {
        replicas.push(
          await startChild({
            name: `replica ${i + 1}`,
            script: 'pg-append-child.ts',
            logFile: join(dir, `replica-${n}-${i + 1}.log`),
            env: { BENCH_PG_URL: PG_URL, BENCH_PG_SCHEMA: schema },
          }),
        );
      }
      const results = replicas.map((r) => r.next('appended', (seconds + 60) * 1000));
      for (const r of replicas) r.send({ type: 'append', record, seconds, concurrency });
      const got = await Promise.all(results);
      const all = got.flatMap((m) => (m.type === 'appended' ? m.latenciesMs : []));
      const count = got.reduce((a, m) => a + (m.type === 'appended' ? m.count : 0), 0);
      const failed = got.reduce((a, m) => a + (m.type === 'appended' ? m.failed : 0), 0);
      const commits = got.reduce((a, m) => a + (m.type === 'appended' ? m.commits : 0), 0);
      const committed = got.reduce((a, m) => a + (m.type === 'appended' ? m.committed : 0), 0);
      const span = Math.max(...got.map((m) => (m.type === 'appended' ? m.seconds : 0)));
      const check = new PostgresAuditStore(PG_URL, { schema, poolSize: 2 });
      await check.init();
      const v = await check.verifyChain();
      await check.close();
      out(
        `  ${n} replica${n > 1 ? 's' : ' '}: ${(count / span).toFixed(0).padStart(5)} appends/s, p50 ${quantile(all, 0.5).toFixed(1)} ms, p99 ${quantile(all, 0.99).toFixed(1)} ms, ` +
          `${(committed / Math.max(1, commits)).toFixed(1)} records per commit, ${failed} failed; chain ${v.ok ? 'intact' : 'BROKEN'} over ${v.checked} records`,
      );
    } finally {
      await Promise.all(replicas.map((r) => r.stop()));
      await admin.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
    }
  }
} finally {
  await admin.end();
  rmSync(dir, { recursive: true, force: true });
}
