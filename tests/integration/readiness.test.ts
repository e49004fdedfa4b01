/**
 * The readiness report against the embedded FHIR server (issue 17): the demo scenarios (examples/scenarios/) and one
 * invented patient coded the way a hospital would, with the example site maps. Then the CLI, spawned as a child.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Bundle } from 'fhir/r4.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config/config.js';
import { startEmbeddedFhir, type EmbeddedFhir } from '../../src/devserver/embedded-fhir.js';
import { FhirFetchError } from '../../src/fhir/fetcher.js';
import { fhirFetcher } from '../../src/fhir/fetcher.js';
import { SERVICES } from '../../src/hooks/services.js';
import type { ReadinessReport } from '../../src/readiness/report.js';
import { runReadiness } from '../../src/readiness/run.js';
import { SCENARIOS, scenarioBundle } from '../../examples/scenarios/index.js';
import { FLOWSHEET, SITE_CONFIG, SITE_PATIENT, siteChart } from '../../examples/site-maps/hospital-chart.js';

const NOW = new Date();
let fhir: EmbeddedFhir;
let report: ReadinessReport;
const dir = mkdtempSync(join(tmpdir(), 'tidemark-readiness-'));

beforeAll(async () => {
  fhir = await startEmbeddedFhir();
  for (const s of SCENARIOS) await fhir.load(scenarioBundle(s.build(NOW)));
  await fhir.load({ resourceType: 'Bundle', type: 'collection', entry: siteChart(NOW).map((resource) => ({ resource })) } as Bundle);
  report = await runReadiness({
    fhirServer: fhir.baseUrl,
    patients: [...SCENARIOS.map((s) => s.patientId), SITE_PATIENT],
    cfg: loadConfig({ TIDEMARK_CONFIG_FILE: SITE_CONFIG }),
    now: NOW,
  });
}, 120_000);
afterAll(async () => {
  await fhir?.close();
  rmSync(dir, { recursive: true, force: true });
});

const patient = (id: string) => report.patients.find((p) => p.patientId === id);

describe('readiness on the demo scenarios and a hospital-coded patient', () => {
  it('every scenario patient has its vital signs read and a line per service', () => {
    for (const s of SCENARIOS) {
      const p = patient(s.patientId);
      expect(p?.markers.find((m) => m.marker === 'heartRate')?.status, s.id).toBe('read');
      expect(p?.services.map((x) => x.serviceId)).toEqual(SERVICES.map((x) => x.id));
      expect(p?.unmapped, s.id).toEqual([]); // the scenarios are coded in LOINC and Tidemark's codes only
    }
  });
  it("the verdicts reached are those the real rules give: each scenario's expected responsiveness (examples/scenarios)", () => {
    let checked = 0;
    for (const s of SCENARIOS) {
      if (s.expect.responsiveness === null) continue;
      const hook = s.build(NOW).hook;
      expect(patient(s.patientId)?.services.find((x) => x.hook === hook)?.responsiveness, s.id).toBe(s.expect.responsiveness);
      checked += 1;
    }
    expect(checked).toBeGreaterThan(5);
    expect(patient(SCENARIOS[0]!.patientId)?.services.find((x) => x.hook === 'patient-view')?.recommendation).toBeNull();
  });
  it('the hospital-coded patient: mapped markers read through the map, the unmapped flowsheet row listed with its count', () => {
    const p = patient(SITE_PATIENT);
    expect(p?.markers.find((m) => m.marker === 'systolicBp')?.read?.throughSiteMap).toBe(1);
    expect(p?.markers.find((m) => m.marker === 'ppv')?.status).toBe('read');
    expect(p?.markers.find((m) => m.marker === 'cvp')?.status).toBe('read');
    expect(p?.unmapped).toContainEqual({ system: FLOWSHEET, code: 'FLO-9120', display: 'Wedge pressure', count: 2 });
  });

  it('a survey search the server refuses is said, not taken for "nothing unmapped"', async () => {
    const refusing: typeof fhirFetcher = (base, token) => {
      const f = fhirFetcher(base, token);
      return (url, signal) =>
        url.includes('/Observation?') && !url.includes('code=')
          ? Promise.reject(new FhirFetchError('http-error', 'FHIR server answered 403', 403))
          : f(url, signal);
    };
    const r = await runReadiness({
      fhirServer: fhir.baseUrl,
      patients: [SITE_PATIENT],
      cfg: loadConfig({ TIDEMARK_CONFIG_FILE: SITE_CONFIG }),
      now: NOW,
      makeFetcher: refusing,
    });
    expect(r.patients[0]?.survey).toEqual({ count: 0, problem: 'FHIR server answered 403' });
    expect(patient(SITE_PATIENT)?.survey?.count).toBeGreaterThan(10);
    // The services' own searches still ran: the mapped markers are read.
    expect(r.patients[0]?.markers.find((m) => m.marker === 'ppv')?.status).toBe('read');
  }, 60_000);
});

describe('npm run readiness (the CLI, as a child process)', () => {
  const cli = (...args: string[]) =>
    spawnSync(process.execPath, ['--import', 'tsx', 'src/cli/readiness.ts', ...args], {
      encoding: 'utf8',
      env: { ...process.env, TIDEMARK_CONFIG_FILE: '' },
    });
  it('--bundle with the site maps, --format json', () => {
    const file = join(dir, 'site.json');
    writeFileSync(
      file,
      JSON.stringify({ resourceType: 'Bundle', type: 'collection', entry: siteChart(new Date()).map((resource) => ({ resource })) }),
    );
    const r = cli('--bundle', file, '--config', SITE_CONFIG, '--format', 'json');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toBe('');
    const out = JSON.parse(r.stdout) as ReadinessReport;
    expect(out.rulesVersion).toMatch(/\.m[0-9a-f]{8}$/);
    expect(out.patients[0]?.patientId).toBe(SITE_PATIENT);
    expect(out.patients[0]?.unmapped.map((u) => u.code)).toContain('FLO-9120');
  }, 60_000);
  it('bad arguments: exit 2, nothing on stdout, one pino line on stderr', () => {
    const r = cli('--patient', 'x');
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(JSON.parse(r.stderr.trim())).toMatchObject({ level: 60, msg: 'readiness: bad arguments' });
  }, 30_000);
});
