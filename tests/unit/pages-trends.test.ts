// The reasoning page's times (src/pages/time.ts) and trend data (src/pages/trends.ts). Outside references: the IANA
// tz database offsets (Europe/Berlin CET +01:00 in winter, CEST +02:00 in summer; America/New_York EST −05:00) as
// Intl (ICU) gives them, and sums worked by hand from the invented snapshot.
import { describe, expect, it } from 'vitest';
import { clock, clockWithAge, fullClock, zoneOffsetMs } from '../../src/pages/time.js';
import { trendsOf } from '../../src/pages/trends.js';
import { toPageView } from '../../src/pages/view.js';
import type { Finding } from '../../src/assess/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const NOW = '2026-11-20T14:00:00.000Z';

describe('site time', () => {
  it('local clock time with the age, in the configured zone, not the process zone (TZ=America/Denver here)', () => {
    expect(clockWithAge('2026-11-20T13:05:00Z', 'Europe/Berlin', '2026-11-20T13:23:00Z')).toBe('14:05, 18 min ago');
    expect(clockWithAge('2026-11-20T13:05:00Z', 'UTC', '2026-11-20T13:23:00Z')).toBe('13:05, 18 min ago');
    expect(clock('2026-11-19T22:30:00Z', 'Europe/Berlin', NOW)).toBe('19 Nov 23:30');
    expect(clock('2026-11-19T23:30:00Z', 'Europe/Berlin', NOW)).toBe('00:30');
    expect(fullClock(NOW, 'America/New_York')).toBe('Friday 20 November 2026, 09:00 (America/New_York, UTC-05:00)');
  });
  it('agrees with Intl for a spread of instants and zones', () => {
    for (const zone of ['Europe/Berlin', 'America/New_York', 'Asia/Kolkata', 'Australia/Adelaide', 'UTC']) {
      for (let t = Date.parse('2026-01-01T00:17:00Z'); t < Date.parse('2027-01-01T00:00:00Z'); t += 7 * 86_400_000 + 3_600_000) {
        const iso = new Date(t).toISOString();
        const want = new Intl.DateTimeFormat('en-GB', { timeZone: zone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(t);
        expect(clock(iso, zone, iso), `${zone} ${iso}`).toBe(want);
      }
    }
  });
  it('zone offsets (IANA tz): Berlin +1 h in winter, +2 h in summer; New York −5 h in November', () => {
    expect(zoneOffsetMs(Date.parse('2026-11-20T12:00:00Z'), 'Europe/Berlin')).toBe(3_600_000);
    expect(zoneOffsetMs(Date.parse('2026-07-20T12:00:00Z'), 'Europe/Berlin')).toBe(7_200_000);
    expect(zoneOffsetMs(Date.parse('2026-11-20T12:00:00Z'), 'America/New_York')).toBe(-5 * 3_600_000);
    expect(zoneOffsetMs(Date.parse('2026-11-20T12:00:00Z'), 'Asia/Kolkata')).toBe(5.5 * 3_600_000);
  });
});

describe('trendsOf', () => {
  const base = () =>
    new SnapshotBuilder({ now: NOW })
      .measure('meanBp', 64, { ageMin: 30 })
      .measure('meanBp', 60, { ageMin: 90 })
      .measure('heartRate', 110, { ageMin: 30 })
      .measure('urineOutput', 30, { ageMin: 0, periodStartAgeMin: 60 })
      .measure('urineOutput', 20, { ageMin: 60, periodStartAgeMin: 90 })
      .measure('ppv', 14, { ageMin: 20 })
      .dynamicTest('plr', 'cardiacOutput', 4.0, 4.6, { ageMin: 15 })
      .dynamicTest('tidalVolumeChallenge', 'ppv', 8, 12.5, { ageMin: 10 })
      .fluid({ volumeMl: 500, startAgeMin: 180, endAgeMin: 150 })
      .draftOrder({
        ref: 'draftOrders#MedicationRequest/d1',
        resourceType: 'MedicationRequest',
        id: 'd1',
        selected: true,
        isFluid: true,
        volumeMl: 250,
        resource: {},
      });

  it('a 12 h window when nothing is older, 24 h when something is; nothing older than 24 h', () => {
    expect(trendsOf(base().build(), NOW).hours).toBe(12);
    const t = trendsOf(
      base()
        .measure('meanBp', 70, { ageMin: 13 * 60 })
        .measure('meanBp', 75, { ageMin: 30 * 60 })
        .build(),
      NOW,
    );
    expect(t.hours).toBe(24);
    expect(t.from).toBe('2026-11-19T14:00:00.000Z');
    expect(t.to).toBe('2026-11-20T14:30:00.000Z');
    expect(
      t.plots
        .find((p) => p.id === 'map-hr')!
        .rows.filter((r) => r.series === 'MAP')
        .map((r) => r.value),
    ).toEqual([70, 60, 64]);
  });
  it('urine per hour is volume over the period (30 mL in 60 min = 30 mL/h; 20 mL in 30 min = 40 mL/h)', () => {
    const rows = trendsOf(base().build(), NOW)
      .plots.find((p) => p.id === 'urine-balance')!
      .rows.filter((r) => r.series === 'Urine output');
    expect(rows.map((r) => [r.value, r.unit])).toEqual([
      [40, 'mL/h'],
      [30, 'mL/h'],
    ]);
  });
  it('the cumulative balance ends at 500 mL given − 50 mL urine = 450 mL (administrations − urine only)', () => {
    const rows = trendsOf(base().build(), NOW)
      .plots.find((p) => p.id === 'urine-balance')!
      .rows.filter((r) => r.series === 'Cumulative balance');
    expect(rows.at(-1)).toMatchObject({ t: NOW, value: 450, unit: 'mL' });
    expect(rows.at(-1)!.note).toMatch(/urine output only/);
  });
  it('fluids as bars over their period, the draft bolus at now, a leg raise as its % change (4.0 → 4.6 = +15 %), a tidal volume challenge in points (8 → 12.5 = +4.5), PPV as a point', () => {
    const t = trendsOf(base().build(), NOW);
    const fluids = t.plots.find((p) => p.id === 'fluids')!.rows;
    expect(fluids.map((r) => [r.series, r.value, r.mark])).toEqual([
      ['Fluid given', 500, 'bar'],
      ['Draft bolus (now)', 250, 'draft'],
    ]);
    expect(fluids[0]!.t0).toBe('2026-11-20T11:00:00.000Z');
    expect(fluids[1]!.t).toBe(NOW);
    const dyn = t.plots.find((p) => p.id === 'dynamic')!.rows;
    expect(dyn.map((r) => [r.series, r.value, r.unit])).toEqual([
      ['PPV', 14, '%'],
      ['Dynamic test', 15, '% change'],
      ['Dynamic test', 4.5, 'points change'],
    ]);
  });
});

describe('toPageView', () => {
  const words = loadCatalogue().catalogue;
  it('reads verdicts (catalogue words), confidence, coverage, gaps by their code and the order findings from a record', () => {
    const snapshot = new SnapshotBuilder({ now: NOW })
      .exclude({ ref: 'Observation/x', reason: 'unknown-unit', detail: 'unit "mmhg" not known', kind: 'cvp' })
      .build();
    const findings = [
      { ruleId: 'r.a', topic: 'responsiveness', marker: 'ppv', tier: 'dynamic', status: 'assessed', text: 'PPV 14 %', evidence: [] },
      {
        ruleId: 'r.b',
        topic: 'responsiveness',
        marker: 'plr',
        status: 'not-assessed',
        gap: 'missing',
        text: 'PLR',
        reason: 'no leg raise recorded',
        evidence: [],
      },
      {
        ruleId: 'r.c',
        topic: 'responsiveness',
        marker: 'cvp',
        status: 'not-assessed',
        gap: 'stale',
        text: 'CVP',
        reason: 'CVP stale (age 300 min, window 120 min)',
        evidence: [],
      },
      {
        ruleId: 'r.d',
        topic: 'responsiveness',
        marker: 'svv',
        status: 'not-assessed',
        gap: 'confounded',
        text: 'SVV',
        reason: 'vasopressor changed',
        evidence: [],
      },
      { ruleId: 'o.v', topic: 'order', part: 'volume', status: 'assessed', text: 'Ordered 500 mL', evidence: [] },
    ] satisfies Finding[];
    const v = toPageView({
      record: {
        id: 'a',
        recordedAt: NOW,
        service: 's',
        hook: 'order-select',
        hookInstance: 'h',
        outcome: 'answered',
        rulesVersion: 'v1',
        snapshot,
        findings,
        advice: {
          rulesVersion: 'v1',
          now: NOW,
          findings,
          ruleErrors: [],
          responsiveness: { value: 'likely', rationale: 'PPV high', decidingRules: ['r.a'], confidence: 'moderate' },
          tolerance: { value: 'not-known', rationale: 'too little data', decidingRules: [], coverage: { assessed: 1, total: 9 } },
        },
        cards: [],
        cardKinds: {},
        gathering: [],
        timings: { totalMs: 0, gatherMs: 0, fhirWaitMs: 0, assessMs: 0 },
      },
      words,
      cautions: ['c'],
      running: { rulesVersion: 'v2', thresholds: {} },
    });
    expect(v.verdicts.map((d) => [d.key, d.value, d.coverage, d.confidence])).toEqual([
      ['responsiveness', 'Likely fluid responsive', '1 of 4 findings assessed', words.phrases.confidence.moderate],
      ['tolerance', 'Tolerance not known', '1 of 9 markers assessed', undefined],
    ]);
    expect(v.gaps.map((g) => [g.kind, g.why])).toEqual([
      ['missing', 'no leg raise recorded'],
      ['stale', 'CVP stale (age 300 min, window 120 min)'],
      ['set aside', 'confounded: vasopressor changed'],
      ['set aside', 'unknown-unit: unit "mmhg" not known'],
    ]);
    expect(v.findings.find((f) => f.ruleId === 'r.a')?.tier).toBe('dynamic');
    expect(v.order.map((f) => f.text)).toEqual(['Ordered 500 mL']);
    expect(v.thresholds).toBeUndefined(); // another rules version than the running one
  });
});
