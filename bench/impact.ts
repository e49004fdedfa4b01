/**
 * `npx tsx bench/impact.ts [--records=N] [--keep]`: the speed and memory of the impact report (src/audit/impact.ts)
 * over a temporary SQLite audit file holding N answered records (20 000 by default; 200 000 is a year of a large
 * ICU). The records are real: the benchmark's invented patient (bench/patient.ts, prefetch read from the embedded
 * FHIR server) answered once per hook by evaluateHook, then copied N times with fresh ids and card uuids and
 * times spread over a year, appended through the store as the service appends. The candidate raises the PPV
 * threshold to 17 %. Every record is re-run in full (assess, compose, render) whether or not its outcome changes,
 * so the cost per record does not depend on the candidate.
 * Records are stored as received (format 2: the snapshot is rebuilt from the inputs for each re-run); with
 * --format=1 as before decision 0006 (the snapshot stored), to compare the two.
 * Prints seeding rate, file size, records per second of the impact run and the peak heap while it ran.
 * A development aid; it asserts only that every record was replayed.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { resolveThresholds } from '../src/assess/thresholds.js';
import { impactOf } from '../src/audit/impact.js';
import { SqliteAuditStore } from '../src/audit/sqlite-store.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { rulesVersion } from '../src/config/rules-version.js';
import { answerTemplates } from './templates.js';

const arg = (name: string): string | undefined => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];
const N = Number(arg('records') ?? 20_000);
if (!Number.isInteger(N) || N < 100 || N > 1_000_000) throw new Error('--records: a whole number from 100 to 1000000');
const keep = process.argv.includes('--keep');
/** --format=1: store the copies as before decision 0006 (snapshot kept, no inputs), to compare replay speeds. */
const legacy = arg('format') === '1';
const out = (s: string) => process.stdout.write(`${s}\n`);

const now = new Date();
const { templates, catalogue, digest } = await answerTemplates(now);

const dir = mkdtempSync(join(tmpdir(), 'tidemark-bench-impact-'));
const path = join(dir, 'audit.sqlite');
const store = new SqliteAuditStore(path);
await store.init();
const year = 365 * 24 * 3600_000;
const t0 = now.getTime() - year;

function copy(i: number): AdviceRecord {
  // Three order-select records to one patient-view record, as an ICU's ordering calls outnumber chart openings.
  const tpl = templates[i % 4 === 3 ? 1 : 0] as AdviceRecord;
  const cards = tpl.cards.map((c) => ({ ...c, uuid: randomUUID() }));
  const kinds = Object.values(tpl.cardKinds);
  const { inputs, ...rest } = tpl;
  return {
    ...(legacy || !inputs ? rest : { ...rest, inputs }),
    id: randomUUID(),
    hookInstance: randomUUID(),
    recordedAt: new Date(t0 + Math.floor((i / N) * year)).toISOString(),
    cards,
    cardKinds: Object.fromEntries(cards.map((c, k) => [c.uuid as string, kinds[k] ?? 'unknown'])),
  };
}

const seedStart = performance.now();
const CHUNK = 500;
for (let i = 0; i < N; i += CHUNK) {
  await Promise.all(Array.from({ length: Math.min(CHUNK, N - i) }, (_, k) => store.append(copy(i + k))));
}
const seedS = (performance.now() - seedStart) / 1000;
const mb = (b: number) => (b / 1024 / 1024).toFixed(0);
out(
  `format ${legacy ? 1 : 2}: seeded ${N} records in ${seedS.toFixed(1)} s (${Math.round(N / seedS)} records/s), ${mb(statSync(path).size)} MB on disk (${path})`,
);

const candidate = resolveThresholds({ responsiveness: { ppvThresholdPercent: 17 } });
globalThis.gc?.();
let peakHeap = process.memoryUsage().heapUsed;
let peakRss = process.memoryUsage().rss;
const baseHeap = peakHeap;
const runStart = performance.now();
const cpuStart = process.cpuUsage();
const report = await impactOf(
  store.records({ outcome: 'answered' }),
  { thresholds: candidate, catalogue, rulesVersion: rulesVersion(digest, candidate) },
  {
    onProgress: (n) => {
      if (n % 1000) return;
      const m = process.memoryUsage();
      peakHeap = Math.max(peakHeap, m.heapUsed);
      peakRss = Math.max(peakRss, m.rss);
    },
  },
);
const runS = (performance.now() - runStart) / 1000;
const cpu = process.cpuUsage(cpuStart);
const cpuS = (cpu.user + cpu.system) / 1e6;
if (report.replayed !== N) throw new Error(`replayed ${report.replayed} of ${N}`);
out(
  `impact: ${report.replayed} records in ${runS.toFixed(1)} s = ${Math.round(N / runS)} records/s (CPU ${cpuS.toFixed(1)} s: ${((cpuS * 1000) / N).toFixed(2)} ms a record); ` +
    `changed ${report.changed.any} (${report.changes
      .slice(0, 3)
      .map((c) => `${c.dimension} ${c.from.slice(0, 30)} → ${c.to.slice(0, 30)}: ${c.count}`)
      .join('; ')}); ` +
    `heap ${mb(baseHeap)} MB before, peak ${mb(peakHeap)} MB; peak RSS ${mb(peakRss)} MB; node ${process.version}`,
);
await store.close();
if (!keep) rmSync(dir, { recursive: true, force: true });
