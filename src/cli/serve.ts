/**
 * `npm start` (built: node dist/cli/serve.js; `npm run trial` runs this file through tsx): runs the service on the
 * configured port (embedded SQLite audit by default) and stops gracefully on SIGTERM / SIGINT (shutdown.ts).
 */
import { loadConfig, ConfigError } from '../config/config.js';
import { createLogger } from '../log.js';
import { buildService } from '../service.js';
import { listen } from './listen.js';
import { gracefulShutdown } from './shutdown.js';

async function main(): Promise<void> {
  let cfg;
  try {
    cfg = loadConfig();
  } catch (e) {
    // Nothing writes to stdout or stderr but the logger, also before the configuration is known (info level).
    createLogger('info').fatal({ err: (e as Error).message.slice(0, 2000) }, 'configuration refused');
    process.exit(2);
  }
  try {
    const svc = await buildService(cfg);
    // A stray rejection must not take the service down mid-shift: log it (ids only) and keep serving.
    process.on('unhandledRejection', (e) =>
      svc.log.error({ err: String((e as Error)?.message ?? e).slice(0, 200) }, 'unhandled rejection'),
    );
    // The handlers come before the listening line: once a supervisor can see the service, a signal is a graceful stop
    // (without a handler the kernel's default ends the process at once). One that arrives while it binds waits.
    let stop: ((signal: string) => Promise<void>) | undefined;
    const early: string[] = [];
    const onSignal = (signal: string) => (stop ? void stop(signal) : void early.push(signal));
    process.on('SIGTERM', () => onSignal('SIGTERM'));
    process.on('SIGINT', () => onSignal('SIGINT'));
    const server = await listen(svc, cfg);
    server.requestTimeout = 30_000;
    stop = gracefulShutdown(server, svc);
    for (const signal of early) void stop(signal);
  } catch (e) {
    createLogger(cfg.TIDEMARK_LOG_LEVEL).fatal(
      { err: (e as Error).message.slice(0, 2000) },
      e instanceof ConfigError ? 'configuration refused' : 'start-up failed',
    );
    process.exit(e instanceof ConfigError ? 2 : 1);
  }
}

void main();
