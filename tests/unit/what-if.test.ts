/**
 * Truth tables of the what-if (src/assess/what-if/): which of the four tests is feasible for the patient, what a
 * positive and a negative result at the rule's threshold would do, and which test is decisive. Invented patients,
 * built with the snapshot builder; the engine is the real one. The thresholds behind each check:
 *   PLR: flow rise ≥ 10 % (Monnet X, Marik PE, Teboul JL, Intensive Care Med 2016;42:1935);
 *   mini fluid challenge: VTI rise ≥ 10 % (Muller L et al., Anesthesiology 2011;115:541);
 *   end-expiratory occlusion: CI/CO rise > 5 % (Monnet X et al., Crit Care Med 2009;37:951), by echo VTI ≥ 9 %
 *     (Crit Care 2018, PMC5804059);
 *   tidal volume challenge: absolute PPV rise ≥ 3.5 points (Myatra SN et al., Crit Care Med 2017;45:415);
 *   tidal volume < 8 mL/kg predicted body weight (Monnet, Marik, Teboul, Ann Intensive Care 2016;6:111, Table 2;
 *     PBW by ARDSNet, N Engl J Med 2000;342:1301: male 50 + 0.91 × (height − 152.4));
 *   intra-abdominal hypertension IAP ≥ 12 mmHg (WSACS 2013).
 */
import { describe, expect, it } from 'vitest';
import { assess } from '../../src/assess/assess.js';
import { resolveThresholds, type Thresholds } from '../../src/assess/thresholds.js';
import type { Advice } from '../../src/assess/types.js';
import type { WhatIfRow } from '../../src/assess/what-if/types.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const T = resolveThresholds({});

/**
 * A later-phase patient with a sign of need (lactate 2.8 mmol/L > 2, Sepsis-3; MAP 72 is not hypotension, so not
 * early resuscitation) and a 500 mL bolus ordered; male, 175 cm (PBW 70.6 kg).
 */
function patient(): SnapshotBuilder {
  return new SnapshotBuilder({ sex: 'male' })
    .measure('bodyHeight', 175, { ageMin: 3000 })
    .vitals({ hr: 100, map: 72, rr: 20 }, { ageMin: 5 })
    .measure('lactate', 2.8, { ageMin: 30 })
    .draftOrder({
      ref: 'draftOrders#MedicationRequest/d1',
      resourceType: 'MedicationRequest',
      id: 'd1',
      selected: true,
      isFluid: true,
      volumeMl: 500,
      durationMin: 30,
      resource: {},
    });
}
/** Controlled ventilation without effort, sinus rhythm, tidal volume `vtMl` (600 mL = 8.5 mL/kg PBW; 400 mL = 5.7). */
const ventilated = (b: SnapshotBuilder, vtMl = 600) =>
  b
    .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 })
    .coded('heartRhythm', 'sinus', { ageMin: 10 })
    .measure('tidalVolume', vtMl, { ageMin: 10 });
/** A flow monitor in use: a cardiac output reading 5 min ago. */
const flowMonitor = (b: SnapshotBuilder) => b.measure('cardiacOutput', 5.0, { ageMin: 5 });

function run(b: SnapshotBuilder, t: Thresholds = T): Advice {
  return assess(b.build(), b.now, t, 'test');
}
function row(a: Advice, test: WhatIfRow['test']): WhatIfRow {
  const r = a.whatIf?.rows.find((x) => x.test === test);
  if (!r) throw new Error(`no what-if row for ${test}`);
  return r;
}
const outcome = (r: WhatIfRow, result: 'positive' | 'negative') => r.outcomes.find((o) => o.result === result);

