/** Starting and stopping the benchmark's child processes (tsx via --import, IPC for ready/RSS/stop). */
import { fork, type ChildProcess } from 'node:child_process';
import { openSync, closeSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { ChildMessage, ParentMessage } from './ipc.js';

export interface Child {
  name: string;
  proc: ChildProcess;
  url: string;
  /** RSS samples (bytes) with their time, as reported by the child every second. */
  rss: Array<{ at: number; rss: number; heapUsed: number }>;
  send(m: ParentMessage): void;
  /** Resolves with the next message of this type. */
  next(type: ChildMessage['type'], timeoutMs?: number): Promise<ChildMessage>;
  stop(): Promise<void>;
}

const live = new Set<ChildProcess>();
process.on('exit', () => {
  for (const p of live) if (p.exitCode === null && p.signalCode === null) p.kill('SIGKILL');
});

export interface StartOptions {
  name: string;
  /** Script under bench/, e.g. 'serve-for-bench.ts'. */
  script: string;
  env: Record<string, string>;
  /** Where the child's stdout and stderr go (a file). */
  logFile: string;
  execArgv?: string[];
}

export async function startChild(o: StartOptions): Promise<Child> {
  const fd = openSync(o.logFile, 'a');
  const proc = fork(fileURLToPath(new URL(o.script, import.meta.url)), [], {
    execArgv: ['--import', 'tsx', ...(o.execArgv ?? [])],
    // The child reads only what the bench gives it: no TIDEMARK_* settings leak in from the calling shell.
    env: { ...Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('TIDEMARK_'))), ...o.env },
    stdio: ['ignore', fd, fd, 'ipc'],
  });
  closeSync(fd);
  live.add(proc);
  const rss: Child['rss'] = [];
  const waiters: Array<{ type: string; resolve: (m: ChildMessage) => void; reject: (e: Error) => void }> = [];
  proc.on('message', (m: ChildMessage) => {
    if (m.type === 'rss') rss.push({ at: m.at, rss: m.rss, heapUsed: m.heapUsed });
    for (let i = waiters.length - 1; i >= 0; i -= 1) {
      const w = waiters[i];
      if (!w) continue;
      if (m.type === 'error') {
        waiters.splice(i, 1);
        w.reject(new Error(`${o.name}: ${m.message} (log: ${o.logFile})`));
      } else if (m.type === w.type) {
        waiters.splice(i, 1);
        w.resolve(m);
      }
    }
  });
  proc.on('exit', (code, signal) => {
    live.delete(proc);
    for (const w of waiters.splice(0)) w.reject(new Error(`${o.name} exited (${code ?? signal}); see ${o.logFile}`));
  });
  const next = (type: ChildMessage['type'], timeoutMs = 60_000) =>
    new Promise<ChildMessage>((resolve, reject) => {
      const timer = setTimeout(
        () => reject(new Error(`${o.name}: no '${type}' message within ${timeoutMs} ms (log: ${o.logFile})`)),
        timeoutMs,
      );
      const settle =
        <A>(f: (a: A) => void) =>
        (a: A) => {
          clearTimeout(timer);
          f(a);
        };
      waiters.push({ type, resolve: settle(resolve), reject: settle(reject) });
    });
  const ready = await next('ready');
  const child: Child = {
    name: o.name,
    proc,
    rss,
    next,
    url: ready.type === 'ready' ? ready.url : '',
    send: (m) => void proc.send(m),
    stop: () =>
      new Promise<void>((resolve) => {
        if (proc.exitCode !== null || proc.signalCode !== null) return resolve();
        const kill = setTimeout(() => proc.kill('SIGKILL'), 15_000);
        proc.once('exit', () => {
          clearTimeout(kill);
          resolve();
        });
        proc.send({ type: 'stop' } satisfies ParentMessage);
      }),
  };
  return child;
}
