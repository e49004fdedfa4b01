// Issue 13 item 5, over real HTTP: what a client can make the service copy, recurse over or echo is bounded.
// - Deep nesting (5,000 levels in a 25 KB body) in the draft order gave `Maximum call stack size exceeded`, a 500 and
//   a false "audit write failed" alarm: now a 400 OperationOutcome naming where it is too deep (MAX_JSON_DEPTH).
// - A 1 MB `hook` was echoed whole in the 400; a 1.8 MB id made a 7 MB audit row: ids and names have a maximum
//   length (src/hooks/schemas.ts), the draft orders a maximum size, and a 400 beyond them.
import Database from 'better-sqlite3';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { MAX_DRAFT_ORDERS_CHARS, MAX_JSON_DEPTH } from '../../src/hooks/schemas.js';
import { basicResources, bolusDraft, NOW, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, type Running } from '../helpers/server.js';

let s: Running;
beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
});
afterAll(async () => s.stop());

const URL_SELECT = () => `${s.url}/cds-services/bolus-review-select`;
const valid = () => orderSelectRequest({ prefetch: prefetchOf(basicResources()) });

/** A valid request as text, with the draft order's `note` replaced by `n` levels of {"a":[…]} (2 levels per step). */
function deepDraftText(levels: number): string {
  const req = valid();
  const draft = { ...bolusDraft(), note: '__DEEP__' };
  const text = JSON.stringify({
    ...req,
    context: { ...req.context, draftOrders: { resourceType: 'Bundle', entry: [{ resource: draft }] } },
  });
  const steps = Math.ceil(levels / 2);
  return text.replace('"__DEEP__"', `${'{"a":['.repeat(steps)}"x"${']}'.repeat(steps)}`);
}

function issueTexts(body: any): string[] {
  return (body?.issue ?? []).map((i: any) => String(i?.details?.text));
}

const auditAlarms = () => s.logLines.filter((l) => l.includes('audit write failed') || l.includes('"level":50'));

describe('nesting depth', () => {
  it.each([5_000, 20_000, 200_000])(
    'a draft order nested %i levels deep is a 400 naming the place, not a 500 or an audit alarm',
    async (levels) => {
      const before = auditAlarms().length;
      const text = deepDraftText(levels);
      const r = await post(URL_SELECT(), text);
      expect(r.status).toBe(400);
      expect(r.body.resourceType).toBe('OperationOutcome');
      expect(r.body.issue[0].code).toBe('structure');
      expect(issueTexts(r.body)[0]).toContain(`deeper than ${MAX_JSON_DEPTH} levels`);
      expect(issueTexts(r.body)[1]).toMatch(/^too deep under context\.draftOrders\.entry\[0\]\.resource\.note\.a\[0\]\.a/);
      expect(auditAlarms().length).toBe(before);
    },
  );

  it('nesting within the limit is answered (a draft order 40 levels deep)', async () => {
    const r = await post(URL_SELECT(), deepDraftText(40));
    expect(r.status).toBe(200);
    expect(Array.isArray(r.body.cards)).toBe(true);
  });

  it('the feedback endpoint refuses deep nesting the same way', async () => {
    const r = await post(`${URL_SELECT()}/feedback`, `{"feedback":${'['.repeat(10_000)}${']'.repeat(10_000)}}`);
    expect(r.status).toBe(400);
    expect(issueTexts(r.body)[0]).toContain('deeper than');
  });
});

describe('echoed strings and client ids', () => {
  it('a 1 MB hook value is refused without being echoed', async () => {
    const r = await post(URL_SELECT(), { ...valid(), hook: 'h'.repeat(1_000_000) });
    expect(r.status).toBe(400);
    expect(JSON.stringify(r.body).length).toBeLessThan(2_000);
  });

  const huge = 'A'.repeat(1_800_000);
  it.each([
    ['userId', (q: any) => ({ ...q, context: { ...q.context, userId: `Practitioner${huge}/x` } })],
    ['selections', (q: any) => ({ ...q, context: { ...q.context, selections: [`MedicationRequest${huge}/x`] } })],
    [
      'a draft order id',
      (q: any) => ({
        ...q,
        context: { ...q.context, draftOrders: { resourceType: 'Bundle', entry: [{ resource: { ...bolusDraft(), id: huge } }] } },
      }),
    ],
    [
      'a draft order resourceType',
      (q: any) => ({
        ...q,
        context: {
          ...q.context,
          draftOrders: { resourceType: 'Bundle', entry: [{ resource: { ...bolusDraft(), resourceType: `Medication${huge}` } }] },
        },
      }),
    ],
    ['a prefetch key', (q: any) => ({ ...q, prefetch: { ...q.prefetch, [huge]: null } })],
    ['a prefetch resource id', (q: any) => ({ ...q, prefetch: { ...q.prefetch, patient: { ...q.prefetch.patient, id: huge } } })],
  ])('a 1.8 MB %s is a short 400', async (_what, change) => {
    const r = await post(URL_SELECT(), change(valid()));
    expect(r.status).toBe(400);
    expect(r.body.resourceType).toBe('OperationOutcome');
    expect(JSON.stringify(r.body).length).toBeLessThan(5_000);
  });

  it('draft orders larger than MAX_DRAFT_ORDERS_CHARS are a 400 naming draftOrders', async () => {
    const q = valid();
    const big = { ...bolusDraft(), note: [{ text: 'n'.repeat(MAX_DRAFT_ORDERS_CHARS) }] };
    const r = await post(URL_SELECT(), {
      ...q,
      context: { ...q.context, draftOrders: { resourceType: 'Bundle', entry: [{ resource: big }] } },
    });
    expect(r.status).toBe(400);
    expect(issueTexts(r.body).join('\n')).toMatch(/context\.draftOrders: draftOrders is larger than 256 KiB/);
  });

  it('an Observation inside a prefetch Bundle with a 1.8 MB id is left out, and the audit row stays small', async () => {
    const res = basicResources();
    res.vitals = [...(res.vitals ?? []), { ...b.numeric('hr-x', PID, 'heartRate', 99, b.minutesAgo(NOW, 5)), id: huge }];
    const r = await post(URL_SELECT(), orderSelectRequest({ prefetch: prefetchOf(res) }));
    expect(r.status).toBe(200);
    const db = new Database(s.dbPath, { readonly: true });
    try {
      const row = db.prepare('SELECT length(record) AS n FROM advice ORDER BY seq DESC LIMIT 1').get() as { n: number };
      expect(row.n).toBeLessThan(200_000);
    } finally {
      db.close();
    }
  });

  it('a 1 MB feedback comment is a 400', async () => {
    const r = await post(`${URL_SELECT()}/feedback`, {
      feedback: [
        {
          card: '0b8a3f4e-2d6c-4c1a-9e5f-7a6b5c4d3e2f',
          outcome: 'overridden',
          overrideReason: { userComment: 'c'.repeat(1_000_000) },
          outcomeTimestamp: NOW.toISOString(),
        },
      ],
    });
    expect(r.status).toBe(400);
    expect(JSON.stringify(r.body).length).toBeLessThan(5_000);
  });
});
