/**
 * `npm run demo` (tsx src/cli/demo.ts): the whole job in one command, on invented patients only.
 *   1. starts an embedded FHIR R4 server (src/devserver/embedded-fhir.ts) and loads every scenario of
 *      examples/scenarios/ (invented patients of the invented Harbourside General Hospital), times relative to now;
 *   2. starts Tidemark (buildService, a temporary SQLite audit file, local trial mode) on 127.0.0.1;
 *   3. sends every scenario over real HTTP twice: with fhirServer + fhirAuthorization and no prefetch (Tidemark
 *      queries the FHIR server), and with a full prefetch built by running the service's own templates against the
 *      FHIR server, as a CDS client would;
 *   4. prints each answer readably and a summary table; the verdicts come from the audit record.
 * The exit code is 0 even when an answer differs from a scenario's expectation (it is a demo); 1 only when the
 * demo itself cannot run. Writes to stdout with process.stdout.write (no console.log in src/).
 */
import { randomBytes } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { SCENARIOS, scenarioBundle } from '../../examples/scenarios/index.js';
import { expectationText, mismatches, observedVerdicts, type ObservedVerdicts } from '../../examples/scenarios/expectations.js';
import { runScenario, type RouteKind, type RunTargets, type ScenarioRun } from '../../examples/scenarios/run.js';
import type { BuiltScenario } from '../../examples/scenarios/types.js';
import { loadConfig } from '../config/config.js';
import { startEmbeddedFhir, type EmbeddedFhir } from '../devserver/embedded-fhir.js';
import { cardSchema } from '../hooks/schemas.js';
import { createLogger } from '../log.js';
import { buildService, type Service } from '../service.js';

const useColour = process.stdout.isTTY === true && !process.env['NO_COLOR'];
const paint = (code: string) => (s: string) => (useColour ? `\u001b[${code}m${s}\u001b[0m` : s);
const bold = paint('1');
const dim = paint('2');
const red = paint('31');
const green = paint('32');
const yellow = paint('33');
const cyan = paint('36');

function out(line = ''): void {
  process.stdout.write(`${line}\n`);
}

const ROUTE_LABEL: Record<RouteKind, string> = { 'fhir-server': 'via FHIR server', prefetch: 'via prefetch' };
const ROUTE_SHORT: Record<RouteKind, string> = { 'fhir-server': 'fhir', prefetch: 'prefetch' };

function indicatorBadge(indicator: string): string {
  const label = ` ${indicator.toUpperCase()} `;
  const colour: Record<string, (s: string) => string> = { critical: red, warning: yellow };
  return (colour[indicator] ?? cyan)(bold(label));
}

