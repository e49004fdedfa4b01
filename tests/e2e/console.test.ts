// The audit console in a real browser: Debian's chromium driven by playwright-core, the real service (real HTTP,
// a real SQLite trail). The trail is built by construction, as in tests/integration/impact.test.ts: three answers on
// a valid PPV of 14 % and two on 17 % (likely under the 13 % threshold), and the five cells of the advice matrix,
// all at NOW; then invented copies of some of them on two earlier days (new ids and card uuids, another patient),
// and feedback on a few cards. Expected numbers are counted here from the records as stored (store.get), not
// taken from the console. Checks: sign-in (a wrong credential refused), the overview's plots (the SVG marks'
// aria-labels and the text alternative against the counts), the chain status, filters narrowing the list, a record
// opening with its feedback, an impact run on PPV 15 % changing exactly the three 14 % records, a POST without
// its CSRF token refused, sign-out. Screenshots to tests/e2e/out/ (docs/img/ with TIDEMARK_UPDATE_SCREENSHOTS=1).
import { randomUUID } from 'node:crypto';
import { existsSync, mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import type { FhirResource } from 'fhir/r4.js';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import * as b from '../../examples/lib/fhir-builders.js';
import type { AdviceRecord, StoredAdvice } from '../../src/audit/types.js';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { basicResources, NOW, orderSelectRequest, PID, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, TEST_AUDIT_TOKEN, type Running } from '../helpers/server.js';

const CHROMIUM = process.env['TIDEMARK_CHROMIUM'] ?? '/usr/bin/chromium';
const ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];
const IMG = fileURLToPath(new URL(process.env['TIDEMARK_UPDATE_SCREENSHOTS'] === '1' ? '../../docs/img/' : './out/', import.meta.url));
const SERVICE = 'bolus-review-select';
const OTHER_PATIENT = 'tm-pat-ward2-031';
const DAY = 86_400_000;
const dayOf = (ms: number) => new Date(ms).toISOString().slice(0, 10);
// The service judges the invented data at NOW; the trail records the wall-clock time of each answer, so the days
// shown are those of the records as stored (`first`…`today` below), asked for explicitly.
let today = '';
let first = '';
const range = () => `from=${first}&to=${today}`;
const t = (m: number) => b.minutesAgo(NOW, m);

/** The basic invented patient with every validity condition of PPV met (as in tests/integration/impact.test.ts). */
function ppvCase(ppvPercent: number): Record<string, FhirResource[]> {
  const r = basicResources();
  r['hemodynamics'] = [b.numeric('ppv-1', PID, 'ppv', ppvPercent, t(6))];
  r['ventilation'] = [b.numeric('vt-1', PID, 'tidalVolume', 600, t(10)), b.numeric('fio2-1', PID, 'fio2', 35, t(10))];
  r['assessments'] = [
    b.coded('vent-1', PID, 'ventilationMode', 'controlled-no-effort', t(10)),
    b.coded('rhythm-1', PID, 'heartRhythm', 'sinus', t(10)),
    b.coded('chest-1', PID, 'chestStatus', 'closed', t(240)),
    b.numeric('iap-1', PID, 'intraAbdominalPressure', 8, t(120)),
  ];
  return r;
}

let s: Running;
let browser: Browser;
let page: Page;
const ids: Record<'ppv14' | 'ppv17' | 'matrix' | 'copies', string[]> = { ppv14: [], ppv17: [], matrix: [], copies: [] };
let records: StoredAdvice[] = [];
let overriddenIds: string[] = [];
const NOT_HYPO = {
  system: 'https://tidemark.invented.example/override',
  code: 'judged-not-hypovolaemic',
  display: 'Judged not hypovolaemic',
};

