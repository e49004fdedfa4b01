// Configuration is validated at start: a bad value stops start-up with a message naming the variable.
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadConfig } from '../../src/config/config.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';

describe('loadConfig', () => {
  it('has embedded defaults: port 8080, SQLite audit, 2 s FHIR budget', () => {
    const c = loadConfig({});
    expect(c).toMatchObject({ PORT: 8080, TIDEMARK_AUDIT_STORE: 'sqlite', TIDEMARK_FHIR_BUDGET_MS: 2000, TIDEMARK_TRIAL_MODE: false });
    // The byte caps for FHIR answers, as docs/configuration.md states them: 16 MiB per answer, 48 MiB per call.
    expect(c).toMatchObject({ TIDEMARK_FHIR_MAX_RESPONSE_BYTES: 16_777_216, TIDEMARK_FHIR_MAX_CALL_BYTES: 50_331_648 });
  });
  it.each([
    [{ PORT: 'eighty' }, 'PORT'],
    [{ PORT: '70000' }, 'PORT'],
    [{ TIDEMARK_AUDIT_STORE: 'oracle' }, 'TIDEMARK_AUDIT_STORE'],
    [{ TIDEMARK_AUDIT_STORE: 'postgres' }, 'TIDEMARK_PG_URL'],
    [{ TIDEMARK_FHIR_BUDGET_MS: '10' }, 'TIDEMARK_FHIR_BUDGET_MS'],
    [{ TIDEMARK_TRIAL_MODE: 'maybe' }, 'TIDEMARK_TRIAL_MODE'],
    [{ TIDEMARK_PUBLIC_URL: 'not a url' }, 'TIDEMARK_PUBLIC_URL'],
    [{ TIDEMARK_FHIR_MAX_RESPONSE_BYTES: '1000' }, 'TIDEMARK_FHIR_MAX_RESPONSE_BYTES'],
    [{ TIDEMARK_FHIR_MAX_CALL_BYTES: 'lots' }, 'TIDEMARK_FHIR_MAX_CALL_BYTES'],
  ])('%o is refused naming %s', (env, name) => {
    expect(() => loadConfig(env)).toThrow(new RegExp(name));
  });
  it('reads the JSON file and refuses unknown keys and bad JSON, naming the file variable', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tm-cfg-'));
    const good = join(dir, 'good.json');
    writeFileSync(good, JSON.stringify({ thresholds: { responsiveness: { mapTargetMmHg: 70 } } }));
    expect(loadConfig({ TIDEMARK_CONFIG_FILE: good }).file.thresholds).toEqual({ responsiveness: { mapTargetMmHg: 70 } });
    const unknown = join(dir, 'unknown.json');
    writeFileSync(unknown, JSON.stringify({ colour: 'blue' }));
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: unknown })).toThrow(/TIDEMARK_CONFIG_FILE/);
    const bad = join(dir, 'bad.json');
    writeFileSync(bad, '{');
    expect(() => loadConfig({ TIDEMARK_CONFIG_FILE: bad })).toThrow(/TIDEMARK_CONFIG_FILE .* could not be read as JSON/);
  });
});

describe('site thresholds', () => {
  it('override the defaults, and a bad one is refused with its path', () => {
    expect(resolveThresholds({ need: { mapTargetMmHg: 70 } }).need.mapTargetMmHg).toBe(70);
    expect(resolveThresholds({}).need.mapTargetMmHg).toBe(65);
    expect(() => resolveThresholds({ need: { mapTargetMmHg: 500 } })).toThrow(/mapTargetMmHg/);
    // One CVP window for both questions (docs/clinical-logic), overridable in one place.
    expect(resolveThresholds({ windows: { cvpMin: 180 } }).windows.cvpMin).toBe(180);
    expect(resolveThresholds({}).windows).toMatchObject({
      vitalsMin: 90,
      cvpMin: 120,
      ppvSvvMin: 60,
      tidalVolumeMin: 240,
      rhythmMin: 720,
      capillaryRefillMin: 120,
      lactateMin: 720,
      fio2CarryForwardMin: 720,
      creatinineMin: 2160,
      albuminMin: 4320,
    });
    expect(() => resolveThresholds({ responsivness: {} })).toThrow();
  });
});
