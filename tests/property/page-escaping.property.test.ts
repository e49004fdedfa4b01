// Escaping on the reasoning page and the docs pages (src/pages/): client text from FHIR (finding texts, units,
// references, displays, OperationOutcome details, exclusion details) can never add markup. Outside references:
// the HTML Living Standard's character references (§13.5: &amp; &lt; &gt; &quot; &#39; decode to & < > " '),
// Unicode UAX #9 for the bidirectional controls, and CommonMark with raw HTML off (markdown-it `html: false`).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Finding } from '../../src/assess/types.js';
import type { AdviceRecord } from '../../src/audit/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { h } from '../../src/pages/escape.js';
import { docsPage, renderAdvicePage } from '../../src/pages/index.js';
import { SnapshotBuilder } from '../helpers/snapshot-builder.js';

const HOSTILE = [
  '<script>alert(1)</script>',
  '"><img src=x onerror=alert(1)>',
  "' onmouseover='x",
  '</td></tr></table><h1>x</h1>',
  '<svg onload=alert(1)>',
  '&lt;b&gt;',
  '&#60;script&#62;',
  '\u202eevil\u202c',
  '\u2066iso\u2069',
  '\u0000nul',
  '<!--',
  ']]>',
  '<style>*{display:none}</style>',
  'javascript:alert(1)',
  '# heading',
  '[link](javascript:alert(1))',
  '![img](http://x.invalid/a.png)',
  '<a href="http://x.invalid">x</a>',
];
const hostile = fc.oneof(
  fc.constantFrom(...HOSTILE),
  fc.string({ unit: 'grapheme', minLength: 1, maxLength: 40 }),
  fc.string({ unit: 'binary', minLength: 1, maxLength: 40 }),
  fc.array(fc.constantFrom(...HOSTILE, 'a', ' ', '<', '>', '&', '"', "'"), { minLength: 1, maxLength: 6 }).map((a) => a.join('')),
);

