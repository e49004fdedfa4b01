// The graceful stop (src/cli/shutdown.ts) on a real HTTP server on loopback, with the exit injected: a call in
// flight is finished and told to close its keep-alive connection, the store is closed only after it, and the stop
// exits 0; a call that outlasts the grace, a second signal and a store that fails to close each exit 1 with a line
// naming what was left. (The whole service under SIGTERM: tests/integration/graceful-stop.test.ts.)
import { Agent, createServer, request, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { Writable } from 'node:stream';
import { afterEach, describe, expect, it } from 'vitest';
import { gracefulShutdown } from '../../src/cli/shutdown.js';
import { createLogger } from '../../src/log.js';

interface Rig {
  server: Server;
  port: number;
  /** Resolves once the handler holds a call. */
  held: Promise<void>;
  /** Answers the held call. */
  release(): void;
  logLines: Array<Record<string, unknown>>;
  closes: number;
  exitCode: Promise<number>;
  stop: (signal: string) => Promise<void>;
}

const cleanups: Array<() => void> = [];
afterEach(() => {
  for (const c of cleanups.splice(0)) c();
});

async function rig(opts: { graceMs?: number; storeFails?: boolean } = {}): Promise<Rig> {
  let release = () => {};
  let heldNow = () => {};
  const held = new Promise<void>((r) => (heldNow = r));
  const server = createServer((_req, res) => {
    heldNow();
    release = () => res.end('answered');
  });
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', () => r()));
  const logLines: Array<Record<string, unknown>> = [];
  const sink = new Writable({
    write(chunk, _enc, cb) {
      for (const l of String(chunk).split('\n').filter(Boolean)) logLines.push(JSON.parse(l));
      cb();
    },
  });
  let exited = (_code: number) => {};
  const exitCode = new Promise<number>((r) => (exited = r));
  const r: Rig = {
    server,
    port: (server.address() as AddressInfo).port,
    held,
    release: () => release(),
    logLines,
    closes: 0,
    exitCode,
    stop: () => Promise.resolve(),
  };
  r.stop = gracefulShutdown(
    server,
    {
      log: createLogger('info', sink),
      close: async () => {
        r.closes += 1;
        if (opts.storeFails) throw new Error('the writer thread did not answer');
      },
    },
    { graceMs: opts.graceMs ?? 60_000, exit: exited },
  );
  cleanups.push(() => {
    release();
    server.closeAllConnections();
    server.close();
  });
  return r;
}

function call(port: number, agent: Agent): Promise<{ status: number; connection: string | undefined; body: string }> {
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, path: '/', method: 'POST', agent }, (res) => {
      let body = '';
      res.on('data', (d: Buffer) => (body += d.toString()));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, connection: res.headers.connection, body }));
    });
    req.on('error', reject);
    req.end('{}');
  });
}

const msgs = (r: Rig) => r.logLines.map((l) => String(l['msg']));

describe('graceful stop', () => {
  it('finishes the call in flight on its keep-alive connection, then closes the store and exits 0', async () => {
    const r = await rig();
    const agent = new Agent({ keepAlive: true });
    cleanups.push(() => agent.destroy());
    const answer = call(r.port, agent);
    await r.held;
    const stopped = r.stop('SIGTERM');
    await new Promise((res) => setImmediate(res));
    expect(r.closes).toBe(0); // the store stays open while a call is in flight
    r.release();
    // Told to close, so the keep-alive connection does not hold the stop until it times out.
    expect(await answer).toEqual({ status: 200, connection: 'close', body: 'answered' });
    await stopped;
    expect(await r.exitCode).toBe(0);
    expect(r.closes).toBe(1);
    expect(r.server.listening).toBe(false);
    expect(r.logLines[0]).toMatchObject({ signal: 'SIGTERM', inFlight: 1 });
    expect(msgs(r).at(-1)).toBe('stopped: calls finished, audit store closed');
  });

  it('exits 1 naming the calls still in flight when the grace runs out', async () => {
    const r = await rig({ graceMs: 50 });
    void call(r.port, new Agent()).catch(() => undefined);
    await r.held;
    void r.stop('SIGTERM');
    expect(await r.exitCode).toBe(1);
    expect(r.closes).toBe(0);
    expect(r.logLines.at(-1)).toMatchObject({
      level: 50,
      phase: 'calls',
      inFlight: 1,
      msg: 'shutdown grace of 50 ms ran out: 1 call(s) still in flight',
    });
  });

  it('exits 1 at once on a second signal', async () => {
    const r = await rig();
    void call(r.port, new Agent()).catch(() => undefined);
    await r.held;
    void r.stop('SIGTERM');
    await r.stop('SIGINT');
    expect(await r.exitCode).toBe(1);
    expect(r.logLines.at(-1)).toMatchObject({
      level: 50,
      signal: 'SIGINT',
      msg: 'second signal during shutdown: exiting now, 1 call(s) still in flight',
    });
  });

  it('exits 1 when the audit store fails to close', async () => {
    const r = await rig({ storeFails: true });
    await r.stop('SIGTERM');
    expect(await r.exitCode).toBe(1);
    expect(r.logLines.at(-1)).toMatchObject({ level: 50, phase: 'store', err: 'the writer thread did not answer', msg: 'shutdown failed' });
  });
});
