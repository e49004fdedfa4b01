// Cards a prescriber can act on. Every card the service makes here passes our CDS Hooks 2.0 response check
// (schema + invariants, tests/helpers/cds-conformance.ts); every FHIR resource in a suggestion passes the registry's
// FHIR R4 validator (@medplum/core against the base StructureDefinitions) plus the status bindings it skips.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkCdsResponse } from '../helpers/cds-conformance.js';
import { statusCodeCount, validateFhir } from '../../src/fhir/validator.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { ADVICE_CASES, type AdviceCase } from '../helpers/advice-fixtures.js';
import { NOW, orderSelectRequest, orderSignRequest, patientViewRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { AUDIT_HEADERS, get, post, startService, type Running } from '../helpers/server.js';

let s: Running;
beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
});
afterAll(async () => s.stop());

const cases = Object.keys(ADVICE_CASES) as AdviceCase[];
const expected: Record<AdviceCase, { action: string; indicator: string; firstLabel: RegExp; types: string[] }> = {
  // No flow monitor on the chart: a mini fluid challenge with VTI by echo (docs/clinical-logic), following the next-test kind.
  'test-first': { action: 'test-first', indicator: 'info', firstLabel: /mini fluid challenge/i, types: ['create', 'create', 'delete'] },
  proceed: { action: 'proceed-and-reassess', indicator: 'info', firstLabel: /^Reassess 15 min after the 500 mL bolus$/, types: ['create'] },
  'smaller-aliquot': {
    action: 'smaller-aliquot',
    indicator: 'warning',
    firstLabel: /^Give 250 mL over 15 min instead of 500 mL/,
    types: ['update', 'create'],
  },
  critical: { action: 'smaller-aliquot', indicator: 'critical', firstLabel: /Give 250 mL/, types: ['update', 'create', 'delete'] },
  question: { action: 'question-bolus', indicator: 'warning', firstLabel: /ultrasound/i, types: ['create', 'delete'] },
};

/** The card's reasoning page (the service listens on port 0, so the link's origin is not its address: keep path and query). */
async function page(card: { links?: Array<{ url: string }> }, base = s.url): Promise<string> {
  const link = card.links?.find((l) => l.url.includes('/advice/'));
  expect(link, 'the card links to its reasoning page').toBeDefined();
  const u = new URL(link?.url ?? '');
  const r = await fetch(`${base}${u.pathname}${u.search}`);
  expect(r.status).toBe(200);
  return (await r.text())
    .replace(/&#39;/g, "'")
    .replace(/&amp;/g, '&')
    .replace(/&quot;/g, '"');
}

/** The non-empty lines of a card detail. */
const lines = (d: string) => d.split('\n').filter((l) => l.trim());

async function call(c: AdviceCase) {
  const r = await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES[c]) }));
  expect(r.status).toBe(200);
  const list = await get(`${s.url}/audit/advice?limit=1`, AUDIT_HEADERS);
  const rec = (await get(`${s.url}/audit/advice/${list.body.items[0].id}`, AUDIT_HEADERS)).body;
  return { body: r.body, rec };
}

