/**
 * `npm run -s audit -- <command>` (or the `tidemark-audit` bin): the audit trail from the command line, for the
 * informatics group. Commands (one of):
 *   verify                         recompute the hash chain; exit 1 if a record was changed or removed
 *   export [--format ndjson|csv] [--from ISO] [--to ISO] [--patient ID] [--service ID]
 *                                  every matching record, newest first: NDJSON (one JSON object a line, default)
 *                                  or CSV (one row per answer, src/audit/export-csv.ts)
 *   replay <advice-id>             the record's snapshot under today's rules: what changed
 *   impact --thresholds FILE [--catalogue FILE] [--from ISO] [--to ISO] [--service ID] [--format table|csv|ndjson]
 *                                  every answered record re-run under candidate rules: what would change
 * Reads the same configuration as the service (TIDEMARK_AUDIT_STORE, TIDEMARK_SQLITE_PATH, TIDEMARK_PG_URL, …).
 * The result goes to stdout; counts, progress and errors to stderr. Exit 2: bad arguments or input files.
 */
import { existsSync, readFileSync } from 'node:fs';
import { resolveThresholds } from '../assess/thresholds.js';
import { csvExportHeader, csvExportRow } from '../audit/export-csv.js';
import { candidateThresholds, formatImpact, impactOf, type ImpactFormat } from '../audit/impact.js';
import { openAuditStore } from '../audit/open-store.js';
import { auditInstant } from '../audit/shared.js';
import { replay } from '../audit/replay.js';
import { withSnapshot } from '../hooks/rebuild.js';
import type { AdviceQuery, AuditStore, FeedbackRow, StoredAdvice } from '../audit/types.js';
import { loadCatalogue } from '../cards/catalogue.js';
import { loadConfig, type AppConfig } from '../config/config.js';
import { rulesVersion } from '../config/rules-version.js';

const USAGE = [
  'usage (one command at a time):',
  '  npm run -s audit -- verify',
  '  npm run -s audit -- export [--format ndjson|csv] [--from ISO] [--to ISO] [--patient ID] [--service ID]',
  '  npm run -s audit -- replay ADVICE-ID',
  '  npm run -s audit -- impact --thresholds FILE [--catalogue FILE] [--from ISO] [--to ISO] [--service ID] [--format table|csv|ndjson]',
].join('\n');

/** Streams every record matching `q` to `write`, page by page, newest first, with its feedback; returns the count. */
export async function exportRecords(
  store: AuditStore,
  q: Omit<AdviceQuery, 'limit' | 'cursor'>,
  write: (rec: StoredAdvice, feedback: FeedbackRow[]) => void,
): Promise<number> {
  let cursor: string | undefined;
  let n = 0;
  do {
    const page = await store.list({ ...q, limit: 200, ...(cursor ? { cursor } : {}) });
    for (const item of page.items) {
      const rec = await store.get(item.id);
      if (rec) {
        write(rec, await store.feedbackFor(rec.id));
        n += 1;
      }
    }
    cursor = page.nextCursor;
  } while (cursor);
  return n;
}

class UsageError extends Error {}

function flag(args: string[], name: string): string | undefined {
  const i = args.indexOf(`--${name}`);
  if (i < 0) return undefined;
  const v = args[i + 1];
  if (v === undefined || v.startsWith('--')) throw new UsageError(`--${name} needs a value`);
  return v;
}

/** --from / --to: a date alone is the whole day (UTC), as in the audit API; both bounds inclusive. */
function instant(args: string[], name: 'from' | 'to'): string | undefined {
  const v = flag(args, name);
  if (v === undefined) return undefined;
  const t = auditInstant(v, name === 'to');
  if (!t) throw new UsageError(`--${name} ${JSON.stringify(v)} is not an ISO 8601 date or time`);
  return t;
}

function oneOf<T extends string>(args: string[], name: string, allowed: readonly T[], dflt: T): T {
  const v = flag(args, name) ?? dflt;
  if (!(allowed as readonly string[]).includes(v)) throw new UsageError(`--${name} must be one of ${allowed.join(', ')}`);
  return v as T;
}

function readJson(path: string, what: string): unknown {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (e) {
    throw new UsageError(`${what} ${path} could not be read: ${(e as Error).message}`);
  }
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new UsageError(`${what} ${path} is not JSON: ${(e as Error).message}`);
  }
}

/** A SQLite audit file that does not exist is an error here: opening it would create an empty trail. */
function missingAuditFile(cfg: AppConfig): string | undefined {
  if (cfg.TIDEMARK_AUDIT_STORE !== 'sqlite' || cfg.TIDEMARK_SQLITE_PATH === ':memory:' || existsSync(cfg.TIDEMARK_SQLITE_PATH))
    return undefined;
  return `no audit file exists at ${cfg.TIDEMARK_SQLITE_PATH} (TIDEMARK_SQLITE_PATH); nothing to read`;
}

