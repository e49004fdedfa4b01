// Issue 13 item 2 over real HTTP, on the service as a hospital would configure it: two trusted CDS clients, one
// audit reader, the static audit token. A CDS client's own audit-scoped token must not open the audit API, and
// feedback is taken only from the issuer that received the card, naming the card's own suggestions and override
// reasons (CDS Hooks 2.0 §Feedback: the card uuid, acceptedSuggestions by suggestion uuid, overrideReason one of
// the card's overrideReasons). Issuers, hospitals and patients are invented.
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { AdviceRecord } from '../../src/audit/types.js';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { makeIssuer, writeConfigFile, type TestIssuer } from '../helpers/issuers.js';
import { AUDIT_HEADERS, get, post, startService, type Running } from '../helpers/server.js';

const PUBLIC = 'https://cds.bayview-invented.example.org/tidemark';
const SERVICE = 'bolus-review-select';
let s: Running;
let north: TestIssuer; // CDS client of one hospital
let south: TestIssuer; // CDS client of another hospital, also listed as an audit reader with a key of its own
let southAudit: TestIssuer;
let reader: TestIssuer; // an audit reader only
let vendor: TestIssuer; // one CDS client serving two wards as tenants

beforeAll(async () => {
  north = await makeIssuer('https://ehr.north-invented.example.org/cds');
  south = await makeIssuer('https://ehr.south-invented.example.org/cds');
  southAudit = await makeIssuer(south.iss);
  reader = await makeIssuer('https://quality.bayview-invented.example.org/audit-desk');
  vendor = await makeIssuer('https://hosted-ehr.invented.example.net/cds', 'ES384', ['ward-a', 'ward-b']);
  const file = writeConfigFile({ issuers: [north.entry, south.entry, vendor.entry], auditReaders: [reader.entry, southAudit.entry] });
  s = await startService({ TIDEMARK_TRIAL_MODE: 'false', TIDEMARK_CONFIG_FILE: file, TIDEMARK_PUBLIC_URL: PUBLIC }, { now: () => NOW });
});
afterAll(async () => s.stop());

const auditAs = async (who: TestIssuer, path = '/audit/advice') =>
  get(`${s.url}${path}`, { authorization: `Bearer ${await who.mint(`${PUBLIC}/audit`, { scope: 'tidemark.audit' })}` });

/** One card issued to `who` (for `tenant`, if given) over HTTP. */
async function cardFor(who: TestIssuer, tenant?: string) {
  const r = await post(`${s.url}/cds-services/${SERVICE}`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES['smaller-aliquot']) }), {
    authorization: `Bearer ${await who.mint(`${PUBLIC}/cds-services/${SERVICE}`, tenant === undefined ? {} : { tenant })}`,
  });
  expect(r.status).toBe(200);
  return r.body.cards[0];
}

const feedbackAs = async (who: TestIssuer, feedback: unknown[], tenant?: string) =>
  post(
    `${s.url}/cds-services/${SERVICE}/feedback`,
    { feedback },
    {
      authorization: `Bearer ${await who.mint(`${PUBLIC}/cds-services/${SERVICE}/feedback`, tenant === undefined ? {} : { tenant })}`,
    },
  );

/** The feedback stored for the advice that holds `cardUuid`, read with the static audit token. */
async function storedFeedback(cardUuid: string): Promise<unknown[]> {
  const owner = await s.svc.store.cardOwner(cardUuid);
  return (await get(`${s.url}/audit/advice/${owner?.adviceId}`, AUDIT_HEADERS)).body.feedback;
}

describe('audit readers are an allowlist of their own', () => {
  it("a trusted CDS client's audit-scoped token is refused; an audit reader's is accepted; the static token still works", async () => {
    await cardFor(north);
    const refused = await auditAs(north);
    expect(refused.status).toBe(401);
    expect(refused.body.issue[0].code).toBe('login');
    expect(s.logLines.some((l) => l.includes('"audit access refused"') && l.includes('"unknown issuer"'))).toBe(true);

    const ok = await auditAs(reader);
    expect(ok.status).toBe(200);
    expect(ok.body.items.length).toBeGreaterThan(0);
    expect((await get(`${s.url}/audit/verify`, AUDIT_HEADERS)).body).toMatchObject({ ok: true });
  });

  it('a CDS issuer is an audit reader only when listed there too, and only with the keys listed there', async () => {
    expect((await auditAs(southAudit)).status).toBe(200);
    // The same iss with its CDS key: the audit list trusts another key for it.
    expect((await auditAs(south)).status).toBe(401);
  });

  it("an audit reader's token opens no CDS endpoint", async () => {
    const r = await post(
      `${s.url}/cds-services/${SERVICE}`,
      orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES['smaller-aliquot']) }),
      {
        authorization: `Bearer ${await reader.mint(`${PUBLIC}/cds-services/${SERVICE}`)}`,
      },
    );
    expect(r.status).toBe(401);
  });
});

