/**
 * Truth tables for the need (perfusion) signs, the need verdict and the phase (docs/clinical-logic/index.md,
 * "Responsiveness is not an indication" and "Phases of fluid therapy"). Each sign: present, absent, stale, boundary.
 * MAP < 65 mmHg (SSC 2021), lactate > 2 mmol/L (Sepsis-3), capillary refill > 3 s (ANDROMEDA-SHOCK), urine output
 * < 0.5 mL/kg/h over 6 h (KDIGO 2012), rising vasoactive support; shock index as context only.
 */
import { describe, expect, it } from 'vitest';
import type { PerfusionFinding } from '../../src/assess/common/finding.js';
import { assessNeed } from '../../src/assess/need/index.js';
import { assessResponsiveness } from '../../src/assess/responsiveness/index.js';
import { needContext, responsivenessContext } from '../helpers/rule-context.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const run = (b: SnapshotBuilder) => assessNeed(needContext(b));
function sign(b: SnapshotBuilder, id: string): PerfusionFinding {
  const f = run(b).findings.find((x) => x.ruleId === id);
  if (!f || f.topic !== 'perfusion') throw new Error(`no finding ${id}`);
  return f;
}
const NOW = new SnapshotBuilder().now;

describe('MAP against the 65 mmHg target (SSC 2021)', () => {
  const map = (b: SnapshotBuilder) => sign(b, 'perfusion.map');
  it('measured 64 → sign; 65 → not (boundary: below means < 65)', () => {
    expect(map(new SnapshotBuilder().measure('meanBp', 64, { ageMin: 5 })).hypoperfusion).toBe(true);
    expect(map(new SnapshotBuilder().measure('meanBp', 65, { ageMin: 5 })).hypoperfusion).toBe(false);
  });
  it('computed from SBP/DBP 120/60 = 80 when no measured MAP (DBP + (SBP − DBP)/3)', () => {
    const f = map(new SnapshotBuilder().vitals({ sbp: 120, dbp: 60 }, { ageMin: 5 }));
    expect(f.values).toMatchObject({ mapMmHg: 80, measured: false });
  });
  it('fresh up to 90 min (docs/clinical-logic: hourly vitals validated late), stale after; absent', () => {
    expect(map(new SnapshotBuilder().measure('meanBp', 60, { ageMin: 90 })).status).toBe('assessed');
    expect(map(new SnapshotBuilder().measure('meanBp', 60, { ageMin: 91 }))).toMatchObject({
      gap: 'stale',
      reason: 'MAP stale (age 91 min, window 90 min)',
    });
    expect(map(new SnapshotBuilder()).gap).toBe('missing');
  });
});

describe('lactate (Sepsis-3: > 2 mmol/L), context up to 12 h with its age', () => {
  const lac = (v: number, ageMin = 30) => sign(new SnapshotBuilder().measure('lactate', v, { ageMin }), 'perfusion.lactate');
  it.each([
    [1.5, false],
    [2, false],
    [2.1, true],
    [6, true],
  ] as const)('lactate %s → sign %s', (v, s) => {
    expect(lac(v).hypoperfusion).toBe(s);
  });
  it('fresh up to 720 min with the age in the text, stale after', () => {
    expect(lac(3, 720).text).toMatch(/12 h old/);
    expect(lac(3, 721).gap).toBe('stale');
  });
});

describe('capillary refill (ANDROMEDA-SHOCK: > 3 s abnormal)', () => {
  const crt = (v: number, ageMin = 10) =>
    sign(new SnapshotBuilder().measure('capillaryRefill', v, { ageMin }), 'perfusion.capillary-refill');
  it.each([
    [2, false],
    [3, false],
    [3.1, true],
    [6, true],
  ] as const)('CRT %s s → sign %s', (v, s) => {
    expect(crt(v).hypoperfusion).toBe(s);
  });
  it('fresh up to 120 min (docs/clinical-logic), stale after', () => {
    expect(crt(4, 120).status).toBe('assessed');
    expect(crt(4, 121).gap).toBe('stale');
  });
});

describe('urine output (KDIGO 2012: < 0.5 mL/kg/h over 6 h)', () => {
  /** Hourly urine amounts for 7 h, 70 kg. */
  const urine = (mlPerHour: number, lastAgeMin = 30) => {
    const b = new SnapshotBuilder().measure('bodyWeight', 70, { ageMin: 600 });
    for (let h = 0; h < 7; h++) b.measure('urineOutput', mlPerHour, { ageMin: lastAgeMin + h * 60 });
    return sign(b, 'perfusion.urine-output');
  };
  it('70 kg, 30 mL/h = 0.43 mL/kg/h → sign; 35 mL/h = 0.5 → not (strictly below)', () => {
    expect(urine(30)).toMatchObject({ hypoperfusion: true });
    expect(urine(35).hypoperfusion).toBe(false);
  });
  it('the latest record more than 180 min ago → stale', () => {
    expect(urine(30, 181).gap).toBe('stale');
  });
  it('fewer than 6 h charted → not assessed', () => {
    const b = new SnapshotBuilder()
      .measure('bodyWeight', 70, { ageMin: 600 })
      .measure('urineOutput', 20, { ageMin: 90 })
      .measure('urineOutput', 20, { ageMin: 30 });
    expect(sign(b, 'perfusion.urine-output').gap).toBe('too-few-readings');
  });
});

