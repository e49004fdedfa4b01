// The rooms keep their promises (docs/architecture.md): the core is pure, and src/ has no import cycles.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const SRC = resolve(__dirname, '../../src');

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? files(p) : p.endsWith('.ts') && !p.endsWith('.d.ts') ? [p] : [];
  });
}
const all = files(SRC);
const importsOf = (file: string): string[] =>
  [...readFileSync(file, 'utf8').matchAll(/^\s*(?:import|export)\s[^'"]*?from\s+['"]([^'"]+)['"]/gm)].map((m) => m[1] as string);
const isTypeOnly = (file: string, spec: string): boolean =>
  new RegExp(`^\\s*(import|export) type [^;]*from\\s+['"]${spec.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&')}['"]`, 'm').test(readFileSync(file, 'utf8'));
const local = (file: string, spec: string): string | undefined => (spec.startsWith('.') ? resolve(dirname(file), spec.replace(/\.js$/, '.ts')) : undefined);

describe('pure rooms do no I/O', () => {
  const PURE = ['snapshot', 'physiology', 'assess', 'cards', 'pages', 'console'];
  const IO = /^(node:(fs|net|http|https|child_process|dgram)|fs|express|pg|better-sqlite3|fhir-kit-client|pino)$/;
  const pureFiles = all.filter((f) => PURE.includes(relative(SRC, f).split('/')[0] ?? ''));
  it('has files to check', () => expect(pureFiles.length).toBeGreaterThan(50));
  it.each(pureFiles.map((f) => [relative(SRC, f), f]))('%s', (_name, f) => {
    for (const spec of importsOf(f)) {
      // The card catalogue is read once at start-up (catalogue.ts), never per call.
      if (relative(SRC, f) === 'cards/catalogue.ts' && spec === 'node:fs') continue;
      expect(IO.test(spec), `${spec}`).toBe(false);
      const target = local(f, spec);
      if (target && !isTypeOnly(f, spec)) expect(relative(SRC, target)).not.toMatch(/^(http|fhir\/gather|audit\/(sqlite|postgres|open)-store|cli)\b/);
    }
    expect(readFileSync(f, 'utf8')).not.toMatch(/\bnew Date\(\)|Date\.now\(\)/);
  });
});

describe('no import cycles in src/', () => {
  it('the value-import graph is acyclic', () => {
    const graph = new Map<string, string[]>();
    for (const f of all) graph.set(f, importsOf(f).filter((s) => !isTypeOnly(f, s)).map((s) => local(f, s)).filter((x): x is string => !!x));
    const state = new Map<string, 'open' | 'done'>();
    const cycles: string[] = [];
    const visit = (n: string, path: string[]) => {
      if (state.get(n) === 'done') return;
      if (state.get(n) === 'open') {
        cycles.push([...path.slice(path.indexOf(n)), n].map((p) => relative(SRC, p)).join(' → '));
        return;
      }
      state.set(n, 'open');
      for (const m of graph.get(n) ?? []) visit(m, [...path, n]);
      state.set(n, 'done');
    };
    for (const f of all) visit(f, []);
    expect(cycles).toEqual([]);
  });
});

describe('advice carries codes, not prose (issue 19)', () => {
  const rel = (f: string) => relative(SRC, f);
  it('no code reads a finding\'s values back by key: decisions use the typed fields', () => {
    const offenders = all.filter((f) => /\.values\??\.(\[|[a-zA-Z_])/.test(readFileSync(f, 'utf8'))).map(rel);
    expect(offenders).toEqual([]);
  });
  it('the advice and the cards never branch on rule ids or on the words of reasons', () => {
    const rooms = all.filter((f) => /^(cards|assess\/advice)\//.test(rel(f)));
    expect(rooms.length).toBeGreaterThan(5);
    for (const f of rooms) {
      const src = readFileSync(f, 'utf8');
      expect(src, rel(f)).not.toMatch(/ruleId\s*===\s*['`]/);
      expect(src, rel(f)).not.toMatch(/\.test\([^)]*(reason|nextTest|rationale)/);
    }
  });
});