describe('feedback only from the issuer that received the card, with the card own choices', () => {
  it("another issuer's feedback on a card is a 404, as for a card never issued, and nothing is stored", async () => {
    const card = await cardFor(north);
    const r = await feedbackAs(south, [
      {
        card: card.uuid,
        outcome: 'overridden',
        overrideReason: { reason: card.overrideReasons[0] },
        outcomeTimestamp: '2026-11-20T14:01:00Z',
      },
    ]);
    expect(r.status).toBe(404);
    expect(r.body.resourceType).toBe('OperationOutcome');
    expect(await storedFeedback(card.uuid)).toEqual([]);
    // The issuer that received it is heard.
    const own = await feedbackAs(north, [
      {
        card: card.uuid,
        outcome: 'overridden',
        overrideReason: { reason: card.overrideReasons[0] },
        outcomeTimestamp: '2026-11-20T14:01:00Z',
      },
    ]);
    expect(own).toEqual({ status: 200, body: { stored: 1, duplicates: 0 } });
    expect(await storedFeedback(card.uuid)).toMatchObject([
      { cardUuid: card.uuid, outcome: 'overridden', overrideReason: { code: card.overrideReasons[0].code } },
    ]);
  });

  it('one issuer serving several tenants: feedback only for the tenant whose call received the card', async () => {
    const card = await cardFor(vendor, 'ward-a');
    const item = {
      card: card.uuid,
      outcome: 'overridden',
      overrideReason: { reason: card.overrideReasons[0] },
      outcomeTimestamp: '2026-11-20T14:06:00Z',
    };
    expect((await feedbackAs(vendor, [item], 'ward-b')).status).toBe(404);
    expect((await feedbackAs(vendor, [item])).status).toBe(401); // this issuer lists tenants: a token without one is refused
    expect(await storedFeedback(card.uuid)).toEqual([]);
    expect(await feedbackAs(vendor, [item], 'ward-a')).toEqual({ status: 200, body: { stored: 1, duplicates: 0 } });
  });

  it('a suggestion id or an override reason the card did not offer is a 400 OperationOutcome, and nothing of the batch is stored', async () => {
    const card = await cardFor(north);
    const good = {
      card: card.uuid,
      outcome: 'accepted',
      acceptedSuggestions: [{ id: card.suggestions[0].uuid }],
      outcomeTimestamp: '2026-11-20T14:02:00Z',
    };
    const foreignSuggestion = { ...good, acceptedSuggestions: [{ id: randomUUID() }], outcomeTimestamp: '2026-11-20T14:03:00Z' };
    const r1 = await feedbackAs(north, [good, foreignSuggestion]);
    expect(r1.status).toBe(400);
    expect(r1.body.resourceType).toBe('OperationOutcome');
    expect(JSON.stringify(r1.body)).toContain('feedback.1.acceptedSuggestions.0.id');

    const reason = card.overrideReasons[0];
    for (const madeUp of [
      { ...reason, code: 'never-offered' },
      { ...reason, system: 'https://elsewhere.invented.example/reasons' },
    ]) {
      const r2 = await feedbackAs(north, [
        { card: card.uuid, outcome: 'overridden', overrideReason: { reason: madeUp }, outcomeTimestamp: '2026-11-20T14:04:00Z' },
      ]);
      expect(r2.status).toBe(400);
      expect(JSON.stringify(r2.body)).toContain('feedback.0.overrideReason.reason');
    }
    expect(await storedFeedback(card.uuid)).toEqual([]);
    expect((await feedbackAs(north, [good])).body).toEqual({ stored: 1, duplicates: 0 });
  });

  it('a record that names no issuer (written without a verified caller) takes no feedback from a verified client; it stays readable', async () => {
    const card = await cardFor(north);
    const owner = await s.svc.store.cardOwner(card.uuid);
    const stored = await s.svc.store.get(owner?.adviceId ?? '');
    if (!stored) throw new Error('fixture: the advice record');
    const { seq: _seq, hash: _hash, prevHash: _prev, client: _client, ...rest } = stored;
    const uuid = randomUUID();
    const old: AdviceRecord = { ...rest, id: randomUUID(), cards: [{ ...card, uuid }], cardKinds: { [uuid]: 'bolus-review' } };
    await s.svc.store.append(old);
    const r = await feedbackAs(north, [
      { card: uuid, outcome: 'overridden', overrideReason: { reason: card.overrideReasons[0] }, outcomeTimestamp: '2026-11-20T14:05:00Z' },
    ]);
    expect(r.status).toBe(404);
    expect((await get(`${s.url}/audit/advice/${old.id}`, AUDIT_HEADERS)).body).toMatchObject({ id: old.id, feedback: [] });
    expect((await get(`${s.url}/audit/verify`, AUDIT_HEADERS)).body).toMatchObject({ ok: true });
  });
});