const decode = (s: string) =>
  s.replace(/&(amp|lt|gt|quot|#39);/g, (_m, e: string) => ({ amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'" })[e] as string);
const INVISIBLE = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f-\u009f\u061c\u200e\u200f\u202a-\u202e\u2066-\u2069]/g;

describe('h()', () => {
  it('leaves no markup character and no bidi or control character, and decodes back to the visible text', () => {
    fc.assert(
      fc.property(hostile, (s) => {
        const out = h(s);
        expect(out).not.toMatch(/[<>"']/);
        expect(out).not.toMatch(INVISIBLE);
        expect(out.replace(/&(amp|lt|gt|quot|#39);/g, '')).not.toContain('&');
        expect(decode(out)).toBe(s.replace(INVISIBLE, ''));
      }),
      { numRuns: 500 },
    );
  });
});

/** A stored record whose every client-text field holds `t` (numbers and times fixed, so only text differs). */
function recordWith(t: string): AdviceRecord {
  const b = new SnapshotBuilder({ now: '2026-11-20T14:00:00Z', patientRef: `Patient/${t}` });
  for (let i = 0; i < 4; i++) b.measure('meanBp', 62 + i, { ageMin: 30 + 60 * i, ref: `Observation/${t}-${i}` });
  b.measure('urineOutput', 40, { ageMin: 10, periodStartAgeMin: 70 });
  b.fluid({ volumeMl: 500, startAgeMin: 200, endAgeMin: 170, display: t, ref: `MedicationAdministration/${t}` });
  b.draftOrder({
    ref: `draftOrders#MedicationRequest/${t}`,
    resourceType: 'MedicationRequest',
    id: t,
    selected: true,
    isFluid: true,
    volumeMl: 500,
    display: t,
    resource: {},
  });
  b.exclude({ ref: `Observation/${t}`, reason: 'unknown-unit', detail: t, kind: 'cvp' });
  const snapshot = b.build();
  const ev = { ref: `Observation/${t}`, kind: t, value: t, unit: t, effective: '2026-11-20T13:40:00.000Z', ageMinutes: 20 };
  const findings = [
    {
      ruleId: 'responsiveness.ppv',
      topic: 'responsiveness',
      marker: 'ppv',
      tier: 'dynamic',
      status: 'assessed',
      direction: 'for',
      text: t,
      evidence: [ev],
      source: t,
      values: { [t]: t },
      assumptions: [t],
    },
    {
      ruleId: 'tolerance.lungs',
      topic: 'tolerance',
      domain: 'lungs',
      limit: 'none',
      harmSign: false,
      contextOnly: false,
      status: 'not-assessed',
      gap: 'confounded',
      text: t,
      reason: t,
      evidence: [ev],
    },
    {
      ruleId: 'perfusion.map',
      topic: 'perfusion',
      sign: 'map',
      contextOnly: false,
      hypoperfusion: true,
      status: 'assessed',
      text: t,
      evidence: [ev],
    },
    { ruleId: 'order.volume', topic: 'order', part: 'volume', status: 'assessed', text: t, evidence: [ev], values: { volumeMl: 500 } },
  ] satisfies Finding[];
  return {
    id: '3f2a6c1e-0b7d-4e59-8a41-6d2c9e7b5f03',
    recordedAt: '2026-11-20T14:00:01.000Z',
    service: 'bolus-review-select',
    hook: 'order-select',
    hookInstance: 'h',
    patientId: 'p',
    outcome: 'answered',
    rulesVersion: 'v',
    snapshot,
    findings,
    advice: {
      rulesVersion: 'v',
      now: snapshot.now,
      findings,
      ruleErrors: [],
      responsiveness: { value: 'likely', rationale: t, decidingRules: [t], confidence: 'moderate', assumptions: [t] },
      tolerance: { value: 'limited', rationale: t, decidingRules: [t], coverage: { assessed: 3, total: 9 } },
      need: { value: 'present', rationale: t, decidingRules: [t] },
      phase: { value: 'later', rationale: t, decidingRules: [] },
      recommendation: {
        action: 'smaller-aliquot',
        indicator: 'warning',
        headline: 'likely/limited',
        reasons: [t],
        alternatives: ['albumin'],
        cell: 'likely/limited',
        need: 'present',
        phase: 'later',
        toleranceAssessed: true,
        harmSigns: [],
        decidingRules: [],
      },
    },
    cards: [],
    cardKinds: {},
    gathering: [{ key: 'vitals', status: 'timeout', detail: t } as never],
    timings: { totalMs: 1, gatherMs: 1, fhirWaitMs: 1, assessMs: 1 },
  };
}

const tags = (page: string) => [...page.matchAll(/<\/?([a-zA-Z][\w:-]*)/g)].map((m) => m[1]).join(' ');
const render = (t: string) =>
  renderAdvicePage({
    record: recordWith(t),
    zone: 'Europe/Berlin',
    cautions: [t],
    running: { rulesVersion: 'v', thresholds: { a: { [t]: t } } },
    words: loadCatalogue().catalogue,
  });

describe('the reasoning page with hostile client text everywhere', () => {
  it('has exactly the markup of the same page with plain text: no element, attribute or comment added', async () => {
    const plain = tags(await render('x'));
    expect(plain.split(' ').length).toBeGreaterThan(200);
    await fc.assert(
      fc.asyncProperty(hostile, async (t) => {
        const page = await render(t);
        expect(tags(page)).toBe(plain);
        expect(page).not.toMatch(/[\u202a-\u202e\u2066-\u2069]/);
        expect(page).not.toContain('<!--');
      }),
      { numRuns: 40 },
    );
  });
});

describe('docs pages', () => {
  it('raw HTML in Markdown is shown as text, javascript: links are not made, .md links become page links', () => {
    const page = docsPage(
      '# Title\n\n<script>alert(1)</script>\n\n[x](javascript:alert(1)) [y](integration.md#links) [z](https://example.org/a.md)\n',
      'fallback',
    );
    expect(page).not.toContain('<script>');
    expect(page).toContain('&lt;script&gt;');
    expect(page).not.toMatch(/href="javascript:/);
    expect(page).toContain('href="integration#links"');
    expect(page).toContain('href="https://example.org/a.md"');
    expect(page).toContain('<title>Title · Tidemark</title>');
  });
});
