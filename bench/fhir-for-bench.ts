/**
 * The embedded FHIR server (src/devserver/embedded-fhir.ts) as a child process of bench/run.ts, so that its
 * work does not share the load generator's event loop. The parent sends the invented patient as a transaction
 * Bundle; the server requires BENCH_FHIR_TOKEN as bearer token (so the service must pass its token on).
 */
import type { Bundle } from 'fhir/r4.js';
import { startEmbeddedFhir } from '../src/devserver/embedded-fhir.js';
import { onStop, send, type ParentMessage } from './ipc.js';

async function main(): Promise<void> {
  const token = process.env['BENCH_FHIR_TOKEN'];
  const fhir = await startEmbeddedFhir({ ...(token ? { requireToken: token } : {}) });
  onStop(() => fhir.close());
  process.on('message', (m: ParentMessage) => {
    if (m?.type !== 'load') return;
    fhir.load(m.bundle as Bundle).then(
      () => send({ type: 'ready', url: fhir.baseUrl }),
      (e: unknown) => send({ type: 'error', message: (e as Error).message }),
    );
  });
  send({ type: 'ready', url: fhir.baseUrl });
}

main().catch((e: unknown) => {
  send({ type: 'error', message: (e as Error).message });
  process.exit(1);
});
