/**
 * `npx tsx bench/record-size.ts [--answers=N]`: what one audit record costs to store, in the format before decision
 * 0006 (format 1: the record's JSON text, snapshot included) and as received (format 2: index, compressed outputs
 * and inputs; src/audit/record-format.ts), side by side for the benchmark's records (bench/templates.ts: the
 * invented patient answered once per hook, full prefetch): bytes per part, the time to serialise (on the
 * service's thread) and to compress (on the SQLite writer thread), to decode, and to rebuild the snapshot from the
 * inputs, medians of 200; then N answers (1,000 by default, three order-select to one patient-view) appended to a
 * SQLite file of each format, and the file's size after a checkpoint: bytes per answer and MB per 1,000 answers,
 * and the records per group commit when 200 arrive at once. A development aid; it asserts nothing.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Database from 'better-sqlite3';
import { compressRecord, decodeRow, encodeRecord, serialiseRecord } from '../src/audit/record-format.js';
import { SqliteAuditStore } from '../src/audit/sqlite-store.js';
import type { AdviceRecord } from '../src/audit/types.js';
import { snapshotOfRecord } from '../src/hooks/rebuild.js';
import { answerTemplates } from './templates.js';

const arg = (name: string): string | undefined => process.argv.find((a) => a.startsWith(`--${name}=`))?.split('=')[1];
const N = Number(arg('answers') ?? 1000);
const out = (s: string) => process.stdout.write(`${s}\n`);
const kb = (b: number) => `${(b / 1000).toFixed(1)} kB`;

function median(f: () => unknown, n = 200): number {
  const t: number[] = [];
  for (let i = 0; i < n; i += 1) {
    const s = performance.now();
    f();
    t.push(performance.now() - s);
  }
  t.sort((a, b) => a - b);
  return t[Math.floor(n / 2)] ?? 0;
}
async function medianAsync(f: () => Promise<unknown>, n = 200): Promise<number> {
  const t: number[] = [];
  for (let i = 0; i < n; i += 1) {
    const s = performance.now();
    await f();
    t.push(performance.now() - s);
  }
  t.sort((a, b) => a - b);
  return t[Math.floor(n / 2)] ?? 0;
}

const { templates } = await answerTemplates(new Date());
const legacy = (r: AdviceRecord): AdviceRecord => {
  const { inputs: _inputs, ...rest } = r;
  return rest as AdviceRecord;
};
const received = (r: AdviceRecord): AdviceRecord => {
  const { snapshot: _snapshot, ...rest } = r as AdviceRecord & { snapshot?: unknown };
  return rest as AdviceRecord;
};

for (const [i, tpl] of templates.entries()) {
  const name = i === 0 ? 'order-select' : 'patient-view';
  const f1 = encodeRecord(legacy(tpl));
  const f2 = encodeRecord(tpl);
  const parts = (f: typeof f2) => f.text.length + (f.outputs?.byteLength ?? 0) + (f.inputs?.byteLength ?? 0);
  const inputsJson = JSON.stringify(tpl.inputs).length;
  const row2 = { record: f2.text, format: 2, outputs: f2.outputs ?? null, inputs: f2.inputs ?? null };
  const stored = received(decodeRow(row2));
  out(
    `${name}: format 1 ${kb(parts(f1))} (snapshot ${kb(JSON.stringify(tpl.snapshot).length)}, findings ${kb(JSON.stringify(tpl.findings).length)}); ` +
      `format 2 ${kb(parts(f2))} = index ${kb(f2.text.length)} + outputs ${kb(f2.outputs?.byteLength ?? 0)} + inputs ${kb(f2.inputs?.byteLength ?? 0)} ` +
      `(inputs ${kb(inputsJson)} uncompressed, request body ${kb(tpl.inputs?.request.body.length ?? 0)})`,
  );
  const ser = serialiseRecord(tpl);
  out(
    `  on the service's thread: format 1 text ${median(() => serialiseRecord(legacy(tpl))).toFixed(3)} ms, format 2 texts ${median(() => serialiseRecord(tpl)).toFixed(3)} ms; ` +
      `on the writer thread: compress format 2 ${median(() => compressRecord(ser)).toFixed(3)} ms; ` +
      `read back: decode format 2 ${median(() => decodeRow(row2)).toFixed(3)} ms, rebuild the snapshot from the inputs ${(await medianAsync(() => snapshotOfRecord(stored))).toFixed(3)} ms`,
  );
}

const dir = mkdtempSync(join(tmpdir(), 'tidemark-bench-size-'));
try {
  for (const format of [1, 2] as const) {
    const path = join(dir, `audit-${format}.sqlite`);
    const store = new SqliteAuditStore(path);
    await store.init();
    const copies = Array.from({ length: N }, (_, i) => {
      const tpl = templates[i % 4 === 3 ? 1 : 0] as AdviceRecord;
      const cards = tpl.cards.map((c) => ({ ...c, uuid: randomUUID() }));
      const kinds = Object.values(tpl.cardKinds);
      const base = format === 1 ? legacy(tpl) : tpl;
      return {
        ...base,
        id: randomUUID(),
        hookInstance: randomUUID(),
        cards,
        cardKinds: Object.fromEntries(cards.map((c, k) => [c.uuid as string, kinds[k] ?? 'unknown'])),
      } as AdviceRecord;
    });
    for (let i = 0; i < N; i += 200) await Promise.all(copies.slice(i, i + 200).map((r) => store.append(r)));
    const commits = store.commitStats();
    await store.close();
    const db = new Database(path);
    db.pragma('wal_checkpoint(TRUNCATE)');
    db.close();
    const bytes = statSync(path).size;
    out(
      `format ${format}: ${N} answers, ${(bytes / 1e6).toFixed(1)} MB of SQLite: ${kb(bytes / N)} per answer, ${(((bytes / N) * 1000) / 1e6).toFixed(1)} MB per 1,000 answers; ${(commits.records / commits.commits).toFixed(1)} records per group commit (200 at once)`,
    );
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}
