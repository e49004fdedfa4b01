// CDS Hooks 2.0 §Feedback: accepted with acceptedSuggestions, overridden with overrideReason {reason, userComment}
// (a bare Coding is accepted too, cds-hooks/docs#519); stored idempotently, joined to the advice by card uuid.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { AUDIT_HEADERS, get, post, startService, type Running } from '../helpers/server.js';

let s: Running;
beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
});
afterAll(async () => s.stop());

const FB = () => `${s.url}/cds-services/bolus-review-select/feedback`;
async function card(c: keyof typeof ADVICE_CASES) {
  const r = await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES[c]) }));
  return r.body.cards[0];
}

describe('feedback', () => {
  it('a mixed batch across several hook calls: duplicates stored once, counts and override rate right', async () => {
    const a = await card('smaller-aliquot');
    const b = await card('question');
    const c = await card('test-first');
    const reason = a.overrideReasons[1];
    const batch = {
      feedback: [
        {
          card: a.uuid,
          outcome: 'accepted',
          acceptedSuggestions: [{ id: a.suggestions[0].uuid }],
          outcomeTimestamp: '2026-11-20T14:01:00Z',
        },
        {
          card: b.uuid,
          outcome: 'overridden',
          overrideReason: { reason, userComment: 'seen at bedside' },
          outcomeTimestamp: '2026-11-20T14:02:00Z',
        },
        // A bare Coding, as some early clients send it.
        {
          card: c.uuid,
          outcome: 'overridden',
          overrideReason: { code: reason.code, system: reason.system, display: reason.display },
          outcomeTimestamp: '2026-11-20T14:03:00Z',
        },
      ],
    };
    const first = await post(FB(), batch);
    expect(first).toEqual({ status: 200, body: { stored: 3, duplicates: 0 } });
    const again = await post(FB(), batch);
    expect(again).toEqual({ status: 200, body: { stored: 0, duplicates: 3 } });

    const stats = (await get(`${s.url}/audit/feedback-stats`, AUDIT_HEADERS)).body;
    const review = stats.byKind.find((k: any) => k.cardKind === 'bolus-review');
    expect(review).toMatchObject({ accepted: 1, overridden: 2, overrideRate: Math.round((2 / 3) * 1000) / 1000 });
    expect(review.cards).toBeGreaterThanOrEqual(3);
    expect(stats.byReason).toEqual([{ cardKind: 'bolus-review', reasonCode: reason.code, reasonDisplay: reason.display, count: 2 }]);

    // The audit API shows the outcome of each advice.
    const list = (await get(`${s.url}/audit/advice?limit=3`, AUDIT_HEADERS)).body.items;
    expect(list.map((i: any) => i.feedback)).toEqual([
      { accepted: 0, overridden: 1 },
      { accepted: 0, overridden: 1 },
      { accepted: 1, overridden: 0 },
    ]);
    const full = (await get(`${s.url}/audit/advice/${list[2].id}`, AUDIT_HEADERS)).body;
    expect(full.feedback).toMatchObject([{ cardUuid: a.uuid, outcome: 'accepted', acceptedSuggestions: [a.suggestions[0].uuid] }]);
  });

  it('an unknown card uuid gets a 404 OperationOutcome naming it', async () => {
    const r = await post(FB(), {
      feedback: [
        {
          card: '0b5e7c1a-1111-4222-8333-944455556666',
          outcome: 'overridden',
          overrideReason: { userComment: 'x' },
          outcomeTimestamp: '2026-11-20T14:05:00Z',
        },
      ],
    });
    expect(r.status).toBe(404);
    expect(r.body.resourceType).toBe('OperationOutcome');
    expect(r.body.issue[0].details.text).toContain('0b5e7c1a-1111-4222-8333-944455556666');
  });

  it.each([
    [{}, 'feedback'],
    [{ feedback: [] }, 'feedback'],
    [{ feedback: [{ card: 'x', outcome: 'accepted', outcomeTimestamp: '2026-11-20T14:05:00Z' }] }, 'card'],
    [
      { feedback: [{ card: '0b5e7c1a-1111-4222-8333-944455556666', outcome: 'accepted', outcomeTimestamp: '2026-11-20T14:05:00Z' }] },
      'acceptedSuggestions',
    ],
    [
      { feedback: [{ card: '0b5e7c1a-1111-4222-8333-944455556666', outcome: 'ignored', outcomeTimestamp: '2026-11-20T14:05:00Z' }] },
      'outcome',
    ],
    [
      { feedback: [{ card: '0b5e7c1a-1111-4222-8333-944455556666', outcome: 'overridden', outcomeTimestamp: 'yesterday' }] },
      'outcomeTimestamp',
    ],
  ])('a bad body is a 400 OperationOutcome (%j)', async (body, field) => {
    const r = await post(FB(), body);
    expect(r.status).toBe(400);
    expect(r.body.resourceType).toBe('OperationOutcome');
    expect(JSON.stringify(r.body)).toContain(field);
  });
});
