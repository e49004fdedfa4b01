// Hostile client text ends up inert on the card (issue 16 §1): FHIR displays (a fluid given, the draft order),
// units, and what a FHIR server's OperationOutcome said, carrying links, images, raw HTML, headings, lists and
// quotes at the start of a line, autolinks and bidirectional controls (Unicode UAX #9). Each card is rendered with
// markdown-it (CommonMark 0.31 with GFM tables and strikethrough, raw HTML on, linkify on: the most a client's
// renderer could do) and the HTML checked: only our own structure (paragraphs, our two lists, the bold labels,
// the caution in italics and the one link to the reasoning page), no element a client's text made.
import fc from 'fast-check';
import MarkdownIt from 'markdown-it';
import type { FhirResource, MedicationAdministration, MedicationRequest } from 'fhir/r4.js';
import { describe, expect, it } from 'vitest';
import { SCENARIOS } from '../../examples/scenarios/index.js';
import { renderCard } from '../../src/cards/render.js';
import type { Card } from '../../src/hooks/schemas.js';
import { ADVICE_URL, cardsOf, catalogue, PUBLIC_URL } from '../helpers/card-pipeline.js';

const markdown = new MarkdownIt({ html: true, linkify: true });
const BIDI = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/;
const ALLOWED = new Set(['p', 'ul', 'li', 'strong', 'em', 'a']);

const attack = fc.constantFrom(
  '[click](javascript:alert(1))',
  '![x](http://evil.example/p.png)',
  '<img src=x onerror=alert(1)>',
  '<script>alert(1)</script>',
  '<b>bold</b>',
  '\n# Heading',
  '\n- item',
  '\n+ item',
  '\n1. item',
  '\n> quote',
  '\n---',
  '\n===',
  '# ',
  '- ',
  '1) ',
  '> ',
  'http://evil.example/x',
  'www.evil.example',
  'evil.example',
  'mailto:a@b.example',
  'a@b.example',
  '<http://evil.example>',
  '\u202E',
  '\u2066',
  '\u2069',
  '\u200F',
  '\u061C',
  '\u202A',
  '\t',
  '\r\n',
  '**',
  '__',
  '`code`',
  '~~del~~',
  '| a | b |',
  '&lt;',
  '&#60;',
  '\\',
  'a',
  ' ',
  '500 mL',
);
const hostile = fc.oneof(
  fc.array(attack, { minLength: 1, maxLength: 12 }).map((a) => a.join('')),
  fc.string({ unit: 'grapheme', maxLength: 60 }),
);

