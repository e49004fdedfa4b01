// Data gathering against a mocked FHIR server (nock). Prefetch cases per CDS Hooks 2.0 §Prefetch and
// cds-hooks/docs#366 / PR #600: key absent, null, OperationOutcome, paged searchset Bundle.
import nock from 'nock';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { gather } from '../../src/hooks/gather.js';
import { hookRequestSchema } from '../../src/hooks/schemas.js';
import { findService, PREFETCH } from '../../src/hooks/services.js';
import { basicResources, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';

const BASE = 'https://fhir.test.invalid/r4';
const service = findService('bolus-review-select')!;
const opts = { budgetMs: 800, maxPages: 3, concurrency: 4 };
const parse = (x: unknown) => hookRequestSchema.parse(x);
/** The path and query Tidemark will request for a prefetch key. */
const pathOf = (key: string) =>
  `/r4/${(PREFETCH[key]?.template ?? '').replace(/\{\{context\.patientId\}\}/g, PID).replace(/\{\{context\.encounterId\}\}/g, 'tm-enc-ward4-017')}`;

beforeAll(() => nock.disableNetConnect());
afterEach(() => nock.cleanAll());
afterAll(() => nock.enableNetConnect());

function fullPrefetchExcept(...keys: string[]) {
  const p = prefetchOf(basicResources());
  for (const k of keys) delete p[k];
  return p;
}

describe('gather: prefetch cases', () => {
  it('a full prefetch needs no FHIR call', async () => {
    const g = await gather(parse(orderSelectRequest({ prefetch: prefetchOf(basicResources()) })), service, opts);
    expect(g.outcomes.every((o) => o.source === 'prefetch')).toBe(true);
    expect(g.resources.filter((r) => r.resourceType === 'Observation')).toHaveLength(9); // 6 vitals, 1 lab, 2 body
    expect(g.unobtainableRequired).toEqual([]);
  });

  it('a key absent is queried from fhirServer with the bearer token', async () => {
    const scope = nock(BASE, { reqheaders: { authorization: 'Bearer tok-abc' } })
      .get(pathOf('labs').replace('/r4', ''))
      .reply(200, b.searchset([b.numeric('lac-9', PID, 'lactate', 5.1, '2026-11-20T13:30:00Z')]));
    const g = await gather(
      parse(orderSelectRequest({ prefetch: fullPrefetchExcept('labs'), fhirServer: BASE, token: 'tok-abc' })),
      service,
      opts,
    );
    scope.done();
    expect(g.outcomes.find((o) => o.key === 'labs')).toMatchObject({ source: 'fhir-server', status: 'ok', count: 1, pages: 1 });
    expect(g.resources.some((r) => r.id === 'lac-9')).toBe(true);
  });

  it('null means no data: nothing is queried', async () => {
    const p = fullPrefetchExcept();
    p['labs'] = null;
    const g = await gather(parse(orderSelectRequest({ prefetch: p, fhirServer: BASE, token: 't' })), service, opts);
    expect(g.outcomes.find((o) => o.key === 'labs')).toMatchObject({ source: 'prefetch', status: 'no-data', count: 0 });
    expect(nock.pendingMocks()).toEqual([]);
  });

  it('an OperationOutcome from the client is re-queried', async () => {
    const p = fullPrefetchExcept();
    p['vitals'] = { resourceType: 'OperationOutcome', issue: [{ severity: 'error', code: 'timeout', diagnostics: 'upstream slow' }] };
    const scope = nock(BASE)
      .get(pathOf('vitals').replace('/r4', ''))
      .reply(200, b.searchset([b.numeric('hr-9', PID, 'heartRate', 99, '2026-11-20T13:55:00Z')]));
    const g = await gather(parse(orderSelectRequest({ prefetch: p, fhirServer: BASE, token: 't' })), service, opts);
    scope.done();
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ source: 'fhir-server', status: 'ok', count: 1 });
  });

  it('an OperationOutcome with no fhirServer leaves required data unobtainable (→ 412)', async () => {
    const p = fullPrefetchExcept();
    p['vitals'] = { resourceType: 'OperationOutcome', issue: [{ severity: 'error', code: 'exception' }] };
    const g = await gather(parse(orderSelectRequest({ prefetch: p })), service, opts);
    expect(g.unobtainableRequired).toEqual(['vitals']);
    expect(g.outcomes.find((o) => o.key === 'vitals')?.detail).toContain('the client reported an error');
  });

  it('a paged prefetch Bundle is followed through link[next], bounded by maxPages', async () => {
    const p = fullPrefetchExcept();
    p['vitals'] = b.searchset([b.numeric('v-p1', PID, 'heartRate', 90, '2026-11-20T13:50:00Z')], `${BASE}/Observation?page=2`);
    const scope = nock(BASE)
      .get('/Observation')
      .query({ page: '2' })
      .reply(200, b.searchset([b.numeric('v-p2', PID, 'heartRate', 91, '2026-11-20T13:40:00Z')], `${BASE}/Observation?page=3`))
      .get('/Observation')
      .query({ page: '3' })
      .reply(200, b.searchset([b.numeric('v-p3', PID, 'heartRate', 92, '2026-11-20T13:30:00Z')], `${BASE}/Observation?page=4`));
    const g = await gather(parse(orderSelectRequest({ prefetch: p, fhirServer: BASE, token: 't' })), service, opts);
    scope.done();
    const o = g.outcomes.find((x) => x.key === 'vitals');
    expect(o).toMatchObject({ source: 'prefetch', status: 'truncated', count: 3, pages: 3 });
    expect(o?.detail).toBe('stopped after 3 pages');
  });

  it('a next link to another host is not followed', async () => {
    const p = fullPrefetchExcept();
    p['vitals'] = b.searchset(
      [b.numeric('v-p1', PID, 'heartRate', 90, '2026-11-20T13:50:00Z')],
      'http://elsewhere.invalid/Observation?page=2',
    );
    const g = await gather(parse(orderSelectRequest({ prefetch: p, fhirServer: BASE, token: 't' })), service, opts);
    expect(g.outcomes.find((x) => x.key === 'vitals')).toMatchObject({
      status: 'truncated',
      count: 1,
      detail: 'link[next] points outside fhirServer: not followed',
    });
  });
});

