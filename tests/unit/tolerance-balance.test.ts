/** Truth tables: cumulative and 24-h balance, percent fluid overload, weight gain. */
import { describe, expect, it } from 'vitest';
import { balance24hRule, cumulativeBalanceRule } from '../../src/assess/tolerance/balance.js';
import { fluidOverloadRule } from '../../src/assess/tolerance/fluid-overload.js';
import { weightGainRule } from '../../src/assess/tolerance/weight-gain.js';
import { fluid, hourly, limit, m, NOW, snapshot, T } from '../helpers/tolerance-fixtures.js';

const DAY = 1440;
/** 12 L in, 4 L out over the three days since admission. */
const intake12 = () => [0, DAY, 2 * DAY].map((ago) => m('fluidIntake', 4000, ago, { periodMinutes: DAY }));
const output4 = () => [0, DAY].map((ago) => m('fluidOutput', 2000, ago, { periodMinutes: DAY }));

describe('tolerance.balance-cumulative', () => {
  it('present: intake − output observations since admission, sources named', () => {
    const [f] = cumulativeBalanceRule(snapshot({ measurements: [...intake12(), ...output4()] }), NOW, T);
    expect(f).toMatchObject({
      status: 'assessed',
      contextOnly: true,
      limit: 'none',
      values: { balanceMl: 8000, intakeMl: 12000, outputMl: 4000 },
    });
    expect(f!.values!['source']).toBe('intake observations − output observations');
    expect(f!.text).toContain('+8,000 mL');
    expect(f!.evidence).toHaveLength(5);
  });
  it('does not add administrations when intake observations exist', () => {
    const s = snapshot({ measurements: [...intake12(), ...output4()], fluids: [fluid('saline', 1000, 120, 60)] });
    expect(cumulativeBalanceRule(s, NOW, T)[0]!.values!['balanceMl']).toBe(8000);
  });
  it('uses administrations when no intake observation exists', () => {
    const s = snapshot({ measurements: output4(), fluids: [fluid('saline', 1000, 120, 60), fluid('balanced-crystalloid', 500, 30, 0)] });
    const f = cumulativeBalanceRule(s, NOW, T)[0]!;
    expect(f.values).toMatchObject({ intakeMl: 1500, outputMl: 4000, balanceMl: -2500 });
    expect(f.values!['source']).toBe('recorded IV administrations − output observations');
  });
  it('does not add urine when output observations exist (urine is part of the total)', () => {
    const s = snapshot({ measurements: [...intake12(), ...output4(), ...hourly('urineOutput', 50, 12)] });
    expect(cumulativeBalanceRule(s, NOW, T)[0]!.values!['outputMl']).toBe(4000);
  });
  it('falls back to urine only, and says other losses are not counted', () => {
    const s = snapshot({ measurements: [...intake12(), ...hourly('urineOutput', 100, 10)] });
    const f = cumulativeBalanceRule(s, NOW, T)[0]!;
    expect(f.values).toMatchObject({ outputMl: 1000, balanceMl: 11000, urineOnly: true });
    expect(f.text).toContain('urine only');
  });
  it('counts a shift total beside its hourly amounts once', () => {
    const shift = m('fluidIntake', 600, 0, { periodMinutes: 360 });
    const s = snapshot({ measurements: [shift, ...hourly('fluidIntake', 100, 6), ...output4()] });
    const f = cumulativeBalanceRule(s, NOW, T)[0]!;
    expect(f.values).toMatchObject({ intakeMl: 600, droppedOverlapping: 6 });
  });
  it('uses charted 24-h balances when intake and output are absent, without counting rolling totals twice', () => {
    // Rolling 24-h balances charted every 6 h: the ones at 0 and 24 h ago tile two days; the three between overlap them.
    const rolling = [0, 360, 720, 1080, 1440].map((ago) => m('fluidBalance', 1200, ago));
    const f = cumulativeBalanceRule(snapshot({ measurements: rolling }), NOW, T)[0]!;
    expect(f.values).toMatchObject({ balanceMl: 2400, source: 'charted 24-h balances' });
    expect(f.values!['droppedOverlapping']).toBe(3);
  });
  it('absent: no records → not assessed with the reason', () => {
    const f = cumulativeBalanceRule(snapshot(), NOW, T)[0]!;
    expect(f).toMatchObject({ status: 'not-assessed' });
    expect(f.reason).toContain('no intake or output');
  });
  it('intake without any output is not a balance', () => {
    const f = cumulativeBalanceRule(snapshot({ measurements: intake12() }), NOW, T)[0]!;
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toContain('no output recorded');
  });
  it('stale: charting that stopped 13 h ago does not count', () => {
    const s = snapshot({
      measurements: [m('fluidIntake', 3000, 13 * 60, { periodMinutes: 600 }), m('fluidOutput', 1000, 13 * 60, { periodMinutes: 600 })],
    });
    const f = cumulativeBalanceRule(s, NOW, T)[0]!;
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toMatch(/13 h ago/);
  });
  it('boundary: charting that ended exactly 12 h ago still counts', () => {
    const s = snapshot({
      measurements: [m('fluidIntake', 3000, 720, { periodMinutes: 600 }), m('fluidOutput', 1000, 720, { periodMinutes: 600 })],
    });
    expect(cumulativeBalanceRule(s, NOW, T)[0]!.status).toBe('assessed');
  });
  it('records before admission do not count; one spanning admission counts for its share', () => {
    const s = snapshot({
      admittedMinutesAgo: 600,
      measurements: [
        m('fluidIntake', 5000, 700, { periodMinutes: 600 }),
        m('fluidIntake', 1200, 0, { periodMinutes: 1200 }),
        m('fluidOutput', 100, 0, { periodMinutes: 60 }),
      ],
    });
    // 1200 mL over 20 h, 10 h of it after admission → 600 mL.
    expect(cumulativeBalanceRule(s, NOW, T)[0]!.values).toMatchObject({ intakeMl: 600, balanceMl: 500 });
  });
  it('without an admission time, starts at the earliest record and says so', () => {
    const s = snapshot({ admittedMinutesAgo: null, measurements: [...intake12(), ...output4()] });
    const f = cumulativeBalanceRule(s, NOW, T)[0]!;
    expect(f.values).toMatchObject({ balanceMl: 8000, startBasis: 'earliest-record' });
    expect(f.text).toContain('no admission time');
  });
  it('wrong unit: an intake in L (not the canonical mL) is not used', () => {
    const s = snapshot({ measurements: [m('fluidIntake', 4, 0, { periodMinutes: DAY, unit: 'L' }), ...output4()] });
    expect(cumulativeBalanceRule(s, NOW, T)[0]!.status).toBe('not-assessed');
  });
});