/** Checks one card: summary and labels plain text, detail only our own Markdown structure, the limits kept. */
function inert(card: Card): void {
  for (const text of [card.summary, ...(card.suggestions ?? []).map((s) => s.label)]) {
    expect(text).not.toMatch(BIDI);
    expect(text).not.toMatch(/[<>]/);
    expect(markdown.renderInline(text)).not.toMatch(/<(?!\/?(em|strong)>)/); // no element but what `*`…`*` could make, and those are escaped:
    expect(markdown.renderInline(text)).not.toMatch(/<(em|strong|a|img)\b/);
  }
  const d = card.detail ?? '';
  expect(d).not.toMatch(BIDI);
  expect(d.length).toBeLessThanOrEqual(900);
  expect(d.split('\n').filter((l) => l.trim()).length).toBeLessThanOrEqual(12);
  const html = markdown.render(d);
  const tags = [...html.matchAll(/<\/?([a-z0-9]+)/gi)].map((m) => (m[1] ?? '').toLowerCase());
  expect(tags.filter((t) => !ALLOWED.has(t))).toEqual([]);
  expect([...html.matchAll(/<a href="([^"]*)"/g)].map((m) => m[1]?.replace(/&amp;/g, '&'))).toEqual([ADVICE_URL]);
  // Each list item is one of our own lines (client text made none).
  expect((html.match(/<li>/g) ?? []).length).toBe(d.split('\n').filter((l) => /^[-*] /.test(l)).length);
  expect((html.match(/<em>/g) ?? []).length).toBe(1);
}

const scenario = (id: string) => {
  const s = SCENARIOS.find((x) => x.id === id);
  if (!s) throw new Error(id);
  return s;
};
const NOW = new Date('2026-11-20T14:00:00Z');

/** The last-bolus scenario with the given text on the fluid given (it shows in the deciding finding) and on the draft order. */
function withHostileDisplays(text: string, orderVolumeUnreadable: boolean) {
  const s = scenario('bolus-answered');
  const built = s.build(NOW);
  const resources = built.resources.map((r) => {
    if (r.resourceType !== 'MedicationAdministration') return r;
    const m = structuredClone(r) as MedicationAdministration;
    if (m.medicationCodeableConcept)
      m.medicationCodeableConcept = { ...m.medicationCodeableConcept, text: `${text} ${m.medicationCodeableConcept.text ?? ''}` };
    return m as FhirResource;
  });
  const draftOrders = built.draftOrders.map((r) => {
    const o = structuredClone(r) as MedicationRequest;
    if (o.medicationCodeableConcept)
      o.medicationCodeableConcept = { ...o.medicationCodeableConcept, text: `${o.medicationCodeableConcept.text ?? ''} ${text}` };
    if (orderVolumeUnreadable && o.dosageInstruction?.[0]?.doseAndRate?.[0])
      o.dosageInstruction[0].doseAndRate[0] = { doseQuantity: { value: 500, unit: text.slice(0, 20) || 'x' } };
    return o;
  });
  return cardsOf({ resources, patientId: s.patientId, encounterId: s.encounterId, draftOrders, now: NOW, hook: built.hook });
}

describe('hostile FHIR text on the cards is inert', () => {
  it('the check bites: the hostile display is on the card, escaped', () => {
    const { cards } = withHostileDisplays('<img src=x> [c] http://e.example *b*', false);
    expect(cards[0]?.detail).toContain('Last bolus 500 mL &lt;img src=x&gt; \\[c\\] http\\:\\//e\\.example \\*b\\*');
    inert(cards[0]!);
    // … and an unescaped detail would fail it.
    expect(() => inert({ ...cards[0]!, detail: `${cards[0]?.detail}\n<img src=x>` })).toThrow();
    expect(() => inert({ ...cards[0]!, detail: `# x\n${cards[0]?.detail}` })).toThrow();
  });

  it('displays of a fluid given and of the draft order, and an order unit that cannot be read', () => {
    fc.assert(
      fc.property(hostile, fc.boolean(), (text, unreadable) => {
        const { cards } = withHostileDisplays(text, unreadable);
        for (const c of cards) inert(c);
      }),
      { numRuns: 150 },
    );
  });

  it('what the FHIR server said (OperationOutcome text) on the advice-not-available card', () => {
    fc.assert(
      fc.property(hostile, (text) => {
        const { cards } = cardsOf({
          resources: [],
          patientId: 'tm-pat-x',
          now: NOW,
          hook: 'order-select',
          draftOrders: scenario('bolus-answered').build(NOW).draftOrders,
          gathering: [{ key: 'vitals', source: 'prefetch', status: 'unavailable', detail: text }] as never,
        });
        expect(cards[0]?.summary).toMatch(/^Fluid advice not available/);
        inert(cards[0]!);
      }),
      { numRuns: 300 },
    );
  });

  it('any text in any line of a card (units, values, labels) renders as that text and nothing more', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(hostile, fc.option(hostile, { nil: undefined }), fc.boolean()), { minLength: 1, maxLength: 8 }),
        (rows) => {
          const card = renderCard(
            {
              kind: 'bolus-review',
              vars: { headline: rows[0]?.[0] ?? '' },
              lines: rows.map(([text, label, bullet]) => ({ text, ...(label ? { label } : {}), bullet })),
              suggestions: [],
            },
            catalogue,
            { hook: 'order-select', publicUrl: PUBLIC_URL, adviceLink: { label: 'Full reasoning', url: ADVICE_URL } },
          );
          inert(card);
        },
      ),
      { numRuns: 500 },
    );
  });
});
