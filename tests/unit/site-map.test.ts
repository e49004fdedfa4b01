/**
 * Site code mapping (issue 17): ConceptMaps and unit hints from the configuration file, checked at start, read by
 * the snapshot; the readiness report over a snapshot. Invented data coded as a hospital would (examples/site-maps/hospital-chart.ts).
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { FhirResource } from 'fhir/r4.js';
import { afterAll, describe, expect, it } from 'vitest';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import { ConfigError, loadConfig } from '../../src/config/config.js';
import { rulesVersion } from '../../src/config/rules-version.js';
import { parseSiteMap, SiteMapError, type SiteMap } from '../../src/fhir/site-map.js';
import { SERVICES, servicesFor } from '../../src/hooks/services.js';
import { patientReadiness, writeReport } from '../../src/readiness/report.js';
import { validateFhir } from '../../src/fhir/validator.js';
import { buildSnapshot } from '../../src/snapshot/normalize.js';
import { FLOWSHEET, IEEE, SITE_CONFIG, SITE_PATIENT, siteChart } from '../../examples/site-maps/hospital-chart.js';

const NOW = new Date('2026-11-30T10:00:00Z');
const siteMap = (): SiteMap => loadConfig({ TIDEMARK_CONFIG_FILE: SITE_CONFIG }).siteMap as SiteMap;
const exampleMap = () =>
  JSON.parse(readFileSync('examples/site-maps/local-flowsheet.json', 'utf8')) as {
    group: Array<{ source: string; target: string; element: Array<{ code: string; target: Array<Record<string, unknown>> }> }>;
  };
const refused = (maps: unknown[], hints: Record<string, string> = {}): string => {
  try {
    parseSiteMap(maps, hints);
  } catch (e) {
    expect(e).toBeInstanceOf(SiteMapError);
    return (e as Error).message;
  }
  throw new Error('the map was accepted');
};

describe('the site maps are read as configured', () => {
  it('the invented hospital chart is valid FHIR R4 (the FHIR validator)', () => {
    for (const r of siteChart(NOW)) expect(validateFhir(r), r.id).toEqual([]);
  });
  it('the example configuration loads: equal/equivalent/wider are read, narrower and relatedto are not', () => {
    const m = siteMap();
    expect(m.read.get(`${IEEE}|150037`)).toMatchObject({
      kind: 'systolicBp',
      equivalence: 'wider',
      target: { system: 'http://loinc.org', code: '8480-6' },
    });
    expect(m.read.get(`${FLOWSHEET}|FLO-3301`)).toMatchObject({ kind: 'ppv', equivalence: 'equivalent', target: { code: 'ppv' } });
    expect(m.read.has(`${IEEE}|149530`)).toBe(false);
    expect(m.unread.get(`${IEEE}|149530`)?.equivalence).toBe('relatedto');
    expect(m.unread.get(`${FLOWSHEET}|FLO-3399`)).toMatchObject({
      equivalence: 'narrower',
      at: 'conceptMaps[1].group[0].element[5].target[0]',
    });
    expect(m.unitHints.get('MDC_DIM_MMHG')).toBe('mm[Hg]');
  });

  it('the snapshot reads mapped markers and keeps both codings; unit hints are applied; without the map none is read', () => {
    const chart = siteChart(NOW) as FhirResource[];
    const s = buildSnapshot(chart, { patientId: SITE_PATIENT }, NOW, siteMap());
    const sys = s.measurements.find((m) => m.ref === 'Observation/st-abp-sys-1');
    expect(sys).toMatchObject({
      kind: 'systolicBp',
      value: 88,
      unit: 'mm[Hg]',
      unitReadAs: 'mm[Hg]',
      original: { value: 88, unit: 'MDC_DIM_MMHG', system: IEEE, code: '150037' },
      readAs: {
        system: 'http://loinc.org',
        code: '8480-6',
        equivalence: 'wider',
        map: 'https://tidemark.invalid/fhir/ConceptMap/ieee-11073-monitor',
      },
    });
    expect(s.measurements.find((m) => m.ref === 'Observation/st-ppv-1')).toMatchObject({
      kind: 'ppv',
      value: 17,
      original: { code: 'FLO-3301' },
      readAs: { code: 'ppv' },
    });
    expect(s.measurements.find((m) => m.ref === 'Observation/st-abp-mean-1')).not.toHaveProperty('unitReadAs');
    expect(s.measurements.find((m) => m.ref === 'Observation/st-hr-1')).toMatchObject({
      kind: 'heartRate',
      value: 118,
      unitReadAs: '/min',
    });
    expect(s.measurements.find((m) => m.ref === 'Observation/st-spo2-1')).toMatchObject({ kind: 'spo2', value: 94, unitReadAs: '%' });
    // A LOINC code is read as before, with no readAs.
    expect(s.measurements.find((m) => m.ref === 'Observation/st-lac-1')).not.toHaveProperty('readAs');
    // Not read: narrower, relatedto, a code no map covers.
    for (const id of ['st-var-1', 'st-pr-1', 'st-pcwp-1']) expect(s.measurements.some((m) => m.ref === `Observation/${id}`)).toBe(false);
    // A unit text no hint covers: excluded for its unit, under the kind the map read.
    expect(s.excluded).toContainEqual(
      expect.objectContaining({ ref: 'Observation/st-abp-sys-2', reason: 'unknown-unit', kind: 'systolicBp' }),
    );
    const bare = buildSnapshot(chart, { patientId: SITE_PATIENT }, NOW);
    expect(bare.measurements.map((m) => m.ref)).toEqual(['Observation/st-lac-1']);
  });

  it('a hint is needed: without the hint an MDC unit is excluded as not UCUM', () => {
    const maps = loadConfig({ TIDEMARK_CONFIG_FILE: SITE_CONFIG }).siteMap?.configured.conceptMaps ?? [];
    const s = buildSnapshot(siteChart(NOW) as FhirResource[], { patientId: SITE_PATIENT }, NOW, parseSiteMap(maps, {}));
    expect(s.excluded).toContainEqual(
      expect.objectContaining({ ref: 'Observation/st-abp-sys-1', reason: 'unknown-unit', kind: 'systolicBp' }),
    );
  });

  it('the services ask the FHIR server for the site codes too (searches and discovery)', () => {
    const vitals = servicesFor(siteMap())[0]?.prefetch['vitals']?.template ?? '';
    expect(vitals).toContain(`${IEEE}|150037`);
    expect(vitals).toContain(`${FLOWSHEET}|FLO-2001`);
    expect(vitals).not.toContain('149530'); // relatedto: not read, not asked for
    expect(servicesFor(siteMap())[0]?.prefetch['hemodynamics']?.template).toContain(`${FLOWSHEET}|FLO-3301`);
    expect(servicesFor(undefined)).toBe(SERVICES);
  });

  it('the rules version changes with the map and with the hints, and stays as before without any', () => {
    const m = siteMap();
    const base = rulesVersion('abcdef0123456789', {});
    expect(rulesVersion('abcdef0123456789', {}, undefined, undefined)).toBe(base);
    const withMap = rulesVersion('abcdef0123456789', {}, undefined, m);
    expect(withMap).toMatch(/^.+\.m[0-9a-f]{8}$/);
    expect(withMap.startsWith(base)).toBe(true);
    const edited = structuredClone(m.configured.conceptMaps) as Array<ReturnType<typeof exampleMap>>;
    edited[1]!.group[0]!.element[0]!.target[0]!['equivalence'] = 'wider';
    expect(rulesVersion('abcdef0123456789', {}, undefined, parseSiteMap(edited, m.configured.unitHints))).not.toBe(withMap);
    expect(
      rulesVersion(
        'abcdef0123456789',
        {},
        undefined,
        parseSiteMap(m.configured.conceptMaps, { ...m.configured.unitHints, 'Sp/min': '/min' }),
      ),
    ).not.toBe(withMap);
  });
});

describe('a bad map stops start-up naming the element', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tidemark-sitemap-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('a target that is not a code Tidemark reads', () => {
    const m = exampleMap();
    m.group[1]!.element[1]!.target[0]!['code'] = '8310-5'; // body temperature: a LOINC code Tidemark does not read
    writeFileSync(join(dir, 'bad.json'), JSON.stringify(m));
    writeFileSync(join(dir, 'config.json'), JSON.stringify({ conceptMaps: ['bad.json'] }));
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: join(dir, 'config.json') })).toThrow(ConfigError);
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: join(dir, 'config.json') })).toThrow(
      'conceptMaps[0].group[1].element[1].target[0].code: http://loinc.org|8310-5 is not a numeric marker code',
    );
  });
  it('an inline map, a missing file, and a map the FHIR validator refuses', () => {
    writeFileSync(join(dir, 'c2.json'), JSON.stringify({ conceptMaps: [{ resourceType: 'ConceptMap', group: [] }] }));
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: join(dir, 'c2.json') })).toThrow(
      /conceptMaps\[0\]: is not a valid FHIR R4 ConceptMap: .*status/,
    );
    writeFileSync(join(dir, 'c3.json'), JSON.stringify({ conceptMaps: ['nowhere.json'] }));
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: join(dir, 'c3.json') })).toThrow('conceptMaps[0] (nowhere.json) could not be read');
  });
  it('our own checks: target system, redefining a Tidemark code, one site code as two markers, unmapped, dependsOn, equivalence', () => {
    const base = () => exampleMap();
    let m = base();
    m.group[0]!.target = 'http://snomed.info/sct';
    expect(refused([m])).toMatch(/^conceptMaps\[0\]\.group\[0\]\.target: must be/);
    m = base();
    m.group[1]!.source = 'http://loinc.org';
    m.group[1]!.element[0]!.code = '8867-4';
    expect(refused([m])).toMatch(
      /^conceptMaps\[0\]\.group\[1\]\.element\[0\]\.code: http:\/\/loinc\.org\|8867-4 is already read by Tidemark as heartRate/,
    );
    m = base();
    m.group[0]!.element[1]!.code = 'FLO-3301'; // PPV's row, now also read as SVV
    expect(refused([m])).toBe(
      'conceptMaps[0].group[0].element[1].target[0]: https://harbourside.invalid/fhir/CodeSystem/icu-flowsheet|FLO-3301 would be read as svv, but conceptMaps[0].group[0].element[0].target[0] reads it as ppv',
    );
    m = base();
    (m.group[0] as Record<string, unknown>)['unmapped'] = { mode: 'provided' };
    expect(refused([m])).toMatch(/^conceptMaps\[0\]\.group\[0\]\.unmapped: is not supported/);
    m = base();
    m.group[0]!.element[2]!.target[0]!['dependsOn'] = [{ property: 'method', value: 'pocus' }];
    expect(refused([m])).toMatch(/^conceptMaps\[0\]\.group\[0\]\.element\[2\]\.target\[0\]\.dependsOn: is not supported/);
    m = base();
    m.group[0]!.element[3]!.code = 'FLO 33,11';
    expect(refused([m])).toMatch(/^conceptMaps\[0\]\.group\[0\]\.element\[3\]\.code: a site code is required, without spaces/);
  });
  it('unit hints: the UCUM code is checked with the UCUM library; a hint may not change what a UCUM unit means', () => {
    expect(refused([], { MDC_DIM_MMHG: 'mmHg' })).toMatch(/^unitHints\["MDC_DIM_MMHG"\]: "mmHg" is not a UCUM code/);
    expect(refused([], { MDC_DIM_MMHG: 'mm[Hgx]' })).toMatch(/is not a UCUM code/);
    expect(refused([], { mg: 'g' })).toMatch(/^unitHints\["mg"\]: "mg" is already read as the UCUM unit mg/);
    expect(parseSiteMap([], { 'Schl/min': '/min' }).unitHints.get('Schl/min')).toBe('/min');
  });
});

describe('the readiness report (pure, written to a sink)', () => {
  it('lists the mapped markers as read, the unmapped local code with its count, and the not-read equivalences', () => {
    const m = siteMap();
    const t = resolveThresholds({});
    const chart = siteChart(NOW) as FhirResource[];
    const snapshot = buildSnapshot(chart, { patientId: SITE_PATIENT }, NOW, m);
    const run = {
      serviceId: 'fluid-overview',
      hook: 'patient-view',
      outcomes: [],
      resources: chart,
      snapshot,
      advice: assess(snapshot, NOW, t, 'test'),
    };
    const r = patientReadiness(SITE_PATIENT, [run], [], m);
    expect(r.markers.find((x) => x.marker === 'systolicBp')).toMatchObject({
      status: 'read',
      read: { count: 1, newestAgeMinutes: 5, throughSiteMap: 1 },
      excluded: [{ reason: 'unknown-unit', count: 1 }],
    });
    expect(r.markers.find((x) => x.marker === 'ppv')).toMatchObject({ status: 'read', read: { throughSiteMap: 1 } });
    expect(r.markers.find((x) => x.marker === 'svv')?.status).toBe('absent');
    expect(r.unmapped).toContainEqual({ system: FLOWSHEET, code: 'FLO-9120', display: 'Wedge pressure', count: 2 });
    expect(r.unmapped.find((u) => u.code === 'FLO-3399')?.note).toBe(
      'conceptMaps[1].group[0].element[5].target[0] says narrower: not read (docs/integration.md)',
    );
    expect(r.unmapped.find((u) => u.code === '149530')?.note).toMatch(/says relatedto/);
    expect(r.unmapped.some((u) => u.code === 'FLO-3301' || u.code === '2524-7')).toBe(false);
    expect(r.services[0]?.responsiveness).toBe(run.advice.responsiveness?.value ?? null);
    expect(r.services[0]?.need).toBe(run.advice.need?.value ?? null);
    const out: string[] = [];
    writeReport({ rulesVersion: 'test', now: NOW.toISOString(), patients: [r] }, 'text', (s) => out.push(s));
    const text = out.join('');
    expect(text).toContain(`${FLOWSHEET} | FLO-9120 "Wedge pressure" × 2`);
    expect(text).toMatch(/systolicBp +1 value, +newest 5 min old, 1 through a site map/);
    const json: string[] = [];
    writeReport({ rulesVersion: 'test', now: NOW.toISOString(), patients: [r] }, 'json', (s) => json.push(s));
    expect(JSON.parse(json.join('')).patients[0].unmapped).toEqual(r.unmapped);
  });
  it('record text in the text report cannot carry control characters', () => {
    const m = siteMap();
    const chart = siteChart(NOW) as Array<FhirResource & { code?: { coding?: Array<{ display?: string }> } }>;
    const pcwp = chart.find((r) => r.id === 'st-pcwp-1');
    pcwp!.code!.coding![0]!.display = 'Wedge\u001b[2J\nforged line';
    const snapshot = buildSnapshot(chart, { patientId: SITE_PATIENT }, NOW, m);
    const r = patientReadiness(
      SITE_PATIENT,
      [
        {
          serviceId: 's',
          hook: 'patient-view',
          outcomes: [],
          resources: chart,
          snapshot,
          advice: assess(snapshot, NOW, resolveThresholds({}), 't'),
        },
      ],
      [],
      m,
    );
    const out: string[] = [];
    writeReport({ rulesVersion: 't', now: NOW.toISOString(), patients: [r] }, 'text', (s) => out.push(s));
    expect(out.join('')).toContain('"Wedge?[2J?forged line"');
    expect(out.join('')).not.toContain('\u001b');
  });
});
