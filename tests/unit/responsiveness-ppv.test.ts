/**
 * Truth tables for 'responsiveness.ppv' and 'responsiveness.svv' and their validity conditions.
 * Boundaries (documented in docs/clinical-logic/responsiveness.md): PPV ≥ 13 % for, < 9 % against, 9 ≤ PPV < 13
 * grey zone (neutral); SVV ≥ 11.6 for, < 9.7 against; Vt ≥ 8 mL/kg PBW; HR/RR strictly > 3.6; IAP < 12 mmHg;
 * fresh when age ≤ 30 min.
 */
import { describe, expect, it } from 'vitest';
import { assessResponsiveness, responsivenessThresholdsSchema, type ResponsivenessThresholds } from '../../src/assess/responsiveness/index.js';
import type { Finding } from '../../src/assess/types.js';
import { SnapshotBuilder, type Sex } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});

function run(b: SnapshotBuilder, t: ResponsivenessThresholds = T) {
  return assessResponsiveness(b.build(), b.now, t);
}
function find(b: SnapshotBuilder, id: string, t: ResponsivenessThresholds = T): Finding {
  const f = run(b, t).findings.find((x) => x.ruleId === id);
  if (!f) throw new Error(`no finding ${id}`);
  return f;
}

interface State {
  sex?: Sex; mode?: string | null; rhythm?: string | null; chest?: string | null; vtMl?: number | null; heightCm?: number | null;
  iap?: number | null; hr?: number | null; rr?: number | null;
}
/** Invented ventilated patient meeting every condition unless told otherwise (null = not recorded). */
function patient(s: State = {}): SnapshotBuilder {
  const b = new SnapshotBuilder({ sex: s.sex ?? 'male' });
  const v = <K extends keyof State>(k: K, d: NonNullable<State[K]>) => (s[k] === undefined ? d : s[k]);
  const mode = v('mode', 'controlled-no-effort'); if (mode !== null) b.coded('ventilationMode', mode as string, { ageMin: 20 });
  const rhythm = v('rhythm', 'sinus'); if (rhythm !== null) b.coded('heartRhythm', rhythm as string, { ageMin: 20 });
  const chest = v('chest', 'closed'); if (chest !== null) b.coded('chestStatus', chest as string, { ageMin: 120 });
  const vt = v('vtMl', 600); if (vt !== null) b.measure('tidalVolume', vt as number, { ageMin: 10 });
  const h = v('heightCm', 175); if (h !== null) b.measure('bodyHeight', h as number, { ageMin: 5000 });
  const iap = v('iap', 8); if (iap !== null) b.measure('intraAbdominalPressure', iap as number, { ageMin: 90 });
  const hr = v('hr', 100); if (hr !== null) b.measure('heartRate', hr as number, { ageMin: 5 });
  const rr = v('rr', 20); if (rr !== null) b.measure('respiratoryRate', rr as number, { ageMin: 5 });
  return b;
}
const ppv = (b: SnapshotBuilder, value: number, ageMin = 5) => find(b.measure('ppv', value, { ageMin }), 'responsiveness.ppv');

describe('PPV value against the thresholds (all validity conditions met)', () => {
  it.each([
    [20, 'for'], [13, 'for'], [12.9, 'neutral'], [9, 'neutral'], [8.9, 'against'], [3, 'against'],
  ] as const)('PPV %s %% → %s (dynamic)', (value, direction) => {
    const f = ppv(patient(), value);
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.weight).toBe('dynamic');
    expect(f.values?.ppvPercent).toBe(value);
    expect(f.evidence.some((e) => e.kind === 'ppv' && e.value === value)).toBe(true);
  });
  it('grey zone is named in the text', () => {
    expect(ppv(patient(), 11).text).toMatch(/grey zone \(9–13 %\)/);
  });
  it('thresholds are configurable', () => {
    const t = responsivenessThresholdsSchema.parse({ ppvThresholdPercent: 15, ppvGreyZoneLowPercent: 10 });
    expect(find(patient().measure('ppv', 14, { ageMin: 5 }), 'responsiveness.ppv', t).direction).toBe('neutral');
    expect(find(patient().measure('ppv', 15, { ageMin: 5 }), 'responsiveness.ppv', t).direction).toBe('for');
    expect(find(patient().measure('ppv', 9.5, { ageMin: 5 }), 'responsiveness.ppv', t).direction).toBe('against');
  });
});

