/**
 * `npm run audit -- <command>`: the audit trail from the command line, for the informatics group.
 *   verify                         recompute the hash chain; exit 1 if a record was changed or removed
 *   export [--from ISO] [--to ISO] [--patient ID] [--service ID]
 *                                  every matching record, newest first, one JSON object a line (NDJSON)
 *   replay <advice-id>             the record's snapshot under today's rules: what changed
 * Reads the same configuration as the service (TIDEMARK_AUDIT_STORE, TIDEMARK_SQLITE_PATH, TIDEMARK_PG_URL, …).
 */
import { resolveThresholds } from '../assess/thresholds.js';
import { openAuditStore } from '../audit/open-store.js';
import { replay } from '../audit/replay.js';
import type { AdviceQuery, AuditStore } from '../audit/types.js';
import { loadCatalogue } from '../cards/catalogue.js';
import { loadConfig } from '../config/config.js';
import { rulesVersion } from '../config/rules-version.js';

/** Streams every record matching `q` to `write`, page by page; returns the count. */
export async function exportRecords(store: AuditStore, q: Omit<AdviceQuery, 'limit' | 'cursor'>, write: (line: string) => void): Promise<number> {
  let cursor: string | undefined;
  let n = 0;
  do {
    const page = await store.list({ ...q, limit: 200, ...(cursor ? { cursor } : {}) });
    for (const item of page.items) {
      const rec = await store.get(item.id);
      if (rec) (write(`${JSON.stringify({ ...rec, feedback: await store.feedbackFor(rec.id) })}\n`), (n += 1));
    }
    cursor = page.nextCursor;
  } while (cursor);
  return n;
}

function flag(args: string[], name: string): string | undefined {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? args[i + 1] : undefined;
}

async function main(): Promise<number> {
  const [command, ...args] = process.argv.slice(2);
  const cfg = loadConfig();
  const store = openAuditStore(cfg);
  await store.init();
  try {
    if (command === 'verify') {
      const r = await store.verifyChain();
      process.stdout.write(r.ok ? `audit chain intact: ${r.checked} records\n` : `audit chain BROKEN at record seq ${r.firstBadSeq} (${r.checked} checked)\n`);
      return r.ok ? 0 : 1;
    }
    if (command === 'export') {
      const q = {
        ...(flag(args, 'from') ? { from: new Date(flag(args, 'from') as string).toISOString() } : {}),
        ...(flag(args, 'to') ? { to: new Date(flag(args, 'to') as string).toISOString() } : {}),
        ...(flag(args, 'patient') ? { patientId: flag(args, 'patient') as string } : {}),
        ...(flag(args, 'service') ? { service: flag(args, 'service') as string } : {}),
      };
      const n = await exportRecords(store, q, (l) => process.stdout.write(l));
      process.stderr.write(`${n} records exported\n`);
      return 0;
    }
    if (command === 'replay' && args[0]) {
      const rec = await store.get(args[0]);
      if (!rec) return (process.stderr.write(`no advice record ${args[0]}\n`), 1);
      const thresholds = resolveThresholds(cfg.file.thresholds ?? {});
      const diff = replay(rec, thresholds, rulesVersion(loadCatalogue().digest, thresholds, undefined, cfg.siteMap));
      process.stdout.write(`${JSON.stringify(diff ?? { note: 'no snapshot to replay (a 412 answer)' }, null, 2)}\n`);
      return 0;
    }
    process.stderr.write('usage: npm run audit -- verify | export [--from ISO] [--to ISO] [--patient ID] [--service ID] | replay <advice-id>\n');
    return 2;
  } finally {
    await store.close();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().then((code) => process.exit(code), (e: unknown) => (process.stderr.write(`${(e as Error).message}\n`), process.exit(1)));
}
