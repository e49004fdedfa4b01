/**
 * One replica's audit writer, as a child process of bench/pg-appends.ts: a PostgresAuditStore of its own (its own
 * pool, as a replica process has) on the shared schema. On 'append' it appends fresh copies of the given record
 * for the given seconds, `concurrency` appends in flight, and reports each append's time.
 */
import { randomUUID } from 'node:crypto';
import { PostgresAuditStore } from '../src/audit/postgres-store.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { send, type ParentMessage } from './ipc.js';

const url = process.env['BENCH_PG_URL'];
const schema = process.env['BENCH_PG_SCHEMA'];
if (!url || !schema) throw new Error('BENCH_PG_URL and BENCH_PG_SCHEMA are required');
const store = new PostgresAuditStore(url, { schema, poolSize: 10 });

function copy(tpl: AdviceRecord): AdviceRecord {
  const cards = tpl.cards.map((c) => ({ ...c, uuid: randomUUID() }));
  const kinds = Object.values(tpl.cardKinds);
  return {
    ...tpl,
    id: randomUUID(),
    hookInstance: randomUUID(),
    recordedAt: new Date().toISOString(),
    cards,
    cardKinds: Object.fromEntries(cards.map((c, k) => [c.uuid as string, kinds[k] ?? 'unknown'])),
  };
}

async function run(tpl: AdviceRecord, seconds: number, concurrency: number): Promise<void> {
  const latenciesMs: number[] = [];
  let failed = 0;
  const started = performance.now();
  const until = started + seconds * 1000;
  const worker = async () => {
    while (performance.now() < until) {
      const t = performance.now();
      try {
        await store.append(copy(tpl));
        latenciesMs.push(performance.now() - t);
      } catch {
        failed += 1;
      }
    }
  };
  const before = store.commitStats();
  await Promise.all(Array.from({ length: concurrency }, worker));
  const after = store.commitStats();
  send({
    type: 'appended',
    count: latenciesMs.length,
    failed,
    latenciesMs,
    seconds: (performance.now() - started) / 1000,
    commits: after.commits - before.commits,
    committed: after.records - before.records,
  });
}

process.on('message', (m: ParentMessage) => {
  if (m?.type === 'append') void run(m.record as AdviceRecord, m.seconds, m.concurrency);
  if (m?.type === 'stop') void store.close().then(() => process.exit(0));
});
store.init().then(
  () => send({ type: 'ready', url: '' }),
  (e: unknown) => {
    send({ type: 'error', message: (e as Error).message });
    process.exit(1);
  },
);