describe('each advice cell gives a conformant card with real FHIR suggestions', () => {
  it('the status-binding check has the R4 code lists (so it can fail)', () => {
    expect(statusCodeCount('ServiceRequest')).toBe(7);
    expect(statusCodeCount('MedicationRequest')).toBe(8);
  });

  it.each(cases)('%s', async (c) => {
    const { body, rec } = await call(c);
    expect(checkCdsResponse(body)).toEqual([]);
    const card = body.cards[0];
    const want = expected[c];
    expect(rec.advice.recommendation.action).toBe(want.action);
    expect(card.indicator).toBe(want.indicator);
    expect(card.summary.length).toBeLessThan(140);
    expect(card.selectionBehavior).toBe('at-most-one');
    expect(card.suggestions.map((x: any) => x.actions[0].type)).toEqual(want.types);
    expect(card.suggestions[0].label).toMatch(want.firstLabel);
    expect(card.suggestions.filter((x: any) => x.isRecommended).length).toBeLessThanOrEqual(1);
    // A critical card never recommends giving (docs/clinical-logic).
    if (card.indicator === 'critical')
      expect(card.suggestions.filter((x: any) => x.isRecommended && x.actions[0].type === 'update')).toEqual([]);
    for (const sug of card.suggestions) {
      for (const a of sug.actions) {
        if (a.type === 'delete') {
          expect(a.resourceId).toBe('MedicationRequest/draft-bolus-1');
          expect(a.resource).toBeUndefined();
        } else {
          expect(validateFhir(a.resource)).toEqual([]);
        }
        if (a.type === 'update') {
          expect(a.resource.id).toBe('draft-bolus-1');
          expect(a.resource.dosageInstruction[0].doseAndRate[0].doseQuantity).toEqual({
            value: 250,
            unit: 'mL',
            system: 'http://unitsofmeasure.org',
            code: 'mL',
          });
          expect(a.resource.note.at(-1).text).toMatch(/Reassess/);
          // The aliquot keeps the ordered rate: 500 mL over 30 min → 250 mL over 15 min (docs/clinical-logic).
          expect(a.resource.dosageInstruction[0].timing.repeat).toMatchObject({ duration: 15, durationUnit: 'min' });
        }
      }
    }
    // Override reasons come from the catalogue, each with a display.
    const cat = loadCatalogue().catalogue;
    expect(card.overrideReasons.map((o: any) => o.code)).toEqual(cat.kinds.find((k) => k.id === 'bolus-review')?.overrideReasons);
  });

  it('a suggestion that would break validation is caught by the validator (the check bites)', async () => {
    const { body } = await call('smaller-aliquot');
    const res = structuredClone(body.cards[0].suggestions[0].actions[0].resource);
    res.status = 'pending';
    expect(validateFhir(res).join(' ')).toMatch(/status "pending"/);
    delete res.intent;
    expect(validateFhir(res).join(' ')).toMatch(/intent/);
  });
});

