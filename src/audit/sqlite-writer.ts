/**
 * The SQLite audit store's writer thread: owns the connection that appends, so that a commit (its WAL write and
 * the fsync that synchronous=FULL asks for; times in docs/benchmarks.md) does not hold up the event loop
 * that answers CDS calls. A record is acknowledged only after its transaction has committed; records that
 * arrive while a commit is under way are committed together in the next one (group commit).
 *
 * Messages in:  { type: 'append', id, prepared } (the record's columns and stored bytes, made on the main thread) | { type: 'close' }
 * Messages out: { type: 'ready' } | { type: 'done', results: [{ id, ok, seq, hash } | { id, ok: false, error }] }
 *               | { type: 'fatal', error } | { type: 'closed' }
 * Started through sqlite-writer.mjs (which makes TypeScript loadable in a worker).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { createBatchAppender, MAX_BATCH, openAuditDb, type PreparedRecord } from './sqlite-append.js';

export interface WriterError {
  message: string;
  name?: string;
  code?: string;
}

export type WriterIn = { type: 'append'; id: number; prepared: PreparedRecord } | { type: 'close' };

export type WriterOut =
  | { type: 'ready' }
  | { type: 'done'; results: Array<{ id: number; ok: true; seq: number; hash: string } | { id: number; ok: false; error: WriterError }> }
  | { type: 'fatal'; error: WriterError }
  | { type: 'closed' };

function errorOf(e: unknown): WriterError {
  const err = e as { message?: unknown; name?: unknown; code?: unknown };
  return {
    message: typeof err?.message === 'string' ? err.message : String(e),
    ...(typeof err?.name === 'string' ? { name: err.name } : {}),
    ...(typeof err?.code === 'string' ? { code: err.code } : {}),
  };
}

const port = parentPort;
if (!port) throw new Error('sqlite-writer runs as a worker thread');
const post = (m: WriterOut) => port.postMessage(m);

let db: ReturnType<typeof openAuditDb>;
let appendBatch: ReturnType<typeof createBatchAppender>;
try {
  db = openAuditDb((workerData as { path: string }).path);
  // Checkpoints (WAL → database file; their time: docs/benchmarks.md) are run by this thread
  // after it has acknowledged a batch, not inside the commit of whichever record crosses the threshold; the
  // automatic one stays as a backstop far above it (about 40 MB of WAL, in pages of this file's size). Durability is
  // the WAL's fsync at commit.
  const pageSize = Number(db.pragma('page_size', { simple: true })) || 4096;
  db.pragma(`wal_autocheckpoint = ${Math.max(1000, Math.round((40 * 1024 * 1024) / pageSize))}`);
  appendBatch = createBatchAppender(db);
} catch (e) {
  post({ type: 'fatal', error: errorOf(e) });
  process.exit(1);
}

const pending: Array<{ id: number; prepared: PreparedRecord }> = [];
let scheduled = false;
/** Record bytes committed since the last checkpoint, and the amount (about 4 MB of WAL) that calls for one. */
let sinceCheckpoint = 0;
const CHECKPOINT_BYTES = 4 * 1024 * 1024;

function checkpointIfDue(): void {
  if (sinceCheckpoint < CHECKPOINT_BYTES) return;
  sinceCheckpoint = 0;
  try {
    db.pragma('wal_checkpoint(PASSIVE)');
  } catch {
    // a checkpoint that cannot run now runs later (or the automatic one does); records are already durable
  }
}

function flush(): void {
  scheduled = false;
  while (pending.length) {
    const batch = pending.splice(0, MAX_BATCH);
    let results: ReturnType<typeof appendBatch>;
    try {
      results = appendBatch(batch.map((p) => p.prepared));
    } catch (e) {
      // BEGIN or COMMIT failed: nothing of this batch was stored.
      const error = errorOf(e);
      post({ type: 'done', results: batch.map((p) => ({ id: p.id, ok: false as const, error })) });
      continue;
    }
    post({
      type: 'done',
      results: batch.map((p, i) => {
        const r = results[i];
        return r?.ok
          ? { id: p.id, ok: true as const, seq: r.seq, hash: r.hash }
          : { id: p.id, ok: false as const, error: errorOf(r ? r.error : new Error('audit append lost')) };
      }),
    });
    for (const r of results) if (r.ok) sinceCheckpoint += r.bytes; // text in characters: close enough to bytes for pacing checkpoints
  }
  checkpointIfDue();
}

port.on('message', (m: WriterIn) => {
  if (m.type === 'close') {
    flush();
    db.close();
    post({ type: 'closed' });
    port.close();
    return;
  }
  pending.push({ id: m.id, prepared: m.prepared });
  if (!scheduled) {
    scheduled = true;
    setImmediate(flush);
  }
});

post({ type: 'ready' });