/** Markdown of a card detail → its lines as a prescriber reads them (escapes and emphasis removed, links as their label). */
function detailLines(detail: string | undefined): string[] {
  if (!detail) return [];
  const unescape = (s: string) =>
    s
      .replace(/\\([\\`*_{}[\]()#+\-.!|>~<:/])/g, '$1')
      .replace(/&lt;/g, '<')
      .replace(/&gt;/g, '>')
      .replace(/&quot;/g, '"')
      .replace(/&amp;/g, '&');
  return detail
    .split('\n')
    .filter((l) => l.trim())
    .map((l) =>
      unescape(
        l
          .replace(/\[([^\]]+)\]\([^)]*\)/g, '[$1]')
          .replace(/\*\*([^*]+)\*\*/g, '$1')
          .replace(/^\* /, '· ')
          .replace(/^\*(.+)\*( |$)/, '$1$2'),
      ),
    );
}

function printCards(run: ScenarioRun): void {
  const cards = run.body.cards ?? [];
  if (run.status !== 200) {
    const issue = (run.body['issue'] as Array<{ details?: { text?: string } }> | undefined)?.[0]?.details?.text;
    out(`   ${red(`HTTP ${run.status}`)} ${issue ?? ''}`);
    return;
  }
  if (cards.length === 0) {
    out(`   ${dim('no card (Tidemark stays silent)')}`);
    return;
  }
  for (const card of cards) {
    const valid = cardSchema.safeParse(card);
    out(
      `   ${indicatorBadge(String(card['indicator']))} ${bold(String(card['summary']))}${valid.success ? '' : red('  (card does not pass the CDS Hooks card schema)')}`,
    );
    const detail = String(card['detail'] ?? '');
    for (const l of detailLines(detail)) out(`     ${l}`);
    out(dim(`     (detail: ${detail.length} characters, ${detail.split('\n').filter((l) => l.trim()).length} lines)`));
    const suggestions = (card['suggestions'] as Array<{ label?: string; isRecommended?: boolean }> | undefined) ?? [];
    out(
      `     ${bold('Suggestions')} ${suggestions.length ? suggestions.map((s) => `[${s.label ?? ''}${s.isRecommended ? ' (recommended)' : ''}]`).join(' ') : dim('none')}`,
    );
  }
}

interface Row {
  scenario: string;
  route: RouteKind;
  observed: ObservedVerdicts;
  expected: string;
  problems: string[];
  status: number;
}

function table(rows: Row[]): void {
  const head = ['scenario', 'path', 'responsiveness', 'tolerance', 'indicator', 'expected', 'match'];
  const cells = rows.map((r) => [
    r.scenario,
    ROUTE_SHORT[r.route],
    r.status === 200 ? (r.observed.responsiveness ?? 'not given') : `HTTP ${r.status}`,
    r.status === 200 ? (r.observed.tolerance ?? 'not given') : '-',
    r.observed.indicator,
    r.expected,
    r.problems.length ? 'NO' : 'yes',
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...cells.map((c) => (c[i] ?? '').length)));
  const line = (c: string[]) =>
    c
      .map((x, i) => x.padEnd(widths[i] ?? 0))
      .join('  ')
      .trimEnd();
  out(bold(line(head)));
  out(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const c of cells) {
    const text = line(c);
    out(c[6] === 'NO' ? red(text) : text);
  }
}

async function listen(handler: Parameters<typeof createServer>[1]): Promise<Server> {
  const server = createServer(handler);
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => resolve());
  });
  return server;
}

async function main(): Promise<number> {
  const started = performance.now();
  out(bold('Tidemark demo: invented ICU scenarios at the invented Harbourside General Hospital (no real patients)'));
  out(dim('Advisory only. Trial mode, in-memory FHIR server, temporary audit file: nothing here is for patient care.'));
  out();

  const fhirToken = randomBytes(18).toString('hex');
  const auditToken = randomBytes(18).toString('hex');
  const dir = mkdtempSync(join(tmpdir(), 'tidemark-demo-'));
  let fhir: EmbeddedFhir | undefined;
  let svc: Service | undefined;
  let server: Server | undefined;
  try {
    fhir = await startEmbeddedFhir({ requireToken: fhirToken });
    out(`  FHIR R4 server   ${fhir.baseUrl}  ${dim('(@medplum/fhir-router over an in-memory repository)')}`);

    // The service: the app buildService wires for production, on a port chosen by the system.
    let app: Service['app'] | undefined;
    server = await listen((req, res) => (app ? app(req, res) : res.writeHead(503).end()));
    const port = (server.address() as AddressInfo).port;
    const publicUrl = `http://127.0.0.1:${port}`;
    const cfg = loadConfig({
      PORT: String(port),
      HOST: '127.0.0.1',
      TIDEMARK_PUBLIC_URL: publicUrl,
      TIDEMARK_TRIAL_MODE: 'true',
      TIDEMARK_SQLITE_PATH: join(dir, 'audit.sqlite'),
      TIDEMARK_AUDIT_TOKEN: auditToken,
      TIDEMARK_LOG_LEVEL: 'silent',
      // The cards show local clock times in the site's zone: the demo takes TIDEMARK_TIME_ZONE from the environment.
      ...(process.env['TIDEMARK_TIME_ZONE'] ? { TIDEMARK_TIME_ZONE: process.env['TIDEMARK_TIME_ZONE'] } : {}),
    });
    svc = await buildService(cfg, { log: createLogger('silent') });
    app = svc.app;
    out(
      `  Tidemark         ${publicUrl}/cds-services  ${dim(`(trial mode, audit ${svc.store.kind} in ${dir}; card times in ${cfg.TIDEMARK_TIME_ZONE})`)}`,
    );

    const now = new Date();
    const built = new Map<string, BuiltScenario>();
    let count = 0;
    for (const s of SCENARIOS) {
      const b = s.build(now);
      built.set(s.id, b);
      await fhir.load(scenarioBundle(b));
      count += b.resources.length;
    }
    out(`  Loaded ${SCENARIOS.length} scenarios, ${count} FHIR resources, times relative to ${now.toISOString().slice(0, 16)}Z`);
    out();

    const targets: RunTargets = { serviceUrl: publicUrl, fhirBaseUrl: fhir.baseUrl, fhirToken, auditToken };
    const rows: Row[] = [];
    for (const [i, s] of SCENARIOS.entries()) {
      const b = built.get(s.id) as BuiltScenario;
      out(bold(`[${i + 1}/${SCENARIOS.length}] ${s.id}`) + dim(`  ${s.ward} · ${b.hook}`));
      out(`   ${s.title}`);
      out(`   ${dim('A careful intensivist:')} ${dim(s.conclusion)}`);
      const runs: ScenarioRun[] = [];
      for (const route of ['fhir-server', 'prefetch'] as const) runs.push(await runScenario(targets, s, b, route));
      out(
        `   ${runs.map((r) => `${ROUTE_LABEL[r.route]}: HTTP ${r.status}, ${(r.body.cards ?? []).length} card(s), ${Math.round(r.ms)} ms`).join('   ')}`,
      );
      const first = runs[0] as ScenarioRun;
      printCards(first);
      for (const r of runs) {
        const observed = observedVerdicts(r.record, r.body.cards ?? []);
        const problems = r.status === 200 ? mismatches(s.expect, observed) : [`HTTP ${r.status}`];
        rows.push({ scenario: s.id, route: r.route, observed, expected: expectationText(s.expect), problems, status: r.status });
      }
      const [a, c] = rows.slice(-2) as [Row, Row];
      const verdictText = (o: ObservedVerdicts) =>
        `responsiveness ${o.responsiveness ?? 'not given'} · tolerance ${o.tolerance ?? 'not given'} · indicator ${o.indicator}`;
      out(`   ${bold('Verdicts')} ${verdictText(a.observed)}   ${dim(`expected ${expectationText(s.expect)}`)}`);
      if (verdictText(a.observed) !== verdictText(c.observed)) out(`   ${yellow('prefetch path differs:')} ${verdictText(c.observed)}`);
      for (const r of [a, c]) if (r.problems.length) out(`   ${red(`MISMATCH (${ROUTE_SHORT[r.route]}):`)} ${r.problems.join('; ')}`);
      if (!a.problems.length && !c.problems.length) out(`   ${green('matches the expectation on both paths')}`);
      out();
    }

    out(bold('Summary'));
    table(rows);
    const bad = rows.filter((r) => r.problems.length).length;
    out();
    out(
      bad === 0
        ? green(`All ${rows.length} answers match what a careful intensivist would conclude.`)
        : yellow(
            `${rows.length - bad} of ${rows.length} answers match; ${bad} do not (see MISMATCH above). A demo: exit code 0 all the same.`,
          ),
    );
    out(
      dim(
        `Done in ${((performance.now() - started) / 1000).toFixed(1)} s. The servers, the audit file and the tokens existed only for this run.`,
      ),
    );
    return 0;
  } finally {
    if (server) {
      const s = server;
      await new Promise<void>((r) => {
        s.close(() => r());
        s.closeAllConnections();
      });
    }
    await svc?.close();
    await fhir?.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

main().then(
  (code) => process.exit(code),
  (e: unknown) => {
    process.stderr.write(`demo failed: ${(e as Error)?.stack ?? String(e)}\n`);
    process.exit(1);
  },
);
