/**
 * A graceful stop on SIGTERM / SIGINT: stop accepting connections, let the calls in flight finish (each one is
 * audited before it is answered, so a finished call is a stored record), then close the audit store (the SQLite
 * writer thread commits what it holds, PostgreSQL's pool ends) and exit 0. If that takes longer than the grace
 * period, or a second signal comes, it exits 1 with a log line naming what was left.
 *
 * Keep-alive connections would hold `server.close()` open until they time out, so once stopping every answer
 * carries `Connection: close` and a connection that falls idle is closed at once.
 */
import type { Server, ServerResponse } from 'node:http';
import type { Logger } from 'pino';

/** Under the 10 s a container runtime waits between SIGTERM and SIGKILL (Docker's default; common practice). */
export const SHUTDOWN_GRACE_MS = 8000;

export interface Stoppable {
  log: Pick<Logger, 'info' | 'warn' | 'error'>;
  /** Closes the audit store. */
  close(): Promise<void>;
}

export interface ShutdownOptions {
  graceMs?: number;
  /** process.exit by default; injected by tests. */
  exit?: (code: number) => void;
}

/** Returns the function to call with the signal's name; it resolves once the exit code is decided. */
export function gracefulShutdown(server: Server, svc: Stoppable, opts: ShutdownOptions = {}): (signal: string) => Promise<void> {
  const graceMs = opts.graceMs ?? SHUTDOWN_GRACE_MS;
  const exit = opts.exit ?? ((code: number) => process.exit(code));
  const open = new Set<ServerResponse>();
  let stopping = false;
  let phase: 'calls' | 'store' | 'done' = 'calls';
  let exited = false;
  const finish = (code: number) => {
    if (exited) return;
    exited = true;
    exit(code);
  };
  const left = () =>
    phase === 'calls' ? `${open.size} call(s) still in flight` : 'the audit store had not closed (appends waiting for their commit)';

  // Before express, so the header is set while it can still be.
  server.prependListener('request', (_req, res: ServerResponse) => {
    open.add(res);
    if (stopping) res.setHeader('connection', 'close');
    res.once('close', () => {
      open.delete(res);
      if (stopping) setImmediate(() => server.closeIdleConnections());
    });
  });

  return async (signal: string) => {
    if (stopping) {
      svc.log.error({ signal, phase }, `second signal during shutdown: exiting now, ${left()}`);
      finish(1);
      return;
    }
    stopping = true;
    svc.log.info({ signal, inFlight: open.size, graceMs }, 'shutting down: no new connections, finishing the calls in flight');
    for (const res of open) if (!res.headersSent) res.setHeader('connection', 'close');
    const timer = setTimeout(() => {
      svc.log.error({ signal, phase, inFlight: open.size }, `shutdown grace of ${graceMs} ms ran out: ${left()}`);
      finish(1);
    }, graceMs);
    try {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      phase = 'store';
      await svc.close();
      phase = 'done';
    } catch (e) {
      clearTimeout(timer);
      svc.log.error({ signal, phase, err: String((e as Error)?.message ?? e).slice(0, 200) }, 'shutdown failed');
      finish(1);
      return;
    }
    clearTimeout(timer);
    if (exited) return;
    svc.log.info({ signal }, 'stopped: calls finished, audit store closed');
    finish(0);
  };
}
