/**
 * Truth tables for 'responsiveness.ppv' and 'responsiveness.svv' and their validity conditions, read by the direction
 * of the error (docs/clinical-logic/index.md; Michard, Chemla, Teboul, Crit Care 2015;19:144; Monnet, Marik, Teboul, Ann
 * Intensive Care 2016;6:111, Table 2). Boundaries (docs/clinical-logic/responsiveness.md): PPV ≥ 13 % for, < 9 %
 * against, 9 ≤ PPV < 13 grey zone; SVV ≥ 11.6 for, < 9.7 against; Vt ≥ 8 mL/kg PBW; HR/RR strictly > 3.6; IAP < 12
 * mmHg; fresh when age ≤ 60 min (docs/clinical-logic) and not set aside by a later fluid or vasoactive change.
 */
import { describe, expect, it } from 'vitest';
import type { ResponsivenessFinding as Finding } from '../../src/assess/common/finding.js';
import {
  assessResponsiveness,
  responsivenessThresholdsSchema,
  type ResponsivenessThresholds,
} from '../../src/assess/responsiveness/index.js';
import { responsivenessContext } from '../helpers/rule-context.js';
import { SnapshotBuilder, type Sex } from '../helpers/snapshot-builder.js';

const T = responsivenessThresholdsSchema.parse({});

function run(b: SnapshotBuilder, t: ResponsivenessThresholds = T) {
  return assessResponsiveness(responsivenessContext(b, t));
}
function find(b: SnapshotBuilder, id: string, t: ResponsivenessThresholds = T): Finding {
  const f = run(b, t).findings.find((x) => x.ruleId === id);
  if (!f) throw new Error(`no finding ${id}`);
  return f;
}

interface State {
  sex?: Sex;
  mode?: string | null;
  rhythm?: string | null;
  chest?: string | null;
  vtMl?: number | null;
  heightCm?: number | null;
  iap?: number | null;
  hr?: number | null;
  rr?: number | null;
}
/** Invented ventilated patient meeting every condition unless told otherwise (null = not recorded). */
function patient(s: State = {}): SnapshotBuilder {
  const b = new SnapshotBuilder({ sex: s.sex ?? 'male' });
  const v = <K extends keyof State>(k: K, d: NonNullable<State[K]>) => (s[k] === undefined ? d : s[k]);
  const mode = v('mode', 'controlled-no-effort');
  if (mode !== null) b.coded('ventilationMode', mode as string, { ageMin: 20 });
  const rhythm = v('rhythm', 'sinus');
  if (rhythm !== null) b.coded('heartRhythm', rhythm as string, { ageMin: 20 });
  const chest = v('chest', 'closed');
  if (chest !== null) b.coded('chestStatus', chest as string, { ageMin: 120 });
  const vt = v('vtMl', 600);
  if (vt !== null) b.measure('tidalVolume', vt as number, { ageMin: 10 });
  const h = v('heightCm', 175);
  if (h !== null) b.measure('bodyHeight', h as number, { ageMin: 5000 });
  const iap = v('iap', 8);
  if (iap !== null) b.measure('intraAbdominalPressure', iap as number, { ageMin: 90 });
  const hr = v('hr', 100);
  if (hr !== null) b.measure('heartRate', hr as number, { ageMin: 5 });
  const rr = v('rr', 20);
  if (rr !== null) b.measure('respiratoryRate', rr as number, { ageMin: 5 });
  return b;
}
const ppv = (b: SnapshotBuilder, value: number, ageMin = 5) => find(b.measure('ppv', value, { ageMin }), 'responsiveness.ppv');