describe('tolerance.balance-24h', () => {
  it('counts only the last 24 h', () => {
    const f = balance24hRule(snapshot({ measurements: [...intake12(), ...output4()] }), NOW, T)[0]!;
    expect(f.values).toMatchObject({ intakeMl: 4000, outputMl: 2000, balanceMl: 2000 });
    expect(f.text).toContain('last 24 h');
  });
  it('a stay shorter than a day starts at admission', () => {
    const s = snapshot({ admittedMinutesAgo: 600, measurements: [...hourly('fluidIntake', 200, 10), ...hourly('fluidOutput', 50, 10)] });
    const f = balance24hRule(s, NOW, T)[0]!;
    expect(f.values).toMatchObject({ balanceMl: 1500, hoursCovered: 10 });
    expect(f.text).toContain('10 h since admission');
  });
  it('absent → not assessed', () => {
    expect(balance24hRule(snapshot(), NOW, T)[0]!.status).toBe('not-assessed');
  });
});

describe('tolerance.fluid-overload', () => {
  const weight = (kg: number, ago = 3 * DAY - 60, unit?: string) => m('bodyWeight', kg, ago, unit ? { unit } : {});
  it('adult: 12 L in, 4 L out, 70 kg → 11.4 % (Goldstein 2001 formula), severe from 10 % (Bouchard 2009)', () => {
    const f = fluidOverloadRule(snapshot({ measurements: [...intake12(), ...output4(), weight(70)] }), NOW, T)[0]!;
    expect(f.values!['fluidOverloadPercent']).toBeCloseTo(11.43, 2);
    expect(limit(f)).toBe('severe');
    expect(f.text).toMatch(/adult band/);
  });
  it('adult boundary: exactly 10 % is severe, just below limits nothing', () => {
    const s10 = snapshot({
      measurements: [m('fluidIntake', 9000, 0, { periodMinutes: DAY }), m('fluidOutput', 2000, 0, { periodMinutes: DAY }), weight(70)],
    });
    expect(limit(fluidOverloadRule(s10, NOW, T)[0]!)).toBe('severe');
    const s9 = snapshot({
      measurements: [m('fluidIntake', 8990, 0, { periodMinutes: DAY }), m('fluidOutput', 2000, 0, { periodMinutes: DAY }), weight(70)],
    });
    expect(limit(fluidOverloadRule(s9, NOW, T)[0]!)).toBe('none');
  });
  it('child (10 years): paediatric bands, 11.4 % moderate, exactly 20 % severe (Goldstein 2001; Sutherland 2010)', () => {
    const child = (ms: Parameters<typeof snapshot>[0]) => {
      const s = snapshot(ms);
      s.patient.ageYears = 10;
      return s;
    };
    const f = fluidOverloadRule(child({ measurements: [...intake12(), ...output4(), weight(70)] }), NOW, T)[0]!;
    expect(limit(f)).toBe('moderate');
    expect(f.text).toMatch(/paediatric band/);
    const s20 = child({
      measurements: [m('fluidIntake', 16000, 0, { periodMinutes: DAY }), m('fluidOutput', 2000, 0, { periodMinutes: DAY }), weight(70)],
    });
    expect(limit(fluidOverloadRule(s20, NOW, T)[0]!)).toBe('severe');
  });
  it('below 10 % limits nothing; a negative balance points for tolerance', () => {
    const s = snapshot({
      measurements: [m('fluidIntake', 2000, 0, { periodMinutes: DAY }), m('fluidOutput', 3000, 0, { periodMinutes: DAY }), weight(70)],
    });
    expect(limit(fluidOverloadRule(s, NOW, T)[0]!)).toBe('none');
  });
  it('absent weight → not assessed, balance kept in values', () => {
    const f = fluidOverloadRule(snapshot({ measurements: [...intake12(), ...output4()] }), NOW, T)[0]!;
    expect(f).toMatchObject({ status: 'not-assessed', reason: 'no admission weight recorded', values: { balanceMl: 8000 } });
  });
  it('stale: a weight from before the admission window is not the admission weight', () => {
    const f = fluidOverloadRule(snapshot({ measurements: [...intake12(), ...output4(), weight(70, 3 * DAY + 25 * 60)] }), NOW, T)[0]!;
    expect(f.status).toBe('not-assessed');
  });
  it('wrong unit: a weight in [lb_av] is not used', () => {
    const f = fluidOverloadRule(
      snapshot({ measurements: [...intake12(), ...output4(), weight(154, 3 * DAY - 60, '[lb_av]')] }),
      NOW,
      T,
    )[0]!;
    expect(f.status).toBe('not-assessed');
  });
  it('uses the earliest weight after admission, not a later heavier one', () => {
    const f = fluidOverloadRule(snapshot({ measurements: [...intake12(), ...output4(), weight(70), weight(78, 60)] }), NOW, T)[0]!;
    expect(f.values!['admissionWeightKg']).toBe(70);
  });
});

