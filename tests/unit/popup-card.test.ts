// The pop-up card (issue 16 §1): what its detail says, the gap line and the recommended test from the counterfactual
// engine's result (hand-built `whatIf` values here: the engine itself is tested in its own room), the fallback to the
// next-test kind when it did not run, times in the site's zone, and the suggestions' FHIR content.
import { describe, expect, it } from 'vitest';
import type { FhirResource, ServiceRequest } from 'fhir/r4.js';
import * as b from '../../examples/lib/fhir-builders.js';
import type { Advice, Finding } from '../../src/assess/types.js';
import type { WhatIf } from '../../src/assess/what-if/types.js';
import { TIDEMARK_MARKERS } from '../../src/fhir/codes.js';
import type { Suggestion } from '../../src/hooks/schemas.js';
import { TIDEMARK_PROCEDURES } from '../../src/cards/suggestions.js';
import { ADVICE_CASES, type AdviceCase } from '../helpers/advice-fixtures.js';
import { cardsOf, catalogue } from '../helpers/card-pipeline.js';
import { allResources, bolusDraft, EID, NOW, PID } from '../helpers/hook-fixtures.js';

const run = (
  c: AdviceCase,
  extra: { edit?: (a: Advice) => Advice; timeZone?: string; resources?: FhirResource[]; hook?: 'order-select' | 'patient-view' } = {},
) =>
  cardsOf({
    resources: extra.resources ?? allResources(ADVICE_CASES[c] as Record<string, FhirResource[]>),
    patientId: PID,
    encounterId: EID,
    draftOrders: [bolusDraft()],
    now: NOW,
    hook: extra.hook ?? 'order-select',
    ...(extra.edit ? { edit: extra.edit } : {}),
    ...(extra.timeZone ? { timeZone: extra.timeZone } : {}),
  });
const lines = (d = '') => d.split('\n').filter((l) => l.trim());
const srOf = (s: Suggestion) => s.actions?.[0]?.resource as ServiceRequest;

/** The leg raise decides: positive → give and reassess, negative → reconsider the bolus; the tidal volume challenge is not feasible. */
const PLR_DECIDES: WhatIf = {
  rows: [
    {
      test: 'passive-leg-raise',
      feasible: true,
      notFeasible: [],
      outcomes: [
        {
          result: 'positive',
          assumed: { measured: 'cardiacOutput', changePercent: 11, unit: '%' },
          responsiveness: 'likely',
          action: 'proceed-and-reassess',
          headline: 'likely/adequate',
          changes: true,
        },
        {
          result: 'negative',
          assumed: { measured: 'cardiacOutput', changePercent: 9, unit: '%' },
          responsiveness: 'unlikely',
          action: 'question-bolus',
          headline: 'unlikely/adequate',
          changes: true,
        },
      ],
    },
    { test: 'tidal-volume-challenge', feasible: false, notFeasible: ['not-ventilated', 'no-arterial-line'], outcomes: [] },
  ],
  decisive: 'passive-leg-raise',
};
const NONE_DECIDES: WhatIf = { rows: PLR_DECIDES.rows.map((r) => ({ ...r, outcomes: r.outcomes.map((o) => ({ ...o, changes: false })) })) };