describe('what-if: feasibility', () => {
  it('raised IAP (18 mmHg ≥ 12, WSACS 2013): the leg raise is not offered even with a flow monitor; the mini fluid challenge is, and comes first', () => {
    const a = run(flowMonitor(ventilated(patient().measure('intraAbdominalPressure', 18, { ageMin: 20 }))));
    expect(row(a, 'passive-leg-raise')).toMatchObject({ feasible: false, notFeasible: ['raised-abdominal-pressure'], outcomes: [] });
    expect(row(a, 'mini-fluid-challenge')).toMatchObject({ feasible: true, notFeasible: [] });
    expect(a.responsiveness?.nextTest).toBe('mini-fluid-challenge');
    expect(a.whatIf?.rows.map((r) => r.test)).toEqual([
      'mini-fluid-challenge',
      'passive-leg-raise',
      'tidal-volume-challenge',
      'end-expiratory-occlusion',
    ]);
    expect(a.whatIf?.decisive).toBe('mini-fluid-challenge');
  });

  it('IAP 10 mmHg (< 12) with a flow monitor: the leg raise is feasible and read on the monitor’s cardiac output, from its own reading', () => {
    const a = run(flowMonitor(ventilated(patient().measure('intraAbdominalPressure', 10, { ageMin: 20 }))));
    const plr = row(a, 'passive-leg-raise');
    expect(plr.feasible).toBe(true);
    expect(plr.outcomes.map((o) => o.assumed)).toEqual([
      // Monnet 2016: ≥ 10 %; positive just past it (+1 %), negative at half of it.
      { measured: 'cardiacOutput', unit: 'L/min', threshold: 10, strict: false, changePercent: 11 },
      { measured: 'cardiacOutput', unit: 'L/min', threshold: 10, strict: false, changePercent: 5 },
    ]);
    expect(plr.source).toContain('Monnet');
    expect(a.whatIf?.rows[0]?.test).toBe('passive-leg-raise');
  });

  it('low tidal volume (400 mL = 5.7 mL/kg PBW < 8) with PPV 16 % under controlled ventilation: the tidal volume challenge is offered, read on PPV', () => {
    const a = run(ventilated(patient(), 400).measure('ppv', 16, { ageMin: 5 }));
    const tvc = row(a, 'tidal-volume-challenge');
    expect(tvc).toMatchObject({ feasible: true, notFeasible: [] });
    // Myatra 2017: absolute ΔPPV ≥ 3.5 points; positive 4 points, negative 1.75.
    expect(tvc.outcomes.map((o) => [o.result, o.assumed.measured, o.assumed.changeAbsolute])).toEqual([
      ['positive', 'ppv', 4],
      ['negative', 'ppv', 1.75],
    ]);
    expect(a.responsiveness).toMatchObject({ value: 'likely', confidence: 'moderate', nextTest: 'tidal-volume-challenge' });
    // Positive: the PPV is confirmed by a flow-independent dynamic test; negative: conflicting dynamic evidence.
    expect(outcome(tvc, 'positive')).toMatchObject({ responsiveness: 'likely', confidence: 'high', changes: false });
    expect(outcome(tvc, 'negative')).toMatchObject({ responsiveness: 'indeterminate', action: 'test-first', changes: true });
    expect(a.whatIf?.decisive).toBe('tidal-volume-challenge');
  });

  it('tidal volume 600 mL (8.5 mL/kg PBW ≥ 8): the tidal volume challenge is not offered; without a tidal volume it is "unknown"', () => {
    expect(row(run(ventilated(patient(), 600).measure('ppv', 16, { ageMin: 5 })), 'tidal-volume-challenge').notFeasible).toEqual([
      'tidal-volume-not-low',
    ]);
    const noVt = patient()
      .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 })
      .coded('heartRhythm', 'sinus', { ageMin: 10 })
      .measure('ppv', 16, { ageMin: 5 });
    expect(row(run(noVt), 'tidal-volume-challenge').notFeasible).toEqual(['tidal-volume-unknown']);
  });

  it('the tidal volume challenge needs an arterial line (a current PPV or SVV) and sinus rhythm', () => {
    expect(row(run(ventilated(patient(), 400)), 'tidal-volume-challenge').notFeasible).toEqual(['no-arterial-line']);
    const af = patient()
      .coded('ventilationMode', 'controlled-no-effort', { ageMin: 10 })
      .coded('heartRhythm', 'atrial-fibrillation', { ageMin: 10 })
      .measure('tidalVolume', 400, { ageMin: 10 })
      .measure('ppv', 16, { ageMin: 5 });
    expect(row(run(af), 'tidal-volume-challenge').notFeasible).toEqual(['no-sinus-rhythm']);
  });

  it('spontaneous breathing: end-expiratory occlusion and the tidal volume challenge are not feasible', () => {
    const a = run(patient().coded('ventilationMode', 'spontaneous', { ageMin: 10 }).coded('heartRhythm', 'sinus', { ageMin: 10 }));
    expect(row(a, 'end-expiratory-occlusion')).toMatchObject({ feasible: false, notFeasible: ['spontaneous-breathing'] });
    expect(row(a, 'tidal-volume-challenge').notFeasible).toEqual(['spontaneous-breathing', 'no-arterial-line', 'tidal-volume-unknown']);
    // Effort on the ventilator is spontaneous breathing too; no ventilation state charted is "not ventilated".
    expect(
      row(run(patient().coded('ventilationMode', 'controlled-with-effort', { ageMin: 10 })), 'end-expiratory-occlusion').notFeasible,
    ).toEqual(['spontaneous-breathing']);
    expect(row(run(patient()), 'end-expiratory-occlusion').notFeasible).toEqual(['not-ventilated']);
  });

  it('controlled ventilation without a flow monitor: end-expiratory occlusion is read on VTI by echo (≥ 9 %, Crit Care 2018); with one, on cardiac output (> 5 %, Monnet 2009)', () => {
    const echo = row(run(ventilated(patient())), 'end-expiratory-occlusion');
    expect(echo.outcomes.map((o) => [o.assumed.measured, o.assumed.changePercent, o.assumed.strict])).toEqual([
      ['vti', 10, false],
      ['vti', 4.5, false],
    ]);
    const monitor = row(run(flowMonitor(ventilated(patient()))), 'end-expiratory-occlusion');
    expect(monitor.outcomes.map((o) => [o.assumed.measured, o.assumed.changePercent, o.assumed.strict])).toEqual([
      ['cardiacOutput', 6, true],
      ['cardiacOutput', 2.5, true],
    ]);
  });

  it('no flow monitor: the leg raise by flow is not feasible, the mini fluid challenge with VTI by echo is, and it is the test offered', () => {
    const a = run(patient().coded('ventilationMode', 'spontaneous', { ageMin: 10 }));
    expect(row(a, 'passive-leg-raise')).toMatchObject({ feasible: false, notFeasible: ['no-flow-monitor'] });
    const mfc = row(a, 'mini-fluid-challenge');
    // Muller 2011: ΔVTI ≥ 10 %.
    expect(mfc.outcomes.map((o) => [o.assumed.measured, o.assumed.unit, o.assumed.changePercent])).toEqual([
      ['vti', 'cm', 11],
      ['vti', 'cm', 5],
    ]);
    expect(a.responsiveness?.nextTest).toBe('mini-fluid-challenge');
    // A cardiac output reading older than flowMonitorRecentMin (240 min) is no monitor in use.
    expect(row(run(patient().measure('cardiacOutput', 5, { ageMin: 241 })), 'passive-leg-raise').notFeasible).toEqual(['no-flow-monitor']);
  });
});