/** A progress line on stderr, redrawn at most every 200 ms; only for a terminal. */
function progressBar(err: NodeJS.WriteStream): { tick(n: number): void; done(): void } {
  if (!err.isTTY) return { tick() {}, done() {} };
  let last = 0;
  const t0 = Date.now();
  return {
    tick(n) {
      const now = Date.now();
      if (now - last < 200) return;
      last = now;
      const rate = Math.round(n / Math.max(0.001, (now - t0) / 1000));
      err.write(`\r\u001b[2Kreplayed ${n} records (${rate}/s)`);
    },
    done() {
      if (last) err.write('\r\u001b[2K');
    },
  };
}

type Io = { out: NodeJS.WritableStream; err: NodeJS.WriteStream; env: NodeJS.ProcessEnv };

async function impact(store: AuditStore, cfg: AppConfig, args: string[], io: Io): Promise<number> {
  const path = flag(args, 'thresholds');
  if (!path)
    throw new UsageError('impact needs --thresholds FILE (candidate thresholds, the shape of the configuration file\'s "thresholds")');
  const format = oneOf<ImpactFormat>(args, 'format', ['table', 'csv', 'ndjson'], 'table');
  const cand = candidateThresholds(readJson(path, 'candidate thresholds'));
  if (!cand.ok) throw new UsageError(`candidate thresholds ${path} are invalid: ${cand.message}`);
  const cataloguePath = flag(args, 'catalogue');
  let loaded;
  try {
    loaded = cataloguePath ? loadCatalogue(cataloguePath) : loadCatalogue();
  } catch (e) {
    throw new UsageError((e as Error).message);
  }
  const from = instant(args, 'from');
  const to = instant(args, 'to');
  const service = flag(args, 'service');
  const bar = progressBar(io.err);
  const report = await impactOf(
    store.records({ outcome: 'answered', ...(from ? { from } : {}), ...(to ? { to } : {}), ...(service ? { service } : {}) }),
    {
      thresholds: cand.thresholds,
      catalogue: loaded.catalogue,
      rulesVersion: rulesVersion(loaded.digest, cand.thresholds, undefined, cfg.siteMap),
      ...(cfg.siteMap ? { siteMap: cfg.siteMap } : {}),
    },
    { onProgress: (n) => bar.tick(n) },
  );
  bar.done();
  io.out.write(formatImpact(report, format));
  io.err.write(`${report.replayed} records replayed, ${report.changed.any} changed\n`);
  return 0;
}

export async function run(argv: string[], io: Io = { out: process.stdout, err: process.stderr, env: process.env }): Promise<number> {
  const [command, ...args] = argv;
  if (!command || !['verify', 'export', 'replay', 'impact'].includes(command) || (command === 'replay' && !args[0])) {
    io.err.write(`${USAGE}\n`);
    return 2;
  }
  const cfg = loadConfig(io.env);
  const missing = missingAuditFile(cfg);
  if (missing) {
    io.err.write(`${missing}\n`);
    return 1;
  }
  const store = openAuditStore(cfg);
  try {
    await store.init();
    if (command === 'verify') {
      const r = await store.verifyChain();
      io.out.write(
        r.ok ? `audit chain intact: ${r.checked} records\n` : `audit chain BROKEN at record seq ${r.firstBadSeq} (${r.checked} checked)\n`,
      );
      return r.ok ? 0 : 1;
    }
    if (command === 'export') {
      const format = oneOf(args, 'format', ['ndjson', 'csv'] as const, 'ndjson');
      const from = instant(args, 'from');
      const to = instant(args, 'to');
      const patientId = flag(args, 'patient');
      const service = flag(args, 'service');
      const q = { ...(from ? { from } : {}), ...(to ? { to } : {}), ...(patientId ? { patientId } : {}), ...(service ? { service } : {}) };
      if (format === 'csv') io.out.write(csvExportHeader());
      const n = await exportRecords(store, q, (rec, feedback) =>
        io.out.write(format === 'csv' ? csvExportRow(rec, feedback) : `${JSON.stringify({ ...rec, feedback })}\n`),
      );
      io.err.write(`${n} records exported\n`);
      return 0;
    }
    if (command === 'replay') {
      const id = args[0] as string;
      const rec = await store.get(id);
      if (!rec) {
        io.err.write(`no advice record ${id}\n`);
        return 1;
      }
      const thresholds = resolveThresholds(cfg.file.thresholds ?? {});
      const diff = replay(
        await withSnapshot(rec, cfg.siteMap),
        thresholds,
        rulesVersion(loadCatalogue().digest, thresholds, undefined, cfg.siteMap),
      );
      io.out.write(`${JSON.stringify(diff ?? { note: 'no snapshot to replay (a 412 answer)' }, null, 2)}\n`);
      return 0;
    }
    return await impact(store, cfg, args, io);
  } catch (e) {
    if (e instanceof UsageError) {
      io.err.write(`${e.message}\n`);
      return 2;
    }
    throw e;
  } finally {
    await store.close();
  }
}

const invoked = process.argv[1] ? `file://${process.argv[1]}` : '';
if (import.meta.url === invoked) {
  run(process.argv.slice(2)).then(
    (code) => process.exit(code),
    (e: unknown) => {
      process.stderr.write(`${(e as Error).message}\n`);
      process.exit(1);
    },
  );
}