/** An invented copy of a stored answer, `days` earlier, with new ids and card uuids (and another patient). */
function copyOf(r: StoredAdvice, days: number): AdviceRecord {
  const { seq: _s, hash: _h, prevHash: _p, ...rec } = r;
  const uuids = new Map(r.cards.map((c) => [c.uuid ?? '', randomUUID()]));
  return {
    ...rec,
    id: randomUUID(),
    hookInstance: randomUUID(),
    recordedAt: new Date(Date.parse(r.recordedAt) - days * DAY).toISOString(),
    patientId: OTHER_PATIENT,
    cards: r.cards.map((c) => ({ ...c, uuid: uuids.get(c.uuid ?? '') ?? randomUUID() })),
    cardKinds: Object.fromEntries(Object.entries(r.cardKinds).map(([u, k]) => [uuids.get(u) ?? u, k])),
  };
}

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: run tests/setup/ensure-chromium.sh (npm test does)`);
  s = await startService({}, { now: () => NOW });
  let n = 0;
  const made: Array<['ppv14' | 'ppv17' | 'matrix', string]> = [];
  const answer = async (group: 'ppv14' | 'ppv17' | 'matrix', prefetch: Record<string, unknown>) => {
    const hookInstance = `00000000-0000-4000-8000-${String((n += 1)).padStart(12, '0')}`;
    const r = await post(`${s.url}/cds-services/${SERVICE}`, { ...orderSelectRequest({ prefetch }), hookInstance });
    expect(r.status).toBe(200);
    made.push([group, hookInstance]);
  };
  for (let i = 0; i < 3; i += 1) await answer('ppv14', prefetchOf(ppvCase(14)));
  for (let i = 0; i < 2; i += 1) await answer('ppv17', prefetchOf(ppvCase(17)));
  for (const c of Object.values(ADVICE_CASES)) await answer('matrix', prefetchOf(c));
  const listed = (await s.svc.store.list({ limit: 50 })).items;
  for (const [g, hi] of made) ids[g].push(listed.find((x) => x.hookInstance === hi)!.id);
  // Copies: the five matrix answers one day earlier, the two 17 % answers eight days earlier.
  for (const id of ids.matrix) {
    const c = copyOf((await s.svc.store.get(id))!, 1);
    await s.svc.store.append(c);
    ids.copies.push(c.id);
  }
  for (const id of ids.ppv17) {
    const c = copyOf((await s.svc.store.get(id))!, 8);
    await s.svc.store.append(c);
    ids.copies.push(c.id);
  }
  records = [];
  for (const id of [...ids.ppv14, ...ids.ppv17, ...ids.matrix, ...ids.copies]) records.push((await s.svc.store.get(id))!);
  // Feedback: the first 14 % answer's first card accepted, the second's overridden with a reason, a copy's overridden with a comment only.
  const firstCard = (id: string) => records.find((r) => r.id === id)!.cards[0]!.uuid!;
  const fb = (cardUuid: string, over: object) => ({
    cardUuid,
    acceptedSuggestions: [],
    outcomeTimestamp: NOW.toISOString(),
    receivedAt: NOW.toISOString(),
    service: SERVICE,
    ...over,
  });
  await s.svc.store.addFeedback([
    fb(firstCard(ids.ppv14[0]!), { outcome: 'accepted' }),
    fb(firstCard(ids.ppv14[1]!), { outcome: 'overridden', overrideReason: NOT_HYPO }),
    fb(firstCard(ids.copies[0]!), { outcome: 'overridden', userComment: 'discussed at the bedside' }),
  ] as never);
  overriddenIds = [ids.ppv14[1]!, ids.copies[0]!];
  today = records
    .map((r) => r.recordedAt.slice(0, 10))
    .sort()
    .at(-1)!;
  first = records.map((r) => r.recordedAt.slice(0, 10)).sort()[0]!;
  browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ARGS });
  page = await browser.newPage({ viewport: { width: 1180, height: 900 } });
  mkdirSync(IMG, { recursive: true });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await s?.stop();
});

const rowsOf = async (p: Page) => p.$$eval('#advice-list tbody tr', (trs) => trs.map((tr) => tr.getAttribute('data-id') ?? ''));
const sorted = (xs: string[]) => [...xs].sort();

describe('the audit console in chromium', () => {
  it('refuses a wrong credential, then signs in with the audit credential', async () => {
    await page.goto(`${s.url}/console`);
    expect(new URL(page.url()).pathname).toBe('/console/sign-in');
    await page.screenshot({ path: `${IMG}console-sign-in.png` });
    await page.fill('#credential', 'not-the-audit-credential-0000');
    await page.click('button[type=submit]');
    expect(await page.textContent('#sign-in-message')).toBe('The credential was not accepted.');
    await page.fill('#credential', TEST_AUDIT_TOKEN);
    await page.click('button[type=submit]');
    expect(new URL(page.url()).pathname).toBe('/console');
    expect(await page.textContent('h1')).toBe('Overview');
    await page.goto(`${s.url}/console?${range()}`);
  });

  it('the overview plots the counts of the trail: answers per day, feedback shares, verdict mix, latency, chain status', async () => {
    // Expected, counted from the stored records.
    const perDay = new Map<string, number>();
    for (const r of records) perDay.set(r.recordedAt.slice(0, 10), (perDay.get(r.recordedAt.slice(0, 10)) ?? 0) + 1);
    expect([...perDay.values()].sort()).toEqual([10, 2, 5].sort());
    expect(await page.textContent('#range-total')).toContain(`${records.length} answers`);
    expect(await page.textContent('#chain-status')).toBe(
      `Intact: all ${records.length} records checked, each hash covers the one before it.`,
    );

    // The bars of the answers plot: aria-label "{indicator} {count} at {day}", summed per day.
    const labels = await page.$$eval(`#answers-${SERVICE} svg [aria-roledescription="bar"]`, (els) =>
      els.map((e) => e.getAttribute('aria-label') ?? ''),
    );
    expect(labels.length).toBeGreaterThan(0);
    const barSum = new Map<string, number>();
    for (const l of labels) {
      const m = /^(\S+) (\d+) at (\d{4}-\d{2}-\d{2})$/.exec(l);
      expect(m, l).not.toBeNull();
      barSum.set(m![3]!, (barSum.get(m![3]!) ?? 0) + Number(m![2]));
    }
    expect(Object.fromEntries(barSum)).toEqual(Object.fromEntries(perDay));
    // By indicator: the most urgent card of each answer.
    const rank = { critical: 3, warning: 2, info: 1 } as Record<string, number>;
    const top = (r: StoredAdvice) => r.cards.map((c) => c.indicator).sort((a, z) => (rank[z] ?? 0) - (rank[a] ?? 0))[0] ?? 'none';
    const expectedBars = new Map<string, number>();
    for (const r of records)
      expectedBars.set(
        `${top(r)} at ${r.recordedAt.slice(0, 10)}`,
        (expectedBars.get(`${top(r)} at ${r.recordedAt.slice(0, 10)}`) ?? 0) + 1,
      );
    expect(sorted(labels)).toEqual(sorted([...expectedBars].map(([k, v]) => k.replace(' at ', ` ${v} at `))));
    // The text alternative carries the same numbers.
    const tableRows = await page.$$eval(`#answers-${SERVICE} table.chart-data tbody tr`, (trs) =>
      trs.map((tr) => `${tr.getAttribute('data-series')} ${tr.getAttribute('data-value')} at ${tr.getAttribute('data-x')}`),
    );
    expect(sorted(tableRows)).toEqual(sorted(labels));

    // Feedback shares per card kind: the table's cards per week, and the overridden marks.
    const kindsOf = new Map<string, number>();
    for (const r of records) for (const k of Object.values(r.cardKinds)) kindsOf.set(k, (kindsOf.get(k) ?? 0) + 1);
    for (const [kind, cards] of kindsOf) {
      const inTable = await page.$$eval(`[id="feedback-${kind}"] table tbody tr`, (trs) =>
        trs.map((tr) => Number(tr.getAttribute('data-cards'))),
      );
      expect(
        inTable.reduce((a, x) => a + x, 0),
        kind,
      ).toBe(cards);
    }
    const overriddenMarks = await page.$$eval('figure[id^="feedback-"] svg [aria-roledescription="bar"]', (els) =>
      els.map((e) => e.getAttribute('aria-label') ?? '').filter((l) => l.startsWith('overridden ')),
    );
    expect(overriddenMarks.map((l) => Number(/^overridden (\d+)/.exec(l)![1])).reduce((a, x) => a + x, 0)).toBe(2);
    const reasons = await page.$$eval('#override-reasons table tbody tr', (trs) =>
      trs.map((tr) => `${tr.getAttribute('data-series')}=${tr.getAttribute('data-value')}`),
    );
    expect(sorted(reasons)).toEqual(sorted([`${NOT_HYPO.code}=1`, '(comment only)=1']));

    // Verdict mix: the marks summed equal the answers; the likely × … answers as stored.
    const verdictLabels = await page.$$eval('#verdicts svg [aria-roledescription="bar"]', (els) =>
      els.map((e) => e.getAttribute('aria-label') ?? ''),
    );
    expect(verdictLabels.map((l) => Number(/ (\d+) at /.exec(l)![1])).reduce((a, x) => a + x, 0)).toBe(records.length);
    const likely = records.filter((r) => r.advice?.responsiveness?.value === 'likely').length;
    const likelyInPlot = verdictLabels
      .filter((l) => l.startsWith('likely × '))
      .map((l) => Number(/ (\d+) at /.exec(l)![1]))
      .reduce((a, x) => a + x, 0);
    expect(likelyInPlot).toBe(likely);

    // Latency: one point per day for p50 and p99; the day's answers in the table.
    const lat = await page.$$eval('#latency table tbody tr', (trs) =>
      trs.map((tr) => [tr.getAttribute('data-x'), Number(tr.getAttribute('data-answers'))]),
    );
    expect(Object.fromEntries(lat)).toEqual(Object.fromEntries(perDay));
    expect(await page.$$eval('#latency svg [aria-roledescription="point"]', (els) => els.length)).toBe(2 * perDay.size);
    await page.screenshot({ path: `${IMG}console-overview.png`, fullPage: true });
  });

  it('filters narrow the advice list (newest first)', async () => {
    await page.goto(`${s.url}/console/advice?${range()}`);
    expect(sorted(await rowsOf(page))).toEqual(sorted(records.map((r) => r.id)));
    const shown = await rowsOf(page);
    const bySeq = [...records].sort((a, z) => z.seq - a.seq).map((r) => r.id);
    expect(shown).toEqual(bySeq);

    await page.selectOption('select[name=feedback]', 'overridden');
    await page.click('form.filters button[type=submit]');
    expect(sorted(await rowsOf(page))).toEqual(sorted(overriddenIds));

    await page.selectOption('select[name=feedback]', '');
    await page.selectOption('select[name=responsiveness]', 'likely');
    await page.click('form.filters button[type=submit]');
    expect(sorted(await rowsOf(page))).toEqual(
      sorted(records.filter((r) => r.advice?.responsiveness?.value === 'likely').map((r) => r.id)),
    );

    await page.selectOption('select[name=responsiveness]', '');
    const yesterday = dayOf(Date.parse(`${today}T00:00:00Z`) - DAY);
    await page.fill('input[name=from]', yesterday);
    await page.fill('input[name=to]', yesterday);
    await page.click('form.filters button[type=submit]');
    expect(sorted(await rowsOf(page))).toEqual(sorted(ids.copies.slice(0, 5)));

    await page.fill('input[name=from]', first);
    await page.fill('input[name=to]', today);
    await page.fill('input[name=patient]', OTHER_PATIENT);
    await page.click('form.filters button[type=submit]');
    expect(sorted(await rowsOf(page))).toEqual(sorted(ids.copies));
    await page.fill('input[name=patient]', '');
    await page.click('form.filters button[type=submit]');
    await page.screenshot({ path: `${IMG}console-advice-list.png` });
  });

  it('a row opens the record: its reasoning page in full, with its feedback', async () => {
    const id = ids.ppv14[1]!;
    await page.click(`#advice-list tr[data-id="${id}"] a`);
    expect(new URL(page.url()).pathname).toBe(`/console/advice/${id}`);
    expect(await page.textContent('#verdicts h2')).toBe('Verdicts');
    expect(await page.$$eval('section#findings .finding', (els) => els.length)).toBeGreaterThan(0);
    expect(await page.getAttribute('#feedback tbody tr', 'data-outcome')).toBe('overridden');
    expect(await page.textContent('#feedback tbody tr')).toContain(`${NOT_HYPO.display} (${NOT_HYPO.code})`);
    await page.screenshot({ path: `${IMG}console-record.png` });
    await page.locator('#feedback').screenshot({ path: `${IMG}console-record-feedback.png` });
  });

  it('an impact run on a PPV threshold of 15 % shows exactly the three 14 % records changing from likely to indeterminate', async () => {
    await page.click('nav.console-bar >> text=Impact of a rule change');
    await page.fill('#thresholds', JSON.stringify({ responsiveness: { ppvThresholdPercent: 15 } }));
    await page.fill('input[name=from]', today);
    await page.fill('input[name=to]', today);
    await page.click('#impact-run');
    expect(await page.textContent('#report-totals')).toMatch(/^10 of 10 records re-run .*3 changed, 7 unchanged/);
    const verdict = page.locator('#changes tr[data-dimension="responsiveness"]');
    expect(await verdict.count()).toBe(1);
    expect(await verdict.getAttribute('data-from')).toBe('likely');
    expect(await verdict.getAttribute('data-to')).toBe('indeterminate');
    expect(await verdict.getAttribute('data-count')).toBe('3');
    const hrefs = await verdict.locator('a').evaluateAll((as) => as.map((a) => a.getAttribute('href') ?? ''));
    const examples = hrefs.map((h) => decodeURIComponent(h.split('/').pop() ?? ''));
    expect(sorted(examples)).toEqual(sorted(ids.ppv14));
    await page.screenshot({ path: `${IMG}console-impact.png`, fullPage: true });
    await verdict.locator('a').first().click();
    expect(ids.ppv14).toContain(new URL(page.url()).pathname.split('/').pop());
  });

  it('a POST without its CSRF token is refused', async () => {
    await page.goto(`${s.url}/console/impact`);
    await page.$eval('form.impact input[name=csrf]', (el) => el.remove());
    const [resp] = await Promise.all([
      page.waitForResponse((r) => r.url().endsWith('/console/impact') && r.request().method() === 'POST'),
      page.click('#impact-run'),
    ]);
    expect(resp.status()).toBe(403);
    expect(await page.textContent('h1')).toBe('Refused');
  });

  it('signs out: the console then asks for sign-in again', async () => {
    await page.goto(`${s.url}/console/advice?${range()}`);
    await page.click('form.sign-out button');
    expect(new URL(page.url()).pathname).toBe('/console/sign-in');
    await page.goto(`${s.url}/console`);
    expect(new URL(page.url()).pathname).toBe('/console/sign-in');
  });
});