describe('PPV value against the thresholds (all validity conditions met)', () => {
  it.each([
    [20, 'for'],
    [13, 'for'],
    [12.9, 'neutral'],
    [9, 'neutral'],
    [8.9, 'against'],
    [3, 'against'],
  ] as const)('PPV %s %% → %s (dynamic)', (value, direction) => {
    const f = ppv(patient(), value);
    expect(f.status).toBe('assessed');
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe('dynamic');
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
    expect(f).toMatchObject({ reason: 'no PPV recorded', gap: 'missing' });
    expect(f.values?.freshness).toBe('missing');
  });
  it('age 60 min is fresh (≤ window, docs/clinical-logic), 61 min is stale with age and window in the reason', () => {
    expect(ppv(patient(), 16, 60).status).toBe('assessed');
    const f = ppv(patient(), 16, 61);
    expect(f).toMatchObject({ status: 'not-assessed', gap: 'stale', reason: 'PPV stale (age 61 min, window 60 min)' });
    expect(f.evidence).toHaveLength(1);
  });
  it('a PPV charted before the latest fluid of ≥ 100 mL is set aside with that reason (docs/clinical-logic); one after it counts', () => {
    const before = ppv(patient().fluid({ volumeMl: 250, startAgeMin: 20, endAgeMin: 10 }), 16, 30);
    expect(before).toMatchObject({ status: 'not-assessed', gap: 'set-aside' });
    expect(before.reason).toMatch(/taken before 250 mL .* started at/);
    expect(ppv(patient().fluid({ volumeMl: 250, startAgeMin: 40, endAgeMin: 30 }), 16, 20).status).toBe('assessed');
    expect(ppv(patient().fluid({ volumeMl: 99, startAgeMin: 20, endAgeMin: 10 }), 16, 30).status).toBe('assessed');
  });
  it('a PPV charted before a vasoactive rate change is set aside', () => {
    const b = patient()
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 15, rate: { value: 0.1, unit: 'ug/kg/min' } })
      .vasoactive({ drug: 'norepinephrine', startAgeMin: 15, rate: { value: 0.2, unit: 'ug/kg/min' } });
    expect(ppv(b, 16, 30)).toMatchObject({ status: 'not-assessed', gap: 'set-aside' });
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

describe('PPV validity by the direction of the error (docs/clinical-logic)', () => {
  it.each([
    ['spontaneous breathing', { mode: 'spontaneous' }, /spontaneous breathing/],
    ['effort on the ventilator', { mode: 'controlled-with-effort' }, /spontaneous breathing effort/],
    ['atrial fibrillation', { rhythm: 'atrial-fibrillation' }, /rhythm atrial-fibrillation/],
    ['ventilation not charted', { mode: null }, /ventilation state not recorded/],
    ['rhythm not charted', { rhythm: null }, /heart rhythm not recorded/],
  ] as const)('%s voids it both ways (high and low)', (_name, state, pattern) => {
    for (const value of [18, 4]) {
      const f = ppv(patient(state), value);
      expect(f).toMatchObject({ status: 'not-assessed', gap: 'outside-validity' });
      expect(f.reason).toMatch(/^outside validity either way/);
      expect(f.reason).toMatch(pattern);
    }
  });
  it.each([
    ['Vt 420 mL at 175 cm male = 5.95 mL/kg (Monnet 2016: false negatives)', { vtMl: 420 }, /5\.95 mL\/kg PBW/],
    ['HR 90 / RR 30 = 3.0 (De Backer 2009)', { hr: 90, rr: 30 }, /HR 90 \/ RR 30 = 3/],
    ['open chest', { chest: 'open' }, /open chest/],
    ['tidal volume not charted', { vtMl: null }, /tidal volume not recorded/],
  ] as const)('%s: a HIGH value still argues for, a LOW value cannot be read', (_name, state, pattern) => {
    const high = ppv(patient(state), 18);
    expect(high).toMatchObject({ status: 'assessed', direction: 'for', tier: 'dynamic' });
    expect(high.text).toMatch(/usable although/);
    expect(high.text).toMatch(pattern);
    const low = ppv(patient(state), 4);
    expect(low.text).toMatch(pattern);
    expect(low).toMatchObject({ status: 'not-assessed', gap: 'outside-validity' });
    expect(low.reason).toMatch(/^false negatives likely/);
  });
  it('raised IAP (12 mmHg, IAH by WSACS 2013): a HIGH value is doubtful, a LOW value still argues against', () => {
    const high = ppv(patient({ iap: 12 }), 18);
    expect(high).toMatchObject({ status: 'not-assessed', gap: 'outside-validity' });
    expect(high.reason).toMatch(/^false positives likely \(no intra-abdominal hypertension/);
    expect(high.text).toMatch(/a high value is doubtful with intra-abdominal hypertension, IAP 12/);
    expect(ppv(patient({ iap: 12 }), 4)).toMatchObject({ status: 'assessed', direction: 'against' });
  });
  it('chest status and IAP not charted are assumed closed and normal, and the finding says so', () => {
    const f = ppv(patient({ chest: null, iap: null }), 18);
    expect(f).toMatchObject({ status: 'assessed', direction: 'for' });
    expect(f.assumptions).toEqual(['chest status not recorded: assumed closed', 'intra-abdominal pressure not recorded: assumed normal']);
  });
  it('a rhythm record other than sinus within 12 h voids it even when the latest is sinus (docs/clinical-logic)', () => {
    const b = patient().coded('heartRhythm', 'atrial-fibrillation', { ageMin: 300 });
    expect(ppv(b, 18).reason).toMatch(/rhythm atrial-fibrillation recorded at/);
    expect(ppv(patient().coded('heartRhythm', 'atrial-fibrillation', { ageMin: 721 }), 18).status).toBe('assessed');
  });
  it('a stale rhythm record (721 min, window 720) cannot be checked', () => {
    const f = ppv(patient({ rhythm: null }).coded('heartRhythm', 'sinus', { ageMin: 721 }), 18);
    expect(f.reason).toMatch(/heart rhythm stale \(age 12 h 1 min, window 12 h\)/);
  });
});

describe('PPV validity boundaries', () => {
  it('Vt exactly 8 mL/kg PBW is met (≥): male 152.4 cm → PBW 50 kg, Vt 400 mL; 399 mL makes a low value unreadable', () => {
    expect(ppv(patient({ heightCm: 152.4, vtMl: 400 }), 4).status).toBe('assessed');
    expect(ppv(patient({ heightCm: 152.4, vtMl: 399 }), 4).status).toBe('not-assessed');
  });
  it('HR/RR exactly 3.6 is not met (strictly > 3.6 needed); 73/20 = 3.65 is', () => {
    expect(ppv(patient({ hr: 72, rr: 20 }), 4).status).toBe('not-assessed');
    expect(ppv(patient({ hr: 73, rr: 20 }), 4).status).toBe('assessed');
  });
  it('IAP 11.9 mmHg leaves a high value usable, 12 does not', () => {
    expect(ppv(patient({ iap: 11.9 }), 18).status).toBe('assessed');
    expect(ppv(patient({ iap: 12 }), 18).status).toBe('not-assessed');
  });
  it('female 160 cm: PBW 52.42 kg, Vt 420 mL = 8.01 mL/kg → met (ARDSNet PBW formula)', () => {
    const f = ppv(patient({ sex: 'female', heightCm: 160, vtMl: 420 }), 4);
    expect(f.status).toBe('assessed');
    expect(f.values?.pbwKg).toBeCloseTo(52.42, 2);
  });
  it('sex not recorded: Vt judged against both PBWs', () => {
    // 175 cm: PBW male 70.566, female 66.066 kg
    expect(ppv(patient({ sex: 'unknown', vtMl: 600 }), 4).status).toBe('assessed'); // 8.50 / 9.08
    expect(ppv(patient({ sex: 'unknown', vtMl: 500 }), 4).status).toBe('not-assessed'); // 7.09 / 7.57
    expect(ppv(patient({ sex: 'other', vtMl: 540 }), 4).text).toMatch(/sex needed for predicted body weight/); // 7.65 / 8.17
  });
  it('the evidence lists the validity data used', () => {
    const f = ppv(patient(), 18);
    const kinds = f.evidence.map((e) => e.kind).sort();
    expect(kinds).toEqual([
      'bodyHeight',
      'chestStatus',
      'heartRate',
      'heartRhythm',
      'intraAbdominalPressure',
      'ppv',
      'respiratoryRate',
      'tidalVolume',
      'ventilationMode',
    ]);
  });
});

describe('SVV (Marik 2009 threshold 11.6 %, same validity conditions)', () => {
  const svv = (b: SnapshotBuilder, value: number, ageMin = 5) => find(b.measure('svv', value, { ageMin }), 'responsiveness.svv');
  it.each([
    [14, 'for'],
    [11.6, 'for'],
    [11.5, 'neutral'],
    [9.7, 'neutral'],
    [9.6, 'against'],
  ] as const)('SVV %s %% → %s', (value, direction) => {
    const f = svv(patient(), value);
    expect(f.direction).toBe(direction);
    expect(f.tier).toBe('dynamic');
    expect(f.values?.svvPercent).toBe(value);
  });
  it('absent, stale, void', () => {
    expect(find(patient(), 'responsiveness.svv').reason).toBe('no SVV recorded');
    expect(svv(patient(), 14, 75).reason).toBe('SVV stale (age 75 min, window 60 min)');
    expect(svv(patient({ rhythm: 'other-irregular' }), 14).gap).toBe('outside-validity');
  });
});

describe('right-ventricular failure and pulmonary hypertension (false positives: Mahjoub 2009 [M]; docs/clinical-logic)', () => {
  const withCondition = (system: string, code: string) => patient().condition({ codings: [{ system, code }], clinicalStatus: 'active' });
  it('pulmonary hypertension coded ICD-10-CM I27.21: a high PPV is doubtful, a low one still argues against', () => {
    const b = withCondition('http://hl7.org/fhir/sid/icd-10-cm', 'I27.21');
    const high = ppv(b, 18);
    expect(high).toMatchObject({ status: 'not-assessed', gap: 'outside-validity' });
    expect(high.text).toMatch(/pulmonary hypertension/i);
    expect(ppv(withCondition('http://hl7.org/fhir/sid/icd-10-cm', 'I27.21'), 4)).toMatchObject({
      status: 'assessed',
      direction: 'against',
    });
  });
  it('a resolved condition does not count', () => {
    const b = patient().condition({
      codings: [{ system: 'http://hl7.org/fhir/sid/icd-10-cm', code: 'I27.21' }],
      clinicalStatus: 'resolved',
    });
    expect(ppv(b, 18).status).toBe('assessed');
  });
});