describe('the gap line and the recommended test come from advice.whatIf', () => {
  it('decisive leg raise: the line says what each result would lead to, and the leg raise is the one recommended suggestion', () => {
    const { cards, advice } = run('test-first', { edit: (a) => ({ ...a, whatIf: PLR_DECIDES }) });
    expect(advice.recommendation?.action).toBe('test-first');
    // The next-test kind alone would have named the mini fluid challenge (no flow monitor): the engine's answer wins.
    expect(advice.recommendation?.nextTest).toBe('mini-fluid-challenge');
    const card = cards[0]!;
    expect(card.detail).toContain(
      'A passive leg raise with cardiac output would decide it: a rise ≥ 10 % → give and reassess; less → reconsider the bolus.',
    );
    const rec = card.suggestions?.filter((s) => s.isRecommended) ?? [];
    expect(rec).toHaveLength(1);
    expect(rec[0]?.label).toBe('Passive leg raise with cardiac output before the 500 mL');
    expect(srOf(rec[0]!).code?.coding?.[0]).toMatchObject({ system: TIDEMARK_MARKERS, code: 'passive-leg-raise' });
  });

  it('a result that would leave the advice at "test first" is said as the verdict, not as another test', () => {
    const stillUnclear: WhatIf = {
      ...PLR_DECIDES,
      rows: PLR_DECIDES.rows.map((r) => ({
        ...r,
        outcomes: r.outcomes.map((o) =>
          o.result === 'negative' ? { ...o, responsiveness: 'indeterminate' as const, action: 'test-first' as const } : o,
        ),
      })),
    };
    const { cards } = run('test-first', { edit: (a) => ({ ...a, whatIf: stillUnclear }) });
    expect(cards[0]?.detail).toContain('a rise ≥ 10 % → give and reassess; less → still unclear.');
    expect(cards[0]?.detail).not.toContain('test before any volume');
  });

  it('when both results lead to the same step, the line says only that the test would settle the verdict', () => {
    const same: WhatIf = {
      ...PLR_DECIDES,
      rows: PLR_DECIDES.rows.map((r) => ({
        ...r,
        outcomes: r.outcomes.map((o) => ({ ...o, action: 'resuscitate-and-reassess' as const })),
      })),
    };
    const { cards } = run('test-first', { edit: (a) => ({ ...a, whatIf: same }) });
    expect(cards[0]?.detail).toContain('A passive leg raise with cardiac output would settle or confirm it.');
    expect(cards[0]?.detail).not.toMatch(/→ give in steps.*→ give in steps/);
  });

  it('when no test would change the advice: no gap line, and the next-test kind is not used instead', () => {
    const { cards } = run('test-first', { edit: (a) => ({ ...a, whatIf: NONE_DECIDES }) });
    expect(cards[0]?.detail).not.toMatch(/would (decide|settle)/);
  });

  it("without whatIf (the engine did not run): the verdict's next-test kind, never words matched in prose", () => {
    const { cards, advice } = run('test-first', {
      edit: (a) => {
        const { whatIf: _w, ...rest } = a;
        return rest;
      },
    });
    expect(advice.whatIf).toBeUndefined();
    expect(cards[0]?.detail).toContain('A mini fluid challenge with VTI would settle or confirm it.');
    expect(cards[0]?.suggestions?.find((s) => s.isRecommended)?.label).toMatch(/^Mini fluid challenge: 100 mL over 1 min with VTI/);
  });

  it('on a critical card the decisive test is recommended, never the smaller aliquot (a "give")', () => {
    const whatIf: WhatIf = {
      ...PLR_DECIDES,
      rows: [{ ...PLR_DECIDES.rows[0]!, test: 'mini-fluid-challenge' }],
      decisive: 'mini-fluid-challenge',
    };
    const { cards } = run('critical', { edit: (a) => ({ ...a, whatIf }) });
    const card = cards[0]!;
    expect(card.indicator).toBe('critical');
    const rec = card.suggestions?.filter((s) => s.isRecommended) ?? [];
    expect(rec.map((s) => s.actions?.[0]?.type)).toEqual(['create']);
    expect(rec[0]?.label).toMatch(/^Mini fluid challenge/);
    expect(card.suggestions?.find((s) => s.actions?.[0]?.type === 'update')?.isRecommended).toBeUndefined();
  });
});

