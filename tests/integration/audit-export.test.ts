// The audit command line's CSV export (one row per answer, RFC 4180, formula-safe) and `verify` on a path with no
// audit file (an error, and no empty database left behind). Child processes over a real SQLite audit file.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ADVICE_CASES } from '../helpers/advice-fixtures.js';
import { auditBin, auditCli } from '../helpers/audit-cli.js';
import { NOW, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';
import { post, startService, type Running } from '../helpers/server.js';

let s: Running;
let overriddenCard: { uuid: string; reason: { code: string; display: string } };

/** A minimal RFC 4180 reader for the test: quoted fields with doubled quotes, CRLF record ends. */
function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < text.length; i += 1) {
    const ch = text[i] as string;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i += 1;
      } else if (ch === '"') quoted = false;
      else cell += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ',') {
      row.push(cell);
      cell = '';
    } else if (ch === '\r' && text[i + 1] === '\n') {
      row.push(cell);
      rows.push(row);
      row = [];
      cell = '';
      i += 1;
    } else cell += ch;
  }
  return rows;
}

beforeAll(async () => {
  s = await startService({}, { now: () => NOW });
  const q = await post(`${s.url}/cds-services/bolus-review-select`, orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES.question) }));
  const card = q.body.cards[0];
  overriddenCard = { uuid: card.uuid, reason: card.overrideReasons[0] };
  await post(`${s.url}/cds-services/bolus-review-select/feedback`, {
    feedback: [
      {
        card: card.uuid,
        outcome: 'overridden',
        overrideReason: { reason: card.overrideReasons[0] },
        outcomeTimestamp: '2026-11-20T14:02:00Z',
      },
    ],
  });
  // A patient id that a spreadsheet would read as a formula (a valid FHIR id: letters, digits, '-' and '.').
  const hostile = orderSelectRequest({ prefetch: prefetchOf(ADVICE_CASES.proceed) });
  const h = await post(`${s.url}/cds-services/bolus-review-select`, { ...hostile, context: { ...hostile.context, patientId: '-2-3' } });
  expect(h.status, JSON.stringify(h.body).slice(0, 400)).toBe(200);
});
afterAll(async () => s.stop());

const cli = (...args: string[]) => auditCli({ TIDEMARK_SQLITE_PATH: s.dbPath }, ...args);

describe('export --format csv', () => {
  it('writes a header and one row per answer, newest first, with verdicts, indicator, kinds, feedback and latency', async () => {
    const r = await cli('export', '--format', 'csv');
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout.endsWith('\r\n')).toBe(true);
    const [header, ...rows] = parseCsv(r.stdout);
    expect(header).toEqual([
      'advice_id',
      'recorded_at',
      'service',
      'outcome',
      'patient_id',
      'encounter_id',
      'user_id',
      'responsiveness',
      'tolerance',
      'indicator',
      'card_kinds',
      'feedback_outcome',
      'override_reason',
      'rules_version',
      'latency_ms',
    ]);
    expect(rows).toHaveLength(2);
    const col = (row: string[], name: string) => row[(header as string[]).indexOf(name)];
    const [hostile, question] = rows as [string[], string[]];
    expect(col(question, 'responsiveness')).toBe('unlikely');
    expect(col(question, 'service')).toBe('bolus-review-select');
    expect(col(question, 'outcome')).toBe('answered');
    expect(col(question, 'user_id')).toBe('Practitioner/tm-prac-olsen');
    expect(col(question, 'card_kinds')).toMatch(/bolus-review/);
    expect(['info', 'warning', 'critical']).toContain(col(question, 'indicator'));
    expect(col(question, 'feedback_outcome')).toBe('overridden');
    expect(col(question, 'override_reason')).toBe(overriddenCard.reason.display);
    expect(Number(col(question, 'latency_ms'))).toBeGreaterThan(0);
    expect(col(question, 'rules_version')).toBe(s.svc.rulesVersion);
    expect(col(hostile, 'feedback_outcome')).toBe('');
    // The formula-looking patient id is prefixed with a quote (OWASP), so a spreadsheet shows it as text.
    expect(col(hostile, 'patient_id')).toBe("'-2-3");
    expect(r.stderr).toMatch(/2 records exported/);
  });

  it('NDJSON stays the default; an unknown format is refused with exit 2', async () => {
    const nd = await cli('export');
    expect(
      nd.stdout
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l).patientId),
    ).toEqual(['-2-3', 'tm-pat-ward4-017']);
    expect((await cli('export', '--format', 'xlsx')).status).toBe(2);
  });
});

describe('the tidemark-audit bin', () => {
  it('runs the same commands, its stdout holding only the result', async () => {
    const pkg = JSON.parse(readFileSync('package.json', 'utf8'));
    expect(pkg.bin).toEqual({ 'tidemark-audit': 'bin/tidemark-audit.mjs' });
    const v = await auditBin({ TIDEMARK_SQLITE_PATH: s.dbPath }, 'verify');
    expect(v).toMatchObject({ status: 0, stdout: 'audit chain intact: 2 records\n' });
    const e = await auditBin({ TIDEMARK_SQLITE_PATH: s.dbPath }, 'export');
    expect(
      e.stdout
        .trim()
        .split('\n')
        .map((l) => JSON.parse(l).id),
    ).toHaveLength(2);
    expect((await auditBin({}, 'shred')).status).toBe(2);
  });
});

describe('a path with no audit file', () => {
  it('verify says no audit file exists, exits non-zero and creates nothing', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tidemark-noaudit-'));
    const path = join(dir, 'sub', 'audit.sqlite');
    try {
      for (const args of [['verify'], ['export'], ['impact', '--thresholds', 'x.json']]) {
        const r = await auditCli({ TIDEMARK_SQLITE_PATH: path }, ...args);
        expect(r.status).toBe(1);
        expect(r.stderr).toMatch(/no audit file exists at .*audit\.sqlite/);
        expect(r.stdout).not.toMatch(/intact/);
      }
      expect(existsSync(path)).toBe(false);
      expect(existsSync(join(dir, 'sub'))).toBe(false);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