describe('tolerance.weight-gain', () => {
  const w = (kg: number, ago: number, unit?: string) => m('bodyWeight', kg, ago, unit ? { unit } : {});
  it('adult: 70 → 77.5 kg is 10.7 %, severe from 10 % (Bouchard 2009 band)', () => {
    const f = weightGainRule(snapshot({ measurements: [w(70, 3 * DAY - 30), w(77.5, 120)] }), NOW, T)[0]!;
    expect(f.values!['weightGainPercent']).toBeCloseTo(10.71, 2);
    expect(limit(f)).toBe('severe');
  });
  it('adult boundary: exactly 10 % is severe, 9.9 % limits nothing', () => {
    expect(limit(weightGainRule(snapshot({ measurements: [w(70, 3 * DAY - 30), w(77, 120)] }), NOW, T)[0]!)).toBe('severe');
    expect(limit(weightGainRule(snapshot({ measurements: [w(70, 3 * DAY - 30), w(76.9, 120)] }), NOW, T)[0]!)).toBe('none');
  });
  it('child (10 years): paediatric bands, 10.7 % moderate, 20 % severe (Selewski 2011)', () => {
    const child = (ms: Parameters<typeof snapshot>[0]) => {
      const s = snapshot(ms);
      s.patient.ageYears = 10;
      return s;
    };
    expect(limit(weightGainRule(child({ measurements: [w(70, 3 * DAY - 30), w(77.5, 120)] }), NOW, T)[0]!)).toBe('moderate');
    expect(limit(weightGainRule(child({ measurements: [w(70, 3 * DAY - 30), w(84, 120)] }), NOW, T)[0]!)).toBe('severe');
  });
  it('absent: one weight only → not assessed', () => {
    expect(weightGainRule(snapshot({ measurements: [w(70, 120)] }), NOW, T)[0]!.status).toBe('not-assessed');
    expect(weightGainRule(snapshot(), NOW, T)[0]!.reason).toBe('no admission weight recorded');
  });
  it('weights less than 12 h apart are not compared', () => {
    expect(weightGainRule(snapshot({ admittedMinutesAgo: 600, measurements: [w(70, 600), w(80, 60)] }), NOW, T)[0]!.status).toBe(
      'not-assessed',
    );
  });
  it('stale: the latest weight 3 days old does not count', () => {
    const f = weightGainRule(snapshot({ admittedMinutesAgo: 6 * DAY, measurements: [w(70, 6 * DAY), w(80, 3 * DAY)] }), NOW, T)[0]!;
    expect(f.status).toBe('not-assessed');
    expect(f.reason).toContain('48 h');
  });
  it('wrong unit: a latest weight in [lb_av] is not used', () => {
    expect(weightGainRule(snapshot({ measurements: [w(70, 3 * DAY - 30), w(170, 120, '[lb_av]')] }), NOW, T)[0]!.status).toBe(
      'not-assessed',
    );
  });
});
