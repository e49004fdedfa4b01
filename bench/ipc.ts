/** Messages between bench/run.ts and its child processes (node IPC). */
export type ChildMessage =
  | { type: 'ready'; url: string }
  | { type: 'rss'; rss: number; heapUsed: number; at: number }
  /** process.cpuUsage() of the whole child (every thread), in microseconds, when the parent asked. */
  | { type: 'usage'; userUs: number; systemUs: number }
  | { type: 'error'; message: string };

export type ParentMessage = { type: 'stop' } | { type: 'load'; bundle: unknown } | { type: 'usage' };

export function send(m: ChildMessage): void {
  process.send?.(m);
}

/**
 * Starts reporting RSS to the parent every second (unref'd: it never keeps the child alive), and answers the
 * parent's 'usage' question with the CPU time this process has used so far.
 */
export function reportRss(): void {
  process.on('message', (m: ParentMessage) => {
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