describe('PPV present, absent, stale, invalid', () => {
  it('absent → not assessed, says none recorded', () => {
    const f = find(patient(), 'responsiveness.ppv');
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toBe('no PPV recorded');
    expect(f.values?.freshness).toBe('missing');
  });
  it('age 30 min is fresh (≤ window), 31 min is stale with age and window in the reason', () => {
    expect(ppv(patient(), 16, 30).status).toBe('assessed');
    const f = ppv(patient(), 16, 31);
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toBe('PPV stale (age 31 min, window 30 min)');
    expect(f.evidence).toHaveLength(1);
  });
  it('the newest reading is used', () => {
    const f = find(patient().measure('ppv', 5, { ageMin: 20 }).measure('ppv', 16, { ageMin: 2 }), 'responsiveness.ppv');
    expect(f.direction).toBe('for');
  });
  it('a reading in a non-canonical unit is invalid, never used', () => {
    const f = find(patient().measure('ppv', 0.16, { ageMin: 2, unit: '1' }), 'responsiveness.ppv');
    expect(f.status).toBe('not-assessed');
    expect(f.values?.freshness).toBe('invalid');
  });
});

describe('PPV validity conditions: failed → shown but not used, condition named', () => {
  it.each([
    ['spontaneous breathing', { mode: 'spontaneous' }, /spontaneous breathing/],
    ['effort on the ventilator', { mode: 'controlled-with-effort' }, /spontaneous breathing effort/],
    ['atrial fibrillation', { rhythm: 'atrial-fibrillation' }, /rhythm atrial-fibrillation/],
    ['paced rhythm', { rhythm: 'paced' }, /rhythm paced/],
    ['Vt 420 mL at 175 cm male = 5.95 mL/kg', { vtMl: 420 }, /5\.95 mL\/kg PBW/],
    ['HR 90 / RR 30 = 3.0', { hr: 90, rr: 30 }, /HR 90 \/ RR 30 = 3/],
    ['open chest', { chest: 'open' }, /open chest/],
    ['IAP 12 mmHg (≥ 12 is IAH)', { iap: 12 }, /intra-abdominal hypertension, IAP 12/],
  ] as const)('%s', (_name, state, pattern) => {
    const f = ppv(patient(state), 18);
    expect(f.status).toBe('not-assessed');
    expect(f.direction).toBeUndefined();
    expect(f.values?.ppvPercent).toBe(18);
    expect(f.values?.validity).toBe('failed');
    expect(f.reason).toMatch(/^outside validity/);
    expect(f.reason).toMatch(pattern);
    expect(f.text).toMatch(/PPV 18 % shown but not used/);
  });
});

describe('PPV validity unknown (missing or stale validity data) → not used, condition named', () => {
  it.each([
    ['ventilation state', { mode: null }, /ventilation state not recorded/],
    ['rhythm', { rhythm: null }, /heart rhythm not recorded/],
    ['chest status', { chest: null }, /chest status not recorded/],
    ['tidal volume', { vtMl: null }, /tidal volume not recorded/],
    ['height', { heightCm: null }, /body height \(for predicted body weight\) not recorded/],
    ['intra-abdominal pressure', { iap: null }, /intra-abdominal pressure not recorded/],
    ['heart rate', { hr: null }, /heart rate not recorded/],
    ['respiratory rate', { rr: null }, /respiratory rate not recorded/],
  ] as const)('%s missing', (_name, state, pattern) => {
    const f = ppv(patient(state), 18);
    expect(f.status).toBe('not-assessed');
    expect(f.values?.validity).toBe('unknown');
    expect(f.reason).toMatch(/^validity unknown: could not check/);
    expect(f.reason).toMatch(pattern);
  });
  it('a stale rhythm record (241 min, window 240) cannot be checked', () => {
    const b = patient({ rhythm: null }).coded('heartRhythm', 'sinus', { ageMin: 241 });
    const f = ppv(b, 18);
    expect(f.values?.validity).toBe('unknown');
    expect(f.reason).toMatch(/heart rhythm stale \(age 241 min, window 240 min\)/);
  });
  it('failed and unknown conditions are both reported', () => {
    const f = ppv(patient({ rhythm: 'atrial-fibrillation', iap: null }), 18);
    expect(f.values?.validity).toBe('failed');
    expect(f.reason).toMatch(/outside validity: sinus rhythm not met/);
    expect(f.reason).toMatch(/could not check no intra-abdominal hypertension/);
  });
});

