/**
 * The service under test, as a child process of bench/run.ts: the real app from buildService (configuration
 * from the environment, as `npm start` reads it), on 127.0.0.1 and a free port. BENCH_STORE=noop swaps the audit
 * store for one that stores nothing (to price the audit write); otherwise the configured store (SQLite).
 * Reports its URL and, every second, its RSS to the parent over IPC.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { loadConfig } from '../src/config/config.js';
import { buildService } from '../src/service.js';
import { NoopAuditStore } from './noop-store.js';
import { onStop, reportRss, send } from './ipc.js';

async function main(): Promise<void> {
  const cfg = loadConfig(process.env);
  const svc = await buildService(cfg, process.env['BENCH_STORE'] === 'noop' ? { store: new NoopAuditStore() } : {});
  const server: Server = await new Promise((resolve) => {
    const s = svc.app.listen(0, '127.0.0.1', () => resolve(s));
  });
  server.keepAliveTimeout = 30_000;
  onStop(async () => {
    await new Promise<void>((r) => {
      server.close(() => r());
      server.closeAllConnections();
    });
    await svc.close();
  });
  reportRss();
  send({ type: 'ready', url: `http://127.0.0.1:${(server.address() as AddressInfo).port}` });
}

main().catch((e: unknown) => {
  send({ type: 'error', message: (e as Error).message });
  process.exit(1);
});