describe('the detail', () => {
  it.each(Object.keys(ADVICE_CASES) as AdviceCase[])(
    '%s: within 900 characters and 12 lines, no FHIR id, no code, one caution with the link',
    (c) => {
      for (const hook of ['order-select', 'patient-view'] as const) {
        const { cards, advice } = run(c, { hook, edit: (a) => ({ ...a, whatIf: PLR_DECIDES }) });
        const d = cards[0]?.detail ?? '';
        expect(d.length).toBeLessThanOrEqual(900);
        expect(lines(d).length).toBeLessThanOrEqual(12);
        expect(d).not.toMatch(/(Observation|Patient|Encounter|MedicationRequest)\//);
        for (const f of advice.findings) expect(d).not.toContain(f.ruleId);
        expect(d).not.toMatch(/likely\/|not-known|controlled-no-effort|passive-leg-raise|mini-fluid-challenge/);
        expect(d.match(/Advisory only/g)).toHaveLength(1);
        expect(lines(d).at(-1)).toBe(
          '*Advisory only: local protocol and your own judgement come first.* [Full reasoning](https://tidemark.example.test/advice/adv-1?exp=1&sig=abc)',
        );
        // No word said twice in a row ("Tolerance poor: Poor tolerance:").
        expect(d).not.toMatch(/\b(\w{4,})\b[^\n]{0,20}\b\1\b/i);
      }
    },
  );

  it('times are local clock times in the configured zone, with the age (TIDEMARK_TIME_ZONE)', () => {
    // The leg raise is 12 min before NOW (14:00Z): 13:48 in UTC, 14:48 in Berlin (UTC+1 in November), 06:48 in Denver (UTC−7).
    expect(run('proceed').cards[0]?.detail).toContain('+15 % (4 → 4.6 L/min), 13:48, 12 min ago');
    expect(run('proceed', { timeZone: 'Europe/Berlin' }).cards[0]?.detail).toContain('+15 % (4 → 4.6 L/min), 14:48, 12 min ago');
    expect(run('proceed', { timeZone: 'America/Denver' }).cards[0]?.detail).toContain('+15 % (4 → 4.6 L/min), 06:48, 12 min ago');
  });

  it('says when a time it shows was assumed (a date-only weight)', () => {
    const r = ADVICE_CASES.proceed as Record<string, FhirResource[]>;
    const resources = [...allResources({ ...r, body: [] }), b.numeric('wt-day', PID, 'bodyWeight', 72, '2026-11-19')];
    const { cards } = run('proceed', {
      resources,
      edit: (a) => {
        const ev = {
          ref: 'Observation/wt-day',
          kind: 'bodyWeight',
          value: 72,
          unit: 'kg',
          effective: '2026-11-19T00:00:00.000Z',
          ageMinutes: 38 * 60,
        };
        const f: Finding = {
          ruleId: 'test.weight',
          topic: 'tolerance',
          status: 'assessed',
          text: 'Weight 72 kg',
          evidence: [ev],
          domain: 'balance',
          limit: 'severe',
          harmSign: false,
          contextOnly: false,
        };
        return {
          ...a,
          findings: [...a.findings, f],
          ...(a.tolerance ? { tolerance: { ...a.tolerance, decidingRules: ['test.weight', ...a.tolerance.decidingRules] } } : {}),
        };
      },
    });
    expect(cards[0]?.detail).toContain('* Weight 72 kg, 19 Nov, date only, time assumed');
  });

  it("the questions are said once each, in the catalogue's words", () => {
    const d = run('critical').cards[0]?.detail ?? '';
    expect(lines(d).slice(0, 3)).toEqual([
      `- **Responsiveness:** likely (${catalogue.popup.confidence.high})`,
      expect.stringMatching(/^- \*\*Tolerance:\*\* poor \(\d+ of \d+ markers assessed\)$/),
      '- **Perfusion:** signs of hypoperfusion',
    ]);
  });

  it('the advice-not-available card obeys the same limits and says what could not be read', () => {
    const { cards } = cardsOf({
      resources: [],
      patientId: PID,
      draftOrders: [bolusDraft()],
      now: NOW,
      gathering: [
        { key: 'vitals', source: 'fhir-server', status: 'timeout' },
        { key: 'labs', source: 'fhir-server', status: 'timeout' },
      ] as never,
    });
    const d = cards[0]?.detail ?? '';
    expect(cards[0]?.summary).toMatch(/^Fluid advice not available/);
    expect(lines(d)).toEqual([
      'Could not be assessed: the FHIR server did not answer within the time budget.',
      'Not read: vital signs, laboratory results.',
      '*Advisory only: local protocol and your own judgement come first.* [Full reasoning](https://tidemark.example.test/advice/adv-1?exp=1&sig=abc)',
    ]);
  });
});

describe('suggestions', () => {
  const at = (min: number) => new Date(NOW.getTime() + min * 60_000).toISOString();

  it('a reassessment is requested for when the bolus has run plus 15 min; a test for now, before any volume', () => {
    // proceed: 500 mL over 30 min (hook-fixtures bolusDraft) → reassess at now + 30 + 15 min.
    const sug = run('proceed', { edit: (a) => ({ ...a, whatIf: PLR_DECIDES }) }).cards[0]?.suggestions ?? [];
    const reassess = sug.find((s) => srOf(s).code?.coding?.[0]?.code === 'reassess-after-bolus');
    expect(reassess?.label).toBe('Reassess 15 min after the 500 mL bolus');
    expect(srOf(reassess!)).toMatchObject({
      occurrenceDateTime: at(45),
      authoredOn: NOW.toISOString(),
      status: 'draft',
      intent: 'proposal',
    });
    expect(srOf(reassess!).code?.coding?.[0]).toMatchObject({
      system: TIDEMARK_PROCEDURES,
      display: expect.stringMatching(/^Reassess fluid response/),
    });
    const plr = sug.find((s) => srOf(s).code?.coding?.[0]?.code === 'passive-leg-raise');
    expect(srOf(plr!).occurrenceDateTime).toBe(NOW.toISOString());
  });

  it('after a smaller aliquot (250 mL over 15 min) the reassessment is at now + 15 + 15 min', () => {
    const sug = run('smaller-aliquot').cards[0]?.suggestions ?? [];
    expect(sug[0]?.label).toBe('Give 250 mL over 15 min instead of 500 mL, then reassess');
    expect(sug[1]?.label).toBe('Reassess 15 min after the 250 mL bolus');
    expect(srOf(sug[1]!).occurrenceDateTime).toBe(at(30));
  });

  it('bedside ultrasound carries the SNOMED CT code for ultrasonography with its display, and the views in its text', () => {
    const sug = run('question').cards[0]?.suggestions ?? [];
    const us = srOf(sug[0]!);
    expect(sug[0]?.label).toBe('Bedside ultrasound (heart, IVC, lungs) before the 500 mL');
    // SNOMED CT International Edition: 16310003 |Ultrasonography (procedure)|, preferred term "Ultrasonography".
    expect(us.code?.coding).toEqual([{ system: 'http://snomed.info/sct', code: '16310003', display: 'Ultrasonography' }]);
    expect(us.code?.text).toMatch(/ventricular function, IVC, lung B-lines/);
    expect(sug[1]).toMatchObject({
      label: 'Withdraw the 500 mL bolus order',
      actions: [{ type: 'delete', resourceId: 'MedicationRequest/draft-bolus-1' }],
    });
  });

  it('at most one suggestion is recommended on every card', () => {
    for (const c of Object.keys(ADVICE_CASES) as AdviceCase[]) {
      for (const whatIf of [PLR_DECIDES, NONE_DECIDES, undefined]) {
        const sug = run(c, { edit: (a) => ({ ...a, ...(whatIf ? { whatIf } : {}) }) }).cards[0]?.suggestions ?? [];
        expect(sug.filter((s) => s.isRecommended).length, c).toBeLessThanOrEqual(1);
      }
    }
  });
});
