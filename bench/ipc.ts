/** Messages between bench/run.ts and its child processes (node IPC). */
export type ChildMessage =
  | { type: 'ready'; url: string }
  | { type: 'rss'; rss: number; heapUsed: number; at: number }
  /** process.cpuUsage() of the whole child (every thread), in microseconds, when the parent asked. */
  | { type: 'usage'; userUs: number; systemUs: number }
  /** Memory just after a full garbage collection of the main thread's heap (ran: false when gc is not exposed). */
  | { type: 'collected'; ran: boolean; rss: number; heapUsed: number }
  /** bench/pg-append-child.ts: appends made and the time each took, ms. */
  | { type: 'appended'; count: number; failed: number; latenciesMs: number[]; seconds: number; commits: number; committed: number }
  | { type: 'error'; message: string };

export type ParentMessage =
  | { type: 'stop' }
  | { type: 'load'; bundle: unknown }
  | { type: 'usage' }
  | { type: 'collect' }
  /** bench/pg-append-child.ts: append copies of `record` for `seconds`, `concurrency` at a time. */
  | { type: 'append'; record: unknown; seconds: number; concurrency: number };

export function send(m: ChildMessage): void {
  process.send?.(m);
}

/**
 * Starts reporting RSS to the parent every second (unref'd: it never keeps the child alive), and answers the
 * parent's 'usage' question with the CPU time this process has used so far, and its 'collect' request with RSS after
 * a full garbage collection (when the child runs with --expose-gc).
 */
export function reportRss(): void {
  process.on('message', (m: ParentMessage) => {
    if (m?.type === 'collect') {
      // Two full collections (the second frees what the first's finalisers let go), then a pause for V8 to hand
      // freed pages back, so that RSS shows what is still held rather than where the saw-tooth happens to be.
      const gc = (globalThis as { gc?: () => void }).gc;
      if (gc) {
        gc();
        gc();
      }
      setTimeout(() => {
        const mem = process.memoryUsage();
        send({ type: 'collected', ran: !!gc, rss: mem.rss, heapUsed: mem.heapUsed });
      }, 500);
      return;
    }
    if (m?.type !== 'usage') return;
    const u = process.cpuUsage();
    send({ type: 'usage', userUs: u.user, systemUs: u.system });
  });
  const tick = () => {
    const m = process.memoryUsage();
    send({ type: 'rss', rss: m.rss, heapUsed: m.heapUsed, at: Date.now() });
  };
  tick();
  setInterval(tick, 1000).unref();
}

/** Runs `stop` when the parent asks or disconnects, then exits 0 (so --cpu-prof writes its profile). */
export function onStop(stop: () => Promise<void>): void {
  let stopping = false;
  const go = () => {
    if (stopping) return;
    stopping = true;
    void stop().finally(() => process.exit(0));
  };
  process.on('message', (m: ParentMessage) => {
    if (m?.type === 'stop') go();
  });
  process.on('disconnect', go);
  process.on('SIGTERM', go);
}