describe('the pop-up reads in seconds; its reasoning page holds the rest', () => {
  it('the pop-up: one line per question, the deciding findings with local time and age, one caution with the link', async () => {
    const { body } = await call('critical');
    const card = body.cards[0];
    const detail: string = card.detail;
    expect(detail.length).toBeLessThanOrEqual(900);
    expect(lines(detail).length).toBeLessThanOrEqual(12);
    expect(detail).toMatch(/^- \*\*Responsiveness:\*\* likely \(high confidence: a dynamic test result\)$/m);
    expect(detail).toMatch(/^- \*\*Tolerance:\*\* poor \(\d+ of \d+ markers assessed\)$/m);
    expect(detail).toMatch(/^- \*\*Perfusion:\*\* signs of hypoperfusion$/m);
    // PLR 4.0 → 4.6 L/min is +15 % (Monnet 2016 reads the relative rise), 12 min before NOW (hook-fixtures), in UTC (no zone configured).
    expect(detail).toContain('* Passive leg raise (cardiac output) +15 % (4 → 4.6 L/min), 13:48, 12 min ago');
    expect(detail).toContain('* EVLWI 14 mL/kg, 13:00, 1 h ago');
    expect(detail).toMatch(/\*Advisory only: local protocol and your own judgement come first\.\* \[Full reasoning\]\(http/);
    expect(detail).not.toMatch(/Observation\/|Not recorded|<[a-z]/i);
  });

  it('the page names each marker used (with value, time and reference), each one missing, the order and the cautions', async () => {
    const { body, rec } = await call('critical');
    const html = await page(body.cards[0]);
    expect(html).toContain('Passive leg raise (cardiac output)');
    expect(html).toContain('4 → 4.6');
    expect(html).toContain('Observation/plr-pos');
    expect(html).toContain('EVLWI');
    expect(html).toMatch(/PPV: not assessed \(none recorded\)/);
    expect(html).toMatch(/VExUS/);
    expect(html).toMatch(/500 mL/);
    expect(html).toMatch(/stays in the vessels/);
    expect(html).toContain('Advisory only');
    expect(html).toContain('local protocol prevails');
    // Every assessed finding with evidence is on the page with its reference.
    for (const f of rec.advice.findings.filter((x: any) => x.status === 'assessed' && x.topic !== 'order')) {
      for (const e of f.evidence) expect(html).toContain(e.ref);
    }
  });

  it('escapes values from FHIR so they cannot inject Markdown or HTML', async () => {
    const p = prefetchOf(ADVICE_CASES['test-first']);
    const req = orderSelectRequest({ prefetch: p });
    (req.context.draftOrders.entry[0]!.resource as any).medicationCodeableConcept.text =
      "Lactated Ringer's <img src=x onerror=alert(1)> **bold** [link](http://x)";
    const r = await post(`${s.url}/cds-services/bolus-review-select`, req);
    const detail: string = r.body.cards[0].detail;
    expect(detail).not.toContain('<img');
    expect(detail).not.toContain('**bold**');
    for (const sug of r.body.cards[0].suggestions) expect(sug.label).not.toMatch(/<img|\*\*bold|\]\(http/);
    expect(checkCdsResponse(r.body)).toEqual([]);
  });
});

describe('order-sign and patient-view cards are conformant too', () => {
  it.each(cases)('%s', async (c) => {
    const sign = await post(`${s.url}/cds-services/bolus-review-sign`, orderSignRequest(prefetchOf(ADVICE_CASES[c])));
    expect(checkCdsResponse(sign.body)).toEqual([]);
    const view = await post(`${s.url}/cds-services/fluid-overview`, patientViewRequest(prefetchOf(ADVICE_CASES[c])));
    expect(checkCdsResponse(view.body)).toEqual([]);
    expect(view.body.cards[0].summary).toMatch(/^Fluid overview/);
    expect(view.body.cards[0].suggestions).toBeUndefined();
  });
});

describe('patient-view overview', () => {
  it('gives balance and % overload, the tolerance verdict with its limits, and the latest responsiveness evidence with its age', async () => {
    const { basicResources } = await import('../helpers/hook-fixtures.js');
    const b = await import('../../examples/lib/fhir-builders.js');
    const r0 = basicResources();
    const P = 'tm-pat-ward4-017';
    const t = (m: number) => b.minutesAgo(NOW, m);
    // 12 L in, 4 L out since admission at 70 kg: Goldstein 2001 %FO = (12 − 4) / 70 × 100 = 11.4 %; ≥ 10 % in an adult is poor (Bouchard
    // 2009).
    r0['body'] = [b.numeric('wt-adm', P, 'bodyWeight', 70, t(25 * 60))];
    r0['balance'] = [
      b.numeric('in-1', P, 'fluidIntake', 12_000, t(30), { periodStart: t(25 * 60) }),
      b.numeric('out-1', P, 'fluidOutput', 4_000, t(30), { periodStart: t(25 * 60) }),
    ];
    r0['hemodynamics'] = [b.dynamicTest('plr-ov', P, 'plr', 'cardiacOutput', 4.0, 4.6, t(25))];
    const view = await post(`${s.url}/cds-services/fluid-overview`, patientViewRequest(prefetchOf(r0)));
    const card = view.body.cards[0];
    expect(checkCdsResponse(view.body)).toEqual([]);
    expect(card.summary).toMatch(/^Fluid overview: tolerance poor, overload 11\.4 %; likely fluid responsive$/);
    // The deciding findings: the leg raise with its time and age, the overload behind the poor tolerance.
    expect(card.detail).toContain('* Passive leg raise (cardiac output) +15 % (4 → 4.6 L/min), 13:35, 25 min ago');
    expect(card.detail).toMatch(/^\* Fluid overload 11\.4 %/m);
    expect(card.detail).toMatch(/^- \*\*Tolerance:\*\* poor/m);
  });
});

describe('stale data only', () => {
  it('says so in the summary instead of giving a verdict-based headline, and lists each stale marker with its age', async () => {
    // 13 h later: the vitals (window 90 min) and even the lactate (12 h, docs/clinical-logic) are stale.
    const late = await startService({}, { now: () => new Date(NOW.getTime() + 13 * 3600_000) });
    try {
      const r = await post(
        `${late.url}/cds-services/bolus-review-select`,
        orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES['test-first']) }),
      );
      const card = r.body.cards[0];
      expect(checkCdsResponse(r.body)).toEqual([]);
      expect(card.summary).toBe('No current data on the chart: re-examine and re-measure before deciding on this bolus');
      // The stale markers, each with its age, are on the reasoning page; the pop-up says nothing could be judged.
      expect(card.detail).toMatch(/^- \*\*Responsiveness:\*\* unclear$/m);
      const html = await page(card, late.url);
      expect(html).toMatch(/MAP stale \(age 13 h 10 min, window 90 min\)/);
      expect(html).not.toMatch(/MAP: MAP stale/);
    } finally {
      await late.stop();
    }
  });
});
