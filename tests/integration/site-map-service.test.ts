/**
 * The service with the example site maps (issue 17): its searches ask a FHIR server for the site's codes, the
 * snapshot reads them through the maps, and the audit record keeps both codings and the rules version names the map.
 * Invented hospital-coded data (examples/site-maps/hospital-chart.ts) on the embedded FHIR server.
 */
import type { Bundle } from 'fhir/r4.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { startEmbeddedFhir, type EmbeddedFhir } from '../../src/devserver/embedded-fhir.js';
import { snapshotOfRecord } from '../../src/hooks/rebuild.js';
import type { Measurement } from '../../src/snapshot/types.js';
import { post, startService, type Running } from '../helpers/server.js';
import { IEEE, SITE_CONFIG, SITE_PATIENT, siteChart } from '../../examples/site-maps/hospital-chart.js';

let fhir: EmbeddedFhir;
let plain: Running;
let mapped: Running;

beforeAll(async () => {
  fhir = await startEmbeddedFhir();
  await fhir.load({ resourceType: 'Bundle', type: 'collection', entry: siteChart(new Date()).map((resource) => ({ resource })) } as Bundle);
  plain = await startService();
  mapped = await startService({ TIDEMARK_CONFIG_FILE: SITE_CONFIG });
}, 60_000);
afterAll(async () => {
  await plain?.stop();
  await mapped?.stop();
  await fhir?.close();
});

const call = (s: Running) =>
  post(`${s.url}/cds-services/fluid-overview`, {
    hook: 'patient-view',
    hookInstance: crypto.randomUUID(),
    fhirServer: fhir.baseUrl,
    context: { userId: 'Practitioner/hg-prac-amsel', patientId: SITE_PATIENT },
  });

describe('a site running with its maps', () => {
  it('discovery asks for the site codes; the rules version carries the map digest', async () => {
    const d = (await fetch(`${mapped.url}/cds-services`).then((r) => r.json())) as {
      services: Array<{ prefetch: Record<string, string> }>;
    };
    expect(d.services[0]?.prefetch['vitals']).toContain(`${IEEE}|150037`);
    expect(mapped.svc.rulesVersion).toMatch(/\.m[0-9a-f]{8}$/);
    expect(plain.svc.rulesVersion).not.toMatch(/\.m/);
  });

  it('reads the monitor and flowsheet codes from the FHIR server and the audit record shows both codings', async () => {
    expect((await call(mapped)).status).toBe(200);
    const item = (await mapped.svc.store.list({ patientId: SITE_PATIENT, limit: 5 })).items[0];
    const rec = await mapped.svc.store.get(item!.id);
    // The record keeps the FHIR answers as received; read through the same maps, they give the snapshot the rules saw.
    expect(rec?.inputs?.fhir.some((x) => x.body?.includes('150037'))).toBe(true);
    const ms: Measurement[] = (await snapshotOfRecord(rec!, mapped.svc.siteMap))!.measurements;
    expect(ms.find((m) => m.ref === 'Observation/st-abp-sys-1')).toMatchObject({
      kind: 'systolicBp',
      original: { system: IEEE, code: '150037', unit: 'MDC_DIM_MMHG' },
      readAs: { code: '8480-6', equivalence: 'wider' },
      unitReadAs: 'mm[Hg]',
    });
    expect(ms.find((m) => m.ref === 'Observation/st-ppv-1')).toMatchObject({ kind: 'ppv', readAs: { code: 'ppv' } });
    expect(rec?.rulesVersion).toBe(mapped.svc.rulesVersion);
    // The FHIR server was asked for the IEEE code.
    expect(fhir.requests().some((r) => decodeURIComponent(r).includes(`${IEEE}|150037`))).toBe(true);
  });

  it('without the maps the same chart gives only the LOINC lab', async () => {
    expect((await call(plain)).status).toBe(200);
    const item = (await plain.svc.store.list({ patientId: SITE_PATIENT, limit: 5 })).items[0];
    const rec = await plain.svc.store.get(item!.id);
    expect((await snapshotOfRecord(rec!))!.measurements.map((m) => m.ref)).toEqual(['Observation/st-lac-1']);
  });
});
