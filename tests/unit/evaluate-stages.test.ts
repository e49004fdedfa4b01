// evaluateHook is its six exported stages in order (src/hooks/evaluate.ts); refusals are domain outcomes, which
// only the HTTP edge turns into a status (src/http/errors.ts; CDS Hooks 2.0 §Calling a CDS Service: 412).
import { describe, expect, it } from 'vitest';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import type { AdviceRecord } from '../../src/audit/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { evaluateHook, type EvaluateDeps, type Stage } from '../../src/hooks/evaluate.js';
import { OutcomeError } from '../../src/hooks/outcome-error.js';
import { findService } from '../../src/hooks/services.js';
import { httpOf, STATUS_OF } from '../../src/http/errors.js';
import { basicResources, NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';

const service = findService('bolus-review-select')!;
const RECORDED = new Date('2026-11-20T14:00:07Z');
const silent = { info() {}, warn() {}, error() {} };

function depsWith(append: (rec: AdviceRecord) => Promise<unknown>, stages: Stage[] = []): EvaluateDeps {
  let calls = 0;
  return {
    store: { append } as unknown as EvaluateDeps['store'],
    catalogue: loadCatalogue().catalogue,
    thresholds: resolveThresholds({}),
    rulesVersion: 'test',
    gatherOptions: { budgetMs: 1000, maxPages: 2, concurrency: 2 },
    publicUrl: 'http://127.0.0.1:8080',
    log: silent,
    // The first reading is the assessment's `now`, the second the record's time: both from the injected clock.
    now: () => (calls++ === 0 ? NOW : RECORDED),
    observe: (s) => stages.push(s),
  };
}

describe('evaluateHook', () => {
  it('runs parse, gather, snapshot, advise, compose and record in that order, and stamps the record with the injected clock', async () => {
    const stages: Stage[] = [];
    const stored: AdviceRecord[] = [];
    const r = await evaluateHook(
      service,
      orderSelectRequest({ prefetch: prefetchOf(basicResources()) }),
      depsWith(async (rec) => stored.push(rec), stages),
    );
    expect(r.status).toBe(200);
    expect(stages).toEqual(['parse', 'gather', 'snapshot', 'advise', 'compose', 'record']);
    expect(stored).toHaveLength(1);
    expect(stored[0]?.recordedAt).toBe(RECORDED.toISOString());
    expect(stored[0]?.cards).toEqual(r.body.cards);
  });

  it('a call whose required data cannot be had is recorded first, then refused as `unobtainable` (412), one issue per key', async () => {
    const stored: AdviceRecord[] = [];
    const refusal = await evaluateHook(
      service,
      orderSelectRequest({}),
      depsWith(async (rec) => stored.push(rec)),
    ).catch((e: unknown) => e);
    expect(refusal).toBeInstanceOf(OutcomeError);
    expect((refusal as OutcomeError).code).toBe('unobtainable');
    expect(stored.map((s) => s.outcome)).toEqual(['precondition-failed']);
    const { status, body } = httpOf(refusal as OutcomeError);
    expect(status).toBe(412);
    expect(body.issue.every((i) => i.code === 'incomplete' && i.severity === 'error')).toBe(true);
    expect(body.issue.map((i) => i.details.text).join(' ')).toMatch(/vitals/);
  });

  it('a failed audit write gives no advice: `not-stored`, a fatal 500', async () => {
    const e = await evaluateHook(
      service,
      orderSelectRequest({ prefetch: prefetchOf(basicResources()) }),
      depsWith(async () => {
        throw new Error('disk full');
      }),
    ).catch((x: unknown) => x);
    expect((e as OutcomeError).code).toBe('not-stored');
    const { status, body } = httpOf(e as OutcomeError);
    expect(status).toBe(500);
    expect(body.issue[0]?.severity).toBe('fatal');
    expect(body.issue[1]?.details.text).toBe('disk full');
  });

  it('a request that is not CDS Hooks 2.0 is `invalid` (400) before anything is gathered or stored', async () => {
    const stages: Stage[] = [];
    const e = await evaluateHook(
      service,
      { hook: 'order-select' },
      depsWith(async () => {
        throw new Error('must not be called');
      }, stages),
    ).catch((x: unknown) => x);
    expect((e as OutcomeError).code).toBe('invalid');
    expect(STATUS_OF.invalid).toBe(400);
    expect(stages).toEqual([]);
  });
});