describe('rising vasoactive support', () => {
  it('started within 120 min → sign; raised in rate → sign; lowered or unchanged → not', () => {
    expect(
      sign(
        new SnapshotBuilder().vasoactive({ drug: 'norepinephrine', startAgeMin: 60, rate: { value: 0.1, unit: 'ug/kg/min' } }),
        'perfusion.vasopressor',
      ).hypoperfusion,
    ).toBe(true);
    const change = (from: number, to: number) =>
      sign(
        new SnapshotBuilder()
          .vasoactive({ drug: 'norepinephrine', startAgeMin: 300, endAgeMin: 30, rate: { value: from, unit: 'ug/kg/min' } })
          .vasoactive({ drug: 'norepinephrine', startAgeMin: 30, rate: { value: to, unit: 'ug/kg/min' } }),
        'perfusion.vasopressor',
      ).hypoperfusion;
    expect(change(0.1, 0.2)).toBe(true);
    expect(change(0.2, 0.1)).toBe(false);
    expect(
      sign(
        new SnapshotBuilder().vasoactive({ drug: 'norepinephrine', startAgeMin: 121, rate: { value: 0.1, unit: 'ug/kg/min' } }),
        'perfusion.vasopressor',
      ).hypoperfusion,
    ).toBe(false);
  });
});

describe('shock index: context only (Koch 2019: > 1.0)', () => {
  it('110/100 = 1.1 shown, never counted as a sign', () => {
    const b = new SnapshotBuilder().vitals({ hr: 110, sbp: 100, map: 75 }, { ageMin: 5 }).measure('lactate', 1.2, { ageMin: 60 });
    expect(sign(b, 'perfusion.shock-index')).toMatchObject({ contextOnly: true, values: { shockIndex: 1.1 } });
    expect(run(b).need.value).toBe('absent');
  });
});

describe('need verdict', () => {
  it('present when any counted sign shows hypoperfusion', () => {
    expect(run(new SnapshotBuilder().measure('meanBp', 60, { ageMin: 5 })).need.value).toBe('present');
  });
  it('absent needs a current MAP and a tissue marker (lactate, capillary refill or urine output)', () => {
    expect(run(new SnapshotBuilder().measure('meanBp', 75, { ageMin: 5 }).measure('capillaryRefill', 2, { ageMin: 30 })).need.value).toBe(
      'absent',
    );
    expect(run(new SnapshotBuilder().measure('meanBp', 75, { ageMin: 5 })).need.value).toBe('unknown');
    expect(run(new SnapshotBuilder().measure('capillaryRefill', 2, { ageMin: 30 })).need.value).toBe('unknown');
  });
  it('context markers never decide responsiveness', () => {
    const b = new SnapshotBuilder().vitals({ hr: 130, sbp: 80, dbp: 40, map: 52 }, { ageMin: 5 }).measure('lactate', 6, { ageMin: 20 });
    expect(assessResponsiveness(responsivenessContext(b)).verdict.value).toBe('indeterminate');
  });
});

describe('phase of fluid therapy (SSC 2021; Malbrain 2018)', () => {
  const septic = (admittedMinAgo: number, givenMl: number) => {
    const b = new SnapshotBuilder({ encounterRef: 'Encounter/e1' })
      .measure('bodyWeight', 70, { ageMin: admittedMinAgo })
      .measure('meanBp', 58, { ageMin: 5 });
    const s = b.build();
    s.encounter = { ref: 'Encounter/e1', start: new Date(NOW.getTime() - admittedMinAgo * 60_000).toISOString() };
    if (givenMl) b.fluid({ volumeMl: givenMl, startAgeMin: Math.min(admittedMinAgo - 1, 50), endAgeMin: Math.min(admittedMinAgo - 2, 30) });
    const built = b.build();
    built.encounter = s.encounter;
    return built;
  };
  const phaseOf = (s: ReturnType<typeof septic>) => assessNeed({ ...needContext(new SnapshotBuilder()), snapshot: s }).phase?.value;
  it('hypotension 1 h after admission with 500 mL of 2,100 mL (30 mL/kg × 70 kg) given → early resuscitation', () => {
    expect(phaseOf(septic(60, 500))).toBe('early-resuscitation');
  });
  it('30 mL/kg reached (2,100 mL for 70 kg) → later', () => {
    expect(phaseOf(septic(120, 2100))).toBe('later');
  });
  it('more than 6 h after the onset → later', () => {
    expect(phaseOf(septic(361, 0))).toBe('later');
  });
  it('no hypotension and lactate below 4 → later', () => {
    const s = septic(60, 0);
    s.measurements = s.measurements.map((m) => (m.kind === 'meanBp' ? { ...m, value: 72 } : m));
    expect(phaseOf(s)).toBe('later');
  });
});

describe('echo impression of LV function (context)', () => {
  it.each(['hyperdynamic', 'normal', 'reduced', 'severely-reduced'])('%s → context, neutral', (answer) => {
    const b = new SnapshotBuilder().coded('lvFunction', answer, { ageMin: 60 });
    const f = assessResponsiveness(responsivenessContext(b)).findings.find((x) => x.ruleId === 'responsiveness.lv-function');
    expect(f).toMatchObject({ status: 'assessed', tier: 'context', direction: 'neutral' });
  });
});