describe('PPV validity boundaries', () => {
  it('Vt exactly 8 mL/kg PBW is valid (≥): male 152.4 cm → PBW 50 kg, Vt 400 mL', () => {
    expect(ppv(patient({ heightCm: 152.4, vtMl: 400 }), 18).status).toBe('assessed');
    expect(ppv(patient({ heightCm: 152.4, vtMl: 399 }), 18).values?.validity).toBe('failed');
  });
  it('HR/RR exactly 3.6 is invalid (strictly > 3.6 needed); 73/20 = 3.65 is valid', () => {
    expect(ppv(patient({ hr: 72, rr: 20 }), 18).values?.validity).toBe('failed');
    expect(ppv(patient({ hr: 73, rr: 20 }), 18).status).toBe('assessed');
  });
  it('IAP 11.9 mmHg is valid, 12 is not', () => {
    expect(ppv(patient({ iap: 11.9 }), 18).status).toBe('assessed');
    expect(ppv(patient({ iap: 12 }), 18).status).toBe('not-assessed');
  });
  it('respiratory rate 0 gives no ratio: unknown', () => {
    expect(ppv(patient({ rr: 0 }), 18).values?.validity).toBe('unknown');
  });
  it('female 160 cm: PBW 52.42 kg, Vt 420 mL = 8.01 mL/kg → valid', () => {
    const f = ppv(patient({ sex: 'female', heightCm: 160, vtMl: 420 }), 18);
    expect(f.status).toBe('assessed');
    expect(f.values?.pbwKg).toBeCloseTo(52.42, 2);
  });
  it('sex not recorded: Vt judged against both PBWs (met if both ≥ 8, failed if both < 8, else unknown)', () => {
    // 175 cm: PBW male 70.566, female 66.066 kg
    expect(ppv(patient({ sex: 'unknown', vtMl: 600 }), 18).status).toBe('assessed'); // 8.50 / 9.08
    expect(ppv(patient({ sex: 'unknown', vtMl: 500 }), 18).values?.validity).toBe('failed'); // 7.09 / 7.57
    const f = ppv(patient({ sex: 'other', vtMl: 540 }), 18); // 7.65 / 8.17
    expect(f.values?.validity).toBe('unknown');
    expect(f.reason).toMatch(/sex needed for predicted body weight/);
  });
  it('the evidence lists the validity data used', () => {
    const f = ppv(patient(), 18);
    const kinds = f.evidence.map((e) => e.kind).sort();
    expect(kinds).toEqual(['bodyHeight', 'chestStatus', 'heartRate', 'heartRhythm', 'intraAbdominalPressure', 'ppv', 'respiratoryRate', 'tidalVolume', 'ventilationMode']);
  });
});

describe('SVV (Marik 2009 threshold 11.6 %, same validity conditions)', () => {
  const svv = (b: SnapshotBuilder, value: number, ageMin = 5) => find(b.measure('svv', value, { ageMin }), 'responsiveness.svv');
  it.each([[14, 'for'], [11.6, 'for'], [11.5, 'neutral'], [9.7, 'neutral'], [9.6, 'against']] as const)('SVV %s %% → %s', (value, direction) => {
    const f = svv(patient(), value);
    expect(f.direction).toBe(direction);
    expect(f.weight).toBe('dynamic');
    expect(f.values?.svvPercent).toBe(value);
  });
  it('absent, stale, invalid conditions', () => {
    expect(find(patient(), 'responsiveness.svv').reason).toBe('no SVV recorded');
    expect(svv(patient(), 14, 45).reason).toBe('SVV stale (age 45 min, window 30 min)');
    expect(svv(patient({ rhythm: 'other-irregular' }), 14).values?.validity).toBe('failed');
  });
});