describe('gather: FHIR server faults become missing data, never exceptions', () => {
  const onlyVitalsMissing = () => orderSelectRequest({ prefetch: fullPrefetchExcept('vitals'), fhirServer: BASE, token: 't' });

  it('500', async () => {
    nock(BASE).get(pathOf('vitals').replace('/r4', '')).reply(500, { resourceType: 'OperationOutcome', issue: [] });
    const g = await gather(parse(onlyVitalsMissing()), service, opts);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'http-error', httpStatus: 500, count: 0 });
    expect(g.unobtainableRequired).toEqual([]);
  });

  it('401', async () => {
    nock(BASE).get(pathOf('vitals').replace('/r4', '')).reply(401, 'no');
    const g = await gather(parse(onlyVitalsMissing()), service, opts);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'http-error', httpStatus: 401 });
  });

  it('a timeout ends within the budget', async () => {
    nock(BASE).get(pathOf('vitals').replace('/r4', '')).delay(5_000).reply(200, b.searchset([]));
    const t0 = Date.now();
    const g = await gather(parse(onlyVitalsMissing()), service, { ...opts, budgetMs: 300 });
    expect(Date.now() - t0).toBeLessThan(2_000);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'timeout' });
  });

  it('a body that is not FHIR (HTML)', async () => {
    nock(BASE).get(pathOf('vitals').replace('/r4', '')).reply(200, '<html>login</html>', { 'content-type': 'text/html' });
    const g = await gather(parse(onlyVitalsMissing()), service, opts);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'not-fhir' });
  });

  it('JSON that is not a FHIR resource', async () => {
    nock(BASE).get(pathOf('vitals').replace('/r4', '')).reply(200, { hello: 'world' });
    const g = await gather(parse(onlyVitalsMissing()), service, opts);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'not-fhir', detail: 'body is not a FHIR resource' });
  });

  it('connection refused', async () => {
    nock.enableNetConnect('127.0.0.1:1');
    const req = orderSelectRequest({ prefetch: fullPrefetchExcept('vitals'), fhirServer: 'http://127.0.0.1:1/fhir', token: 't' });
    const g = await gather(parse(req), service, opts);
    expect(g.outcomes.find((o) => o.key === 'vitals')).toMatchObject({ status: 'network-error' });
  });

  it('no prefetch and no fhirServer: the required key is unobtainable', async () => {
    const g = await gather(parse(orderSelectRequest({})), service, opts);
    expect(g.unobtainableRequired).toEqual(['vitals']);
    expect(g.outcomes.every((o) => o.status === 'unavailable')).toBe(true);
  });
});