describe('what-if: outcomes and the decisive test', () => {
  it('an indeterminate patient: a positive test → likely, a negative → unlikely; the offered test is decisive', () => {
    // Tolerance adequate from 4 markers: SpO2/FiO2 96/0.30 = 320 (Rice 2007: > 235), CVP 8 mmHg, creatinine steady.
    const b = patient()
      .coded('ventilationMode', 'spontaneous', { ageMin: 10 })
      .measure('spo2', 96, { ageMin: 10 })
      .measure('fio2', 30, { ageMin: 10 })
      .measure('cvp', 8, { ageMin: 30 })
      .measure('creatinine', 0.9, { ageMin: 20 * 60 })
      .measure('creatinine', 0.9, { ageMin: 4 * 60 });
    const a = run(b);
    expect(a.tolerance?.value).toBe('adequate');
    expect(a.responsiveness?.value).toBe('indeterminate');
    expect(a.recommendation?.action).toBe('test-first');
    const mfc = row(a, 'mini-fluid-challenge');
    expect(outcome(mfc, 'positive')).toMatchObject({
      responsiveness: 'likely',
      confidence: 'high',
      action: 'proceed-and-reassess',
      changes: true,
    });
    expect(outcome(mfc, 'negative')).toMatchObject({
      responsiveness: 'unlikely',
      confidence: 'high',
      action: 'question-bolus',
      changes: true,
    });
    expect(a.whatIf?.decisive).toBe('mini-fluid-challenge');
  });

  it('a fresh validated leg raise by cardiac output (4.0 → 4.6 L/min, +15 % ≥ 10 %): already done, the verdict is settled, nothing is decisive', () => {
    const a = run(
      flowMonitor(patient().coded('ventilationMode', 'spontaneous', { ageMin: 10 })).dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, {
        ageMin: 10,
      }),
    );
    expect(a.responsiveness).toMatchObject({ value: 'likely', confidence: 'high' });
    expect(row(a, 'passive-leg-raise')).toMatchObject({ feasible: false, notFeasible: ['already-done'] });
    // A second test that disagreed would make it a conflict (indeterminate): the row says so, but a high-confidence verdict is settled.
    expect(outcome(row(a, 'mini-fluid-challenge'), 'negative')).toMatchObject({ responsiveness: 'indeterminate', changes: true });
    expect(outcome(row(a, 'mini-fluid-challenge'), 'positive')).toMatchObject({ responsiveness: 'likely', changes: false });
    expect(a.whatIf?.decisive).toBeUndefined();
  });

  it('a leg raise judged by pulse pressure only (weak, static) is not "already done": the leg raise by flow is still offered', () => {
    const a = run(flowMonitor(patient()).dynamicTest('plr', 'pulsePressure', 40, 46, { ageMin: 10 }));
    expect(row(a, 'passive-leg-raise').feasible).toBe(true);
  });

  it('a leg raise done before a later bolus (set aside by the event) is not "already done"', () => {
    const a = run(
      flowMonitor(patient())
        .dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 60 })
        .fluid({ volumeMl: 250, startAgeMin: 40, endAgeMin: 25 }),
    );
    expect(row(a, 'passive-leg-raise').feasible).toBe(true);
  });

  it('a clear responder with poor tolerance, every test done or not feasible: no row has outcomes and nothing is decisive', () => {
    // PLR +15 % and mini fluid challenge +15 % (both ≥ 10 %) fresh; spontaneous breathing; EVLWI 14 mL/kg (≥ 10: pulmonary oedema, Tagami
    // 2010) and IAP 18.
    const b = flowMonitor(patient().coded('ventilationMode', 'spontaneous', { ageMin: 10 }))
      .dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 10 })
      .dynamicTest('miniFluidChallenge', 'vti', 20, 23, { ageMin: 8 })
      .measure('evlwi', 14, { ageMin: 30 })
      .measure('intraAbdominalPressure', 18, { ageMin: 20 });
    const a = run(b);
    expect(a.responsiveness).toMatchObject({ value: 'likely', confidence: 'high' });
    expect(a.tolerance?.value).toBe('poor');
    expect(a.whatIf?.rows.every((r) => !r.feasible && r.outcomes.length === 0)).toBe(true);
    expect(row(a, 'passive-leg-raise').notFeasible).toEqual(['raised-abdominal-pressure', 'already-done']);
    expect(row(a, 'mini-fluid-challenge').notFeasible).toEqual(['already-done']);
    expect(a.whatIf?.decisive).toBeUndefined();
  });

  it('a clear responder with poor tolerance under controlled ventilation: a positive occlusion test changes nothing; nothing is decisive', () => {
    const b = flowMonitor(ventilated(patient()))
      .dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 10 })
      .measure('evlwi', 14, { ageMin: 30 });
    const a = run(b);
    expect(a.tolerance?.value).toBe('poor');
    const eeo = row(a, 'end-expiratory-occlusion');
    expect(outcome(eeo, 'positive')).toMatchObject({
      responsiveness: 'likely',
      action: a.recommendation?.action,
      headline: a.recommendation?.headline,
      changes: false,
    });
    expect(a.whatIf?.decisive).toBeUndefined();
  });

  it('the decisive test follows the engine’s preference: with a flow monitor, the leg raise before the mini fluid challenge', () => {
    const a = run(flowMonitor(patient().coded('ventilationMode', 'spontaneous', { ageMin: 10 })));
    expect(a.responsiveness?.nextTest).toBe('passive-leg-raise');
    expect(row(a, 'mini-fluid-challenge').outcomes.some((o) => o.changes)).toBe(true);
    expect(a.whatIf?.decisive).toBe('passive-leg-raise');
  });

  it('thresholds come from the Thresholds object: a site that reads a leg raise at ≥ 15 % gets +16 % and +7.5 %', () => {
    const t = resolveThresholds({ responsiveness: { plrFlowRisePercent: 15 } });
    const plr = row(run(flowMonitor(patient()), t), 'passive-leg-raise');
    expect(plr.outcomes.map((o) => o.assumed.changePercent)).toEqual([16, 7.5]);
  });

  it('without a selected fluid order the outcomes carry the verdict only, and changes compare the verdict', () => {
    const b = new SnapshotBuilder({ sex: 'male' })
      .vitals({ hr: 100, map: 72, rr: 20 }, { ageMin: 5 })
      .measure('lactate', 2.8, { ageMin: 30 });
    const a = run(b);
    expect(a.recommendation).toBeUndefined();
    const mfc = row(a, 'mini-fluid-challenge');
    expect(mfc.outcomes.map((o) => [o.responsiveness, o.action, o.changes])).toEqual([
      ['likely', undefined, true],
      ['unlikely', undefined, true],
    ]);
  });

  it('the hypothetical results stay out of the advice: findings as without the what-if, no "what-if#" reference anywhere but in the re-runs', () => {
    const b = flowMonitor(ventilated(patient(), 400).measure('ppv', 16, { ageMin: 5 }));
    const s = b.build();
    const before = structuredClone(s);
    const a = assess(s, b.now, T, 'test');
    expect(s).toEqual(before);
    const plain = assess(s, b.now, T, 'test', { whatIf: false });
    expect(plain.whatIf).toBeUndefined();
    const { whatIf, ...rest } = a;
    expect(rest).toEqual(plain);
    expect(whatIf?.rows.filter((r) => r.feasible).length).toBeGreaterThan(1);
    expect(JSON.stringify(rest)).not.toContain('what-if#');
  });

  it('a what-if that throws is isolated like any group: recorded in ruleErrors, no whatIf, the rest of the advice kept', () => {
    const b = patient();
    const s = b.build();
    // A malformed snapshot (dynamicTests not an array): the test rules fail one by one, the what-if fails once.
    const broken = { ...s, dynamicTests: null as unknown as typeof s.dynamicTests };
    const a = assess(broken, b.now, T, 'test');
    expect(a.responsiveness?.value).toBe('indeterminate');
    expect(a.whatIf).toBeUndefined();
    expect(a.ruleErrors.filter((e) => e.ruleId === 'what-if')).toHaveLength(1);
    expect(a.recommendation?.action).toBe('test-first');
  });
});
