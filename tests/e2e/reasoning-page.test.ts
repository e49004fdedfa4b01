// The reasoning page in a real browser: Debian's chromium driven by playwright-core. The real service (real SQLite
// audit, real HTTP) answers two invented scenarios read from the embedded FHIR server; the card's signed link is
// opened in chromium. Checks: the verdicts against the stored advice and the catalogue's phrases; every plotted
// point and bar against the stored snapshot (value, time, and the x position on the shared time axis); times in
// the site zone (Intl, the ICU time-zone data, as the outside reference); the tampered-link, expired-link and
// unknown-id answers; the CSP (W3C CSP Level 3, frame-ancestors); screenshots saved to docs/img/.
// tests/setup/ensure-chromium.sh (run by `npm test`) installs chromium when it is missing; without it this file fails.
import { createHmac } from 'node:crypto';
import { existsSync, mkdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { chromium, type Browser, type Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import catalogue from '../../cards/catalogue.json' with { type: 'json' };
import { SCENARIOS, scenarioBundle } from '../../examples/scenarios/index.js';
import { runScenario, type ScenarioRun } from '../../examples/scenarios/run.js';
import { startEmbeddedFhir, type EmbeddedFhir } from '../../src/devserver/embedded-fhir.js';
import { NOT_FEASIBLE_WORDS, WHAT_IF_TEST_WORDS } from '../../src/pages/what-if-words.js';
import { startService, type Running } from '../helpers/server.js';

const CHROMIUM = process.env['TIDEMARK_CHROMIUM'] ?? '/usr/bin/chromium';
const ARGS = [
  '--no-sandbox',
  '--disable-gpu',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
  '--no-first-run',
];
const NOW = new Date('2026-11-20T14:00:00Z');
const KEY = 'e2e-link-key-0123456789abcdef0123456789';
const ZONE = 'Europe/Berlin';
const EHR = 'https://ehr.tern-hospital.example';
const FHIR_TOKEN = 'e2e-pages-fhir-token';
const AUDIT_TOKEN = 'e2e-pages-audit-token-0123456789';
// Screenshots go to tests/e2e/out/ (not tracked) on every run, and to docs/img/ (the pictures the docs show) only
// with TIDEMARK_UPDATE_SCREENSHOTS=1, so that a test run leaves the work tree as it found it.
const IMG = fileURLToPath(new URL(process.env['TIDEMARK_UPDATE_SCREENSHOTS'] === '1' ? '../../docs/img/' : './out/', import.meta.url));
const PICKED = ['responder-poor-tolerance', 'bolus-answered', 'tidal-volume-challenge'] as const;

let fhir: EmbeddedFhir;
let svc: Running;
let browser: Browser;
const runs = new Map<string, ScenarioRun>();

beforeAll(async () => {
  if (!existsSync(CHROMIUM)) throw new Error(`${CHROMIUM} is missing: run tests/setup/ensure-chromium.sh (npm test does)`);
  fhir = await startEmbeddedFhir({ requireToken: FHIR_TOKEN });
  svc = await startService(
    { TIDEMARK_AUDIT_TOKEN: AUDIT_TOKEN, TIDEMARK_LINK_KEY: KEY, TIDEMARK_TIME_ZONE: ZONE, TIDEMARK_FRAME_ANCESTORS: EHR },
    { now: () => NOW },
  );
  for (const id of PICKED) {
    const s = SCENARIOS.find((x) => x.id === id)!;
    const built = s.build(NOW);
    await fhir.load(scenarioBundle(built));
    runs.set(
      id,
      await runScenario(
        { serviceUrl: svc.url, fhirBaseUrl: fhir.baseUrl, fhirToken: FHIR_TOKEN, auditToken: AUDIT_TOKEN },
        s,
        built,
        'fhir-server',
      ),
    );
  }
  browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: ARGS });
  mkdirSync(IMG, { recursive: true });
}, 120_000);

afterAll(async () => {
  await browser?.close();
  await svc?.stop();
  await fhir?.close();
});

