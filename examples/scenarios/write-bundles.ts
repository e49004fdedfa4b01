/**
 * Writes every scenario into examples/scenarios/out/, for integrators to look at or replay:
 *   NN-<id>.bundle.json   the chart as a FHIR R4 transaction Bundle (PUT, ids kept): load it into a test server;
 *   NN-<id>.request.json  the CDS Hooks 2.0 request, with a full prefetch built by running the service's own
 *                         prefetch templates against an embedded FHIR server (as a CDS client would).
 * Times are relative to when it runs. Usage:
 *   npx tsx examples/scenarios/write-bundles.ts [out-dir]
 *   curl -s -H 'content-type: application/json' -d @examples/scenarios/out/01-clear-responder.request.json \
 *        http://localhost:8080/cds-services/bolus-review-select
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { startEmbeddedFhir } from '../../src/devserver/embedded-fhir.js';
import { prefetchFromServer } from '../../src/devserver/prefetch-client.js';
import { findService } from '../../src/hooks/services.js';
import { SCENARIOS, hookContext, hookRequest, scenarioBundle, serviceIdFor } from './index.js';

async function main(): Promise<void> {
  const here = dirname(fileURLToPath(import.meta.url));
  const outDir = resolve(process.argv[2] ?? join(here, 'out'));
  mkdirSync(outDir, { recursive: true });
  // Generated files: keep them out of version control.
  writeFileSync(join(outDir, '.gitignore'), '*\n');
  const now = new Date();
  const fhir = await startEmbeddedFhir();
  try {
    for (const [i, s] of SCENARIOS.entries()) {
      const built = s.build(now);
      const bundle = scenarioBundle(built);
      await fhir.load(bundle);
      const serviceId = serviceIdFor(built.hook);
      const service = findService(serviceId);
      if (!service) throw new Error(`no service ${serviceId}`);
      const { prefetch, queries } = await prefetchFromServer(fhir.baseUrl, service, hookContext(s, built));
      const failed = queries.filter((q) => q.status !== 200);
      if (failed.length)
        throw new Error(`${s.id}: prefetch queries failed: ${failed.map((q) => `${q.key} ${q.status} ${q.detail ?? ''}`).join('; ')}`);
      const request = hookRequest(s, built, { kind: 'prefetch', prefetch });
      const stem = `${String(i + 1).padStart(2, '0')}-${s.id}`;
      writeFileSync(join(outDir, `${stem}.bundle.json`), `${JSON.stringify(bundle, null, 2)}\n`);
      writeFileSync(join(outDir, `${stem}.request.json`), `${JSON.stringify(request, null, 2)}\n`);
      process.stdout.write(`${stem}: ${built.resources.length} resources, ${built.hook} → POST /cds-services/${serviceId}\n`);
    }
  } finally {
    await fhir.close();
  }
  process.stdout.write(`written to ${relative(process.cwd(), outDir) || '.'} (times relative to ${now.toISOString()})\n`);
}

main().catch((e: unknown) => {
  process.stderr.write(`write-bundles failed: ${(e as Error)?.stack ?? String(e)}\n`);
  process.exit(1);
});
