// Issue 13 item 9, over real HTTP: the summary of the "advice not available" card (kind assessment-gap) quotes why
// the data could not be had, and that reason can be a client's text (what a prefetch OperationOutcome said). It went
// into the summary raw: a Markdown link to javascript:, an <img onerror>, a U+202E that reverses the line. It is
// escaped now as detail values are (src/cards/markdown.ts), with control and bidi characters removed.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { basicResources, NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, type Running } from '../helpers/server.js';

let s: Running;
beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
});
afterAll(async () => s.stop());

const HOSTILE = 'x[click](javascript:alert(1)) <img src=x onerror=alert(1)> \u202Egnp.exe';

/** No vitals (an empty Bundle: the required key is there), and every other key an OperationOutcome with `text`. */
function requestWithOutcomes(text: string) {
  const outcome = { resourceType: 'OperationOutcome', issue: [{ severity: 'error', code: 'exception', details: { text } }] };
  const r = basicResources();
  const prefetch = prefetchOf(r) as Record<string, unknown>;
  for (const k of Object.keys(prefetch)) if (k !== 'patient' && k !== 'encounter') prefetch[k] = k === 'vitals' ? b.searchset([]) : outcome;
  return orderSelectRequest({ prefetch });
}

describe('the summary of the advice-not-available card', () => {
  it('carries the client text escaped, without its bidi override', async () => {
    const r = await post(`${s.url}/cds-services/bolus-review-select`, requestWithOutcomes(HOSTILE));
    expect(r.status).toBe(200);
    const card = r.body.cards[0];
    expect(card.summary).toMatch(/^Fluid advice not available/);
    // The reason is in the summary (so this checks the escaping of it, not a shorter fallback) …
    expect(card.summary).toContain('click');
    // … with no raw link, no raw HTML and no bidi control.
    expect(card.summary).not.toContain('[click](');
    expect(card.summary).toContain('\\[click\\](javascript\\:alert(1))');
    expect(card.summary).not.toMatch(/[<>]/);
    expect(card.summary).not.toContain('\u202E');
    expect(card.summary.length).toBeLessThan(140);
  });
});