const linkOf = (run: ScenarioRun): string => {
  const cards = run.body.cards as Array<{ links?: Array<{ url: string; type: string; label: string }> }>;
  const l = cards[0]?.links?.find((x) => x.url.includes('/advice/'));
  if (!l) throw new Error('the card has no link to its reasoning page');
  expect(l.type).toBe('absolute');
  return onService(l.url);
};
/** The service listens on port 0, so its public URL (the links' origin) is not its address: keep path and query. */
const onService = (u: string): string => {
  const x = new URL(u);
  return `${svc.url}${x.pathname}${x.search}`;
};
const sign = (id: string, exp: number) => createHmac('sha256', KEY).update(`${id}.${exp}`).digest('base64url');
const hhmm = (iso: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone: ZONE, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(new Date(iso));

interface Mark {
  label: string;
  x: number;
  role: string;
}
async function marksOf(page: Page, plotId: string): Promise<Mark[]> {
  return page.$$eval(`#plot-${plotId} svg [aria-roledescription="point"], #plot-${plotId} svg [aria-roledescription="bar"]`, (els) =>
    els.map((e) => {
      const m = /translate\(([-\d.e]+),/.exec(e.getAttribute('transform') ?? '');
      const d = e.getAttribute('d') ?? '';
      // A bar is a path "M{x},{y}h{w}…": its x is the start of the path.
      const bx = /^M([-\d.e]+),/.exec(d);
      return {
        label: e.getAttribute('aria-label') ?? '',
        role: e.getAttribute('aria-roledescription') ?? '',
        x: Number(m?.[1] ?? bx?.[1] ?? NaN),
      };
    }),
  );
}
const parse = (label: string) => {
  const m = /^(.+) (-?[\d.]+) (.+) at (\S+)$/.exec(label);
  if (!m) throw new Error(`unexpected mark label: ${label}`);
  return { series: m[1]!, value: Number(m[2]), unit: m[3]!, t: m[4]! };
};

/** The values the snapshot holds for one kind inside the page's window, oldest first. */
function snapshotSeries(rec: any, kind: string, fromMs: number): Array<{ value: number; t: string }> {
  return (rec.snapshot.measurements as Array<{ kind: string; value: number; effective: string }>)
    .filter((m) => m.kind === kind && Date.parse(m.effective) >= fromMs && Date.parse(m.effective) <= NOW.getTime())
    .map((m) => ({ value: Math.round(m.value * 100) / 100, t: m.effective }))
    .sort((a, b) => Date.parse(a.t) - Date.parse(b.t));
}

describe.each(PICKED)('the reasoning page of scenario %s', (id) => {
  let page: Page;
  let rec: any;
  let hours: number;
  let status = 0;
  let headers: Record<string, string> = {};

  beforeAll(async () => {
    const run = runs.get(id)!;
    expect(run.status).toBe(200);
    rec = run.record;
    expect(rec?.snapshot).toBeDefined();
    page = await browser.newPage({ viewport: { width: 1100, height: 900 } });
    const resp = await page.goto(linkOf(run));
    status = resp?.status() ?? 0;
    headers = resp?.headers() ?? {};
    hours = Number(/last (\d+) h/.exec((await page.textContent('#trends-h')) ?? '')?.[1]);
  });
  afterAll(async () => page?.close());

  it('opens with 200 and the pages CSP: same origin only, no script, framed only by the configured EHR', () => {
    expect(status).toBe(200);
    const csp = headers['content-security-policy'] ?? '';
    expect(csp).toContain("default-src 'self'");
    expect(csp).toContain("script-src 'none'");
    expect(csp).toContain(`frame-ancestors ${EHR}`);
    expect(headers['x-content-type-options']).toBe('nosniff');
    expect(headers['referrer-policy']).toBe('no-referrer');
    expect(headers['cache-control']).toBe('no-store');
    expect(headers['x-frame-options']).toBeUndefined(); // it would forbid the framing the CSP allows
  });

  it('shows both verdicts in the catalogue words for the stored advice, and the headline', async () => {
    const cap = (s: string) => s[0]!.toUpperCase() + s.slice(1);
    const r = rec.advice.responsiveness.value as keyof typeof catalogue.phrases.responsiveness;
    const t = rec.advice.tolerance.value as keyof typeof catalogue.phrases.tolerance;
    expect((await page.textContent('[data-verdict="responsiveness"] .v'))?.trim()).toBe(cap(catalogue.phrases.responsiveness[r]));
    expect((await page.textContent('[data-verdict="tolerance"] .v'))?.trim()).toBe(cap(catalogue.phrases.tolerance[t]));
    expect((await page.textContent('#headline'))?.trim()).toBe(
      (catalogue.headlines as Record<string, string>)[rec.advice.recommendation.headline],
    );
    if (rec.advice.need) {
      expect((await page.textContent('[data-verdict="need"] .v'))?.trim()).toBe(
        cap(catalogue.phrases.need[rec.advice.need.value as keyof typeof catalogue.phrases.need]),
      );
    }
    if (rec.advice.responsiveness.confidence) {
      expect(await page.textContent('[data-verdict="responsiveness"]')).toContain(
        catalogue.phrases.confidence[rec.advice.responsiveness.confidence as keyof typeof catalogue.phrases.confidence],
      );
    }
    if (rec.advice.tolerance.coverage) {
      const c = rec.advice.tolerance.coverage;
      expect(await page.textContent('[data-verdict="tolerance"]')).toContain(`${c.assessed} of ${c.total} markers assessed`);
    }
    expect(await page.textContent('#cautions')).toContain(catalogue.cautions[1]);
  });

  it('shows the what-if table: one row per test as the stored advice has it, feasibility, outcomes and the decisive test', async () => {
    const w = rec.advice.whatIf as {
      rows: Array<{
        test: keyof typeof WHAT_IF_TEST_WORDS;
        feasible: boolean;
        notFeasible: Array<keyof typeof NOT_FEASIBLE_WORDS>;
        outcomes: Array<{ result: string; changes: boolean; responsiveness: string }>;
      }>;
      decisive?: string;
    };
    expect(w.rows).toHaveLength(4);
    const rows = await page.$$eval('#what-if table.what-if tbody tr', (trs) =>
      trs.map((tr) => ({
        test: tr.getAttribute('data-test'),
        feasible: tr.getAttribute('data-feasible'),
        decisive: tr.getAttribute('data-decisive'),
        text: tr.textContent ?? '',
        cells: [...tr.querySelectorAll('td[data-result]')].map((td) => ({
          result: td.getAttribute('data-result'),
          changes: td.getAttribute('data-changes'),
          text: td.textContent ?? '',
        })),
      })),
    );
    expect(rows.map((r) => r.test)).toEqual(w.rows.map((r) => r.test));
    for (const [i, r] of w.rows.entries()) {
      const shown = rows[i]!;
      expect(shown.feasible).toBe(r.feasible ? 'yes' : 'no');
      expect(shown.decisive).toBe(w.decisive === r.test ? 'yes' : null);
      expect(shown.text).toContain(WHAT_IF_TEST_WORDS[r.test]);
      for (const n of r.notFeasible) expect(shown.text).toContain(NOT_FEASIBLE_WORDS[n]);
      expect(shown.cells.map((c) => [c.result, c.changes])).toEqual(r.outcomes.map((o) => [o.result, o.changes ? 'yes' : 'no']));
      for (const [j, o] of r.outcomes.entries()) {
        expect(shown.cells[j]!.text).toContain(
          catalogue.phrases.responsiveness[o.responsiveness as keyof typeof catalogue.phrases.responsiveness],
        );
      }
    }
    if (id === 'responder-poor-tolerance') {
      // A valid PPV of 15 % (≥ 13 %, Michard 2000) decides "likely" (moderate); no flow monitor, spontaneous breathing: the mini fluid
      // challenge with VTI by echo
      // (ΔVTI ≥ 10 %, Muller 2011) is the test offered, and a negative one would make it unclear (a conflict): decisive.
      expect(w.decisive).toBe('mini-fluid-challenge');
      expect(rows[0]).toMatchObject({ test: 'mini-fluid-challenge', feasible: 'yes', decisive: 'yes' });
      expect(rows[0]!.cells[0]!.text).toContain('VTI by echo +11 % (threshold ≥ 10 %)');
      expect(rows[0]!.cells[1]).toMatchObject({ result: 'negative', changes: 'yes' });
      expect(rows[0]!.cells[1]!.text).toContain('Responsiveness unclear');
      expect(rows.find((r) => r.test === 'passive-leg-raise')?.text).toContain(NOT_FEASIBLE_WORDS['no-flow-monitor']);
      expect(await page.textContent('#what-if-decisive')).toContain(WHAT_IF_TEST_WORDS['mini-fluid-challenge']);
      await page.locator('#what-if').screenshot({ path: `${IMG}reasoning-what-if-${id}.png` });
    }
    if (id === 'tidal-volume-challenge') {
      // A positive tidal volume challenge (ΔPPV ≥ 3.5 points, Myatra 2017) decided it with high confidence: settled.
      expect(w.decisive).toBeUndefined();
      expect(rows.find((r) => r.test === 'tidal-volume-challenge')?.text).toContain(NOT_FEASIBLE_WORDS['already-done']);
      expect(await page.textContent('#what-if-decisive')).toContain('no further test is named as deciding');
    }
  });

  it('has a window of 12 or 24 h and every numeric plot point matches the snapshot (value and time)', async () => {
    expect([12, 24]).toContain(hours);
    const fromMs = NOW.getTime() - hours * 3_600_000;
    const checks: Array<[string, string, string]> = [
      ['map-hr', 'MAP', 'meanBp'],
      ['map-hr', 'Heart rate', 'heartRate'],
      ['cvp', 'CVP', 'cvp'],
      ['lactate', 'Lactate', 'lactate'],
      ['dynamic', 'PPV', 'ppv'],
      ['dynamic', 'SVV', 'svv'],
    ];
    let compared = 0;
    for (const [plot, series, kind] of checks) {
      const want = snapshotSeries(rec, kind, fromMs);
      const got = (await marksOf(page, plot))
        .filter((m) => m.role === 'point')
        .map((m) => parse(m.label))
        .filter((m) => m.series === series);
      expect(
        got.map((g) => [g.value, g.t]),
        `${series}`,
      ).toEqual(want.map((w) => [w.value, w.t]));
      compared += want.length;
    }
    expect(compared).toBeGreaterThan(20);
    // Dynamic tests: the change from before to after, in % of before for flow, in points for PPV/SVV (Myatra 2017).
    const tests = (rec.snapshot.dynamicTests as Array<{ before: number; after: number; effective: string; measured: string }>)
      .filter((d) => Date.parse(d.effective) >= fromMs)
      .map((d) => [
        ['ppv', 'svv'].includes(d.measured)
          ? Math.round((d.after - d.before) * 10) / 10
          : Math.round(((d.after - d.before) / d.before) * 1000) / 10,
        d.effective,
      ]);
    const got = (await marksOf(page, 'dynamic')).map((m) => parse(m.label)).filter((m) => m.series === 'Dynamic test');
    expect(got.map((g) => [g.value, g.t]).sort()).toEqual(tests.sort());
    if (id === 'tidal-volume-challenge') expect(tests).toHaveLength(1);
  });

  it('fluids given are bars, the draft bolus a point at now, urine output per hour matches volume over period', async () => {
    const fromMs = NOW.getTime() - hours * 3_600_000;
    const fluids = (await marksOf(page, 'fluids')).map((m) => parse(m.label));
    const given = (rec.snapshot.fluids as Array<{ volumeMl: number; end: string; start: string }>).filter(
      (f) => Date.parse(f.end) >= fromMs || Date.parse(f.start) >= fromMs,
    );
    expect(
      fluids
        .filter((f) => f.series === 'Fluid given')
        .map((f) => [f.value, f.t])
        .sort(),
    ).toEqual(given.map((g) => [g.volumeMl, g.end]).sort());
    const draft = (rec.snapshot.draftOrders as Array<{ selected: boolean; isFluid: boolean; volumeMl?: number }>).find(
      (d) => d.selected && d.isFluid,
    );
    expect(fluids.filter((f) => f.series === 'Draft bolus (now)').map((f) => [f.value, f.t])).toEqual([
      [draft!.volumeMl, NOW.toISOString()],
    ]);
    const urine = (await marksOf(page, 'urine-balance')).map((m) => parse(m.label)).filter((m) => m.series === 'Urine output');
    const want = (rec.snapshot.measurements as Array<{ kind: string; value: number; effective: string; periodStart?: string }>)
      .filter((m) => m.kind === 'urineOutput' && m.periodStart && Date.parse(m.effective) >= fromMs)
      .map((m) => [Math.round((m.value / ((Date.parse(m.effective) - Date.parse(m.periodStart!)) / 3_600_000)) * 10) / 10, m.effective]);
    expect(urine.map((u) => [u.value, u.t]).sort()).toEqual(want.sort());
    expect(urine.length).toBeGreaterThan(3);
  });

  it('places points on one shared time axis: x is proportional to time, the same scale in every plot', async () => {
    // Plot width 640 px over the window plus 30 min after now (src/pages/plots.ts, trends.ts).
    const pxPerMs = 640 / ((hours * 60 + 30) * 60_000);
    const all = [] as Array<{ x: number; t: number }>;
    for (const plot of ['map-hr', 'cvp', 'lactate', 'dynamic']) {
      for (const m of (await marksOf(page, plot)).filter((x) => x.role === 'point')) all.push({ x: m.x, t: Date.parse(parse(m.label).t) });
    }
    expect(all.length).toBeGreaterThan(10);
    const t0 = NOW.getTime() - hours * 3_600_000;
    for (const p of all) expect(Math.abs(p.x - (p.t - t0) * pxPerMs)).toBeLessThan(1);
  });

  it('has a text alternative per plot: a summary and a table with one row per mark, times in the site zone', async () => {
    for (const plot of ['map-hr', 'cvp', 'lactate', 'urine-balance', 'fluids', 'dynamic']) {
      const rows = await page.$$eval(`#plot-${plot} table.plot-data tbody tr`, (trs) =>
        trs.map((tr) => ({ label: tr.getAttribute('aria-label') ?? '', time: tr.querySelector('td')?.textContent ?? '' })),
      );
      const marks = await marksOf(page, plot);
      expect(await page.textContent(`#plot-${plot}-summary`)).toBeTruthy();
      for (const m of marks) expect(rows.map((r) => r.label)).toContain(m.label);
      for (const r of rows) expect(r.time).toContain(hhmm(parse(r.label).t));
    }
  });

  it('lists the evidence with FHIR references and the rules version', async () => {
    const text = (await page.textContent('main')) ?? '';
    const refs = (rec.findings as Array<{ evidence: Array<{ ref: string }> }>).flatMap((f) => f.evidence.map((e) => e.ref));
    expect(refs.length).toBeGreaterThan(3);
    for (const r of refs) expect(text).toContain(r);
    expect(text).toContain(rec.rulesVersion);
  });

  it('saves screenshots (the top, the trends, and the top in print)', async () => {
    await page.screenshot({ path: `${IMG}reasoning-page-${id}.png` });
    await page.locator('#trends').screenshot({ path: `${IMG}reasoning-trends-${id}.png` });
    if (id === PICKED[0]) {
      await page.emulateMedia({ media: 'print' });
      await page.screenshot({ path: `${IMG}reasoning-page-print.png`, clip: { x: 0, y: 0, width: 1100, height: 1600 }, fullPage: true });
      await page.emulateMedia({ media: 'screen' });
    }
    expect(existsSync(`${IMG}reasoning-trends-${id}.png`)).toBe(true);
  });
});

describe('refused links', () => {
  it('a tampered signature, a changed expiry or id get 403 with a plain page; an expired link 403; an unknown id 404', async () => {
    const url = new URL(linkOf(runs.get(PICKED[0])!));
    const id = url.pathname.split('/').pop()!;
    const exp = Number(url.searchParams.get('exp'));
    expect(exp).toBe(NOW.getTime() / 1000 + 12 * 3600); // default lifetime 12 h
    const page = await browser.newPage({ viewport: { width: 900, height: 500 } });
    const sig = url.searchParams.get('sig')!;
    const flipped = `${sig.slice(0, -2)}${sig.slice(-2) === 'AA' ? 'AB' : 'AA'}`;
    for (const bad of [
      `${url.origin}/advice/${id}?exp=${exp}&sig=${flipped}`,
      `${url.origin}/advice/${id}?exp=${exp + 60}&sig=${sig}`,
      `${url.origin}/advice/${id}?exp=${exp}`,
    ]) {
      const r = await page.goto(bad);
      expect(r?.status()).toBe(403);
      expect(await page.textContent('h1')).toBe('This link is not valid');
      expect(r?.headers()['content-security-policy']).toContain("default-src 'self'");
    }
    await page.screenshot({ path: `${IMG}reasoning-link-refused.png` });
    const past = NOW.getTime() / 1000 - 60;
    const expired = await page.goto(`${url.origin}/advice/${id}?exp=${past}&sig=${sign(id, past)}`);
    expect(expired?.status()).toBe(403);
    expect(await page.textContent('h1')).toBe('This link has expired');
    await page.screenshot({ path: `${IMG}reasoning-link-expired.png` });
    const other = '00000000-0000-4000-8000-000000000000';
    expect((await page.goto(`${url.origin}/advice/${other}?exp=${exp}&sig=${sign(other, exp)}`))?.status()).toBe(404);
    await page.close();
  });

  it('the card’s docs link opens a human HTML page, and the .md route still gives Markdown', async () => {
    const cards = runs.get(PICKED[0])!.body.cards as Array<{ source: { url: string } }>;
    const page = await browser.newPage();
    const r = await page.goto(onService(cards[0]!.source.url));
    expect(r?.status()).toBe(200);
    expect(r?.headers()['content-type']).toContain('text/html');
    expect(await page.$$eval('h1', (hs) => hs.length)).toBeGreaterThan(0);
    await page.close();
    const md = await fetch(`${onService(cards[0]!.source.url)}.md`);
    expect(md.headers.get('content-type')).toContain('text/markdown');
  });
});
