// A stored record rebuilds the call it answered (decision 0006, src/hooks/rebuild.ts): the request body as received
// (the FHIR token replaced), and the FHIR server's answers and failures as they came, played back through the same
// gathering code. Here the call gets part of its data by prefetch and the rest from a FHIR server that pages one
// search, answers 503 to another, runs out of time on a third and sends an OperationOutcome for a fourth; the
// record, stored and read back, must give the same gathering outcomes and the same snapshot. Invented patient.
import { describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import { resolveThresholds } from '../../src/assess/thresholds.js';
import { decodeRow, encodeRecord } from '../../src/audit/record-format.js';
import { impactOf } from '../../src/audit/impact.js';
import type { AdviceRecord, AnsweredRecord, AuditStore, StoredAdvice } from '../../src/audit/types.js';
import { loadCatalogue } from '../../src/cards/catalogue.js';
import { FhirFetchError, type fhirFetcher } from '../../src/fhir/fetcher.js';
import { evaluateHook } from '../../src/hooks/evaluate.js';
import { RebuildError, rebuildCall, snapshotOfRecord } from '../../src/hooks/rebuild.js';
import { findService } from '../../src/hooks/services.js';
import { basicResources, NOW, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';

const FHIR = 'https://fhir.invented.example/r4';
const TOKEN = 'rebuild-test-token-7f3a9c';
const chart = basicResources();

/** The record as stored in format 2 would hold it: no snapshot. */
function withoutSnapshot(rec: AdviceRecord): AdviceRecord {
  const { snapshot: _s, ...rest } = rec as AnsweredRecord;
  return rest;
}

/** A FHIR server as a fetcher (the real one's contract: absolute URLs under the base, the body's text told to onBody). */
const server: typeof fhirFetcher = () => async (url, _signal, onBody) => {
  const answer = (status: number, body: unknown) => {
    const text = JSON.stringify(body);
    onBody?.(status, text);
    return JSON.parse(text) as unknown;
  };
  const u = new URL(url);
  const code = u.searchParams.get('code') ?? '';
  if (u.pathname.endsWith('/Condition')) throw Object.assign(new Error('budget'), { name: 'TimeoutError' });
  if (u.pathname.endsWith('/MedicationAdministration')) throw new FhirFetchError('http-error', 'FHIR server answered 503', 503);
  if (u.pathname.endsWith('/MedicationRequest'))
    return answer(200, { resourceType: 'OperationOutcome', issue: [{ severity: 'error', code: 'too-costly', diagnostics: 'invented' }] });
  if (u.searchParams.get('page') === '2') return answer(200, b.searchset([b.numeric('alb-1', PID, 'albumin', 24, b.minutesAgo(NOW, 300))]));
  if (code.includes('2524-7') || code.includes('lactate'))
    return answer(200, b.searchset(chart['labs'] ?? [], `${FHIR}/Observation?page=2&patient=${PID}`));
  return answer(200, b.searchset([]));
};

async function answered(): Promise<AdviceRecord> {
  let made: AdviceRecord | undefined;
  const store = {
    append: async (rec: AdviceRecord) => {
      made = rec;
      return { seq: 1, hash: '0'.repeat(64) };
    },
  } as unknown as AuditStore;
  const { catalogue, digest } = loadCatalogue();
  // Patient, encounter, vitals and weight by prefetch; everything else from the FHIR server.
  const given = prefetchOf(chart);
  const prefetch = Object.fromEntries(['patient', 'encounter', 'vitals', 'body'].map((k) => [k, given[k]]));
  const request = orderSelectRequest({ prefetch, fhirServer: FHIR, token: TOKEN });
  const service = findService('bolus-review-select');
  if (!service) throw new Error('no service');
  const text = JSON.stringify(request, null, 1);
  const r = await evaluateHook(
    service,
    JSON.parse(text),
    {
      store,
      catalogue,
      thresholds: resolveThresholds({}),
      rulesVersion: `test.${digest}`,
      publicUrl: 'http://127.0.0.1:8080',
      now: () => NOW,
      log: { info() {}, warn() {}, error() {} },
      gatherOptions: { budgetMs: 2000, maxPages: 5, concurrency: 4 },
      makeFetcher: server,
    },
    undefined,
    text,
  );
  expect(r.status).toBe(200);
  if (!made) throw new Error('no record');
  return made;
}

describe('a record stored as received rebuilds its call', () => {
  it('the same gathering outcomes and the same snapshot, from the stored bytes alone', async () => {
    const made = await answered();
    // What the record kept: the body without the token, and one exchange per FHIR request, failures by their class.
    expect(made.inputs?.request.asReceived).toBe(true);
    expect(made.inputs?.request.body).not.toContain(TOKEN);
    const failures = (made.inputs?.fhir ?? []).flatMap((x) => (x.failure ? [x.failure.status] : []));
    expect(failures.sort()).toEqual(['http-error', 'timeout']);
    expect(made.inputs?.fhir.some((x) => x.url.includes('page=2'))).toBe(true);
    const statuses = Object.fromEntries(made.gathering.map((g) => [g.key, g.status]));
    expect(statuses).toMatchObject({ labs: 'ok', conditions: 'timeout', fluidsGiven: 'http-error', medications: 'not-fhir' });

    // Stored (format 2) and read back: no snapshot in it, and what is rebuilt equals what the rules saw.
    const parts = encodeRecord(made);
    expect(parts.format).toBe(2);
    const stored = decodeRow({ record: parts.text, format: parts.format, outputs: parts.outputs ?? null, inputs: parts.inputs ?? null });
    expect(stored.snapshot).toBeUndefined();
    const again = await rebuildCall(stored);
    expect(again.gathered.outcomes.map((o) => [o.key, o.status, o.count, o.pages])).toEqual(
      made.gathering.map((o) => [o.key, o.status, o.count, o.pages]),
    );
    expect(again.snapshot).toEqual(made.snapshot);
    expect(again.snapshot.measurements.some((m) => m.ref === 'Observation/alb-1')).toBe(true); // from the second page
    expect(await snapshotOfRecord(stored)).toEqual(made.snapshot);
  });

  it('a record whose inputs no longer make a call says why, and a record without inputs is left as it is', async () => {
    const made = await answered();
    const inputs = made.inputs!;
    const broken = (body: string): AdviceRecord => ({
      ...withoutSnapshot(made),
      inputs: { ...inputs, request: { body, asReceived: true } },
    });
    await expect(snapshotOfRecord(broken('{"hook":'))).rejects.toThrow(RebuildError);
    await expect(snapshotOfRecord(broken('{"hook":"order-select"}'))).rejects.toThrow(/no longer a valid call/);
    await expect(snapshotOfRecord({ ...withoutSnapshot(made), service: 'no-such-service' })).rejects.toThrow(/no service/);
    // A record of format 1 has its snapshot; a 412 record has none to rebuild.
    expect(await snapshotOfRecord(made)).toBe(made.snapshot);
    const { snapshot: _s, advice: _a, ...rest } = made as AdviceRecord & { advice: unknown };
    expect(await snapshotOfRecord({ ...rest, outcome: 'precondition-failed' } as AdviceRecord)).toBeUndefined();
  });

  it('in the impact report, a stored record that rebuilds is replayed and one that no longer makes a call counts as failed', async () => {
    const made = await answered();
    const stored = { ...withoutSnapshot(made), seq: 1, hash: 'h', prevHash: 'p', format: 2 } as StoredAdvice;
    const broken = { ...stored, id: 'broken-1', seq: 2, inputs: { ...made.inputs!, request: { body: '{}', asReceived: true } } };
    async function* both() {
      yield stored;
      yield broken;
    }
    const { catalogue, digest } = loadCatalogue();
    const report = await impactOf(both(), { thresholds: resolveThresholds({}), catalogue, rulesVersion: `test.${digest}` });
    expect(report).toMatchObject({ read: 2, replayed: 1, failed: 1, failedExamples: ['broken-1'] });
  });

  it('an answer the FHIR server sent for one URL is played back for that URL only, in the order read', async () => {
    const made = await answered();
    const inputs = made.inputs!;
    // The first page of labs dropped from the record: the labs key is then read as the failure it is, not from another answer.
    const withoutLabs = inputs.fhir.filter((x) => !(x.body?.includes('lac-1') ?? false));
    const again = await rebuildCall({ ...withoutSnapshot(made), inputs: { ...inputs, fhir: withoutLabs } });
    expect(again.gathered.outcomes.find((o) => o.key === 'labs')?.status).toBe('network-error');
    expect(again.snapshot.measurements.some((m) => (m as { ref: string }).ref === 'Observation/lac-1')).toBe(false);
  });
});
