// The rooms keep their promises (docs/architecture.md): the core is pure, src/ has no import cycles (files or rooms,
// type-only imports counted), and every import between rooms is one the doc's import table allows.
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

const SRC = resolve(__dirname, '../../src');

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    if (statSync(p).isDirectory()) return files(p);
    return p.endsWith('.ts') && !p.endsWith('.d.ts') ? [p] : [];
  });
}
const all = files(SRC);
const rel = (f: string) => relative(SRC, f);

interface Import {
  spec: string;
  typeOnly: boolean;
}
/** Every static import and re-export of a file; type-only when the statement or each of its names says `type`. */
function importsOf(file: string): Import[] {
  return [...readFileSync(file, 'utf8').matchAll(/^\s*(import|export)\s+(type\s+)?([^'";]*?)\s*from\s+['"]([^'"]+)['"]/gm)].map((m) => {
    const names = (m[3] ?? '').trim();
    const braced = /^\{([^}]*)\}$/.exec(names);
    const each = braced
      ? (braced[1] ?? '')
          .split(',')
          .map((n) => n.trim())
          .filter(Boolean)
      : [];
    return { spec: m[4] as string, typeOnly: !!m[2] || (each.length > 0 && each.every((n) => n.startsWith('type '))) };
  });
}
const local = (file: string, spec: string): string | undefined =>
  spec.startsWith('.') ? resolve(dirname(file), spec.replace(/\.js$/, '.ts')) : undefined;
/** The room of a file under src/: its first folder, or `*.ts` for the files at the top. */
const roomOf = (file: string): string => (rel(file).includes('/') ? (rel(file).split('/')[0] as string) : '*.ts');
/** Local imports of src/ files that stay in src/, with their target. */
const edges = all.flatMap((from) =>
  importsOf(from).flatMap((i) => {
    const to = local(from, i.spec);
    return to && !relative(SRC, to).startsWith('..') ? [{ from, to, typeOnly: i.typeOnly }] : [];
  }),
);

function cyclesOf(graph: Map<string, Set<string>>): string[] {
  const state = new Map<string, 'open' | 'done'>();
  const found: string[] = [];
  const visit = (n: string, path: string[]) => {
    if (state.get(n) === 'done') return;
    if (state.get(n) === 'open') {
      found.push([...path.slice(path.indexOf(n)), n].join(' → '));
      return;
    }
    state.set(n, 'open');
    for (const m of [...(graph.get(n) ?? [])].sort()) visit(m, [...path, n]);
    state.set(n, 'done');
  };
  for (const n of [...graph.keys()].sort()) visit(n, []);
  return found;
}
const graphOf = (pairs: Array<[string, string]>) => {
  const g = new Map<string, Set<string>>();
  for (const [a, b] of pairs) g.set(a, (g.get(a) ?? new Set()).add(b));
  return g;
};

/**
 * The import table of docs/architecture.md ("Rooms and what they may import"), read from the doc. Each cell of
 * "May import" is `everything`, `everything below` (the rooms of the rows under it), `nothing`, or a list of
 * `room`, `room (types)` (type-only imports) and `room/module` (that module only, or the folder of that name).
 */
interface Permission {
  room: string;
  typesOnly: boolean;
  module?: string;
  blanket?: true;
}
function importTable(): Map<string, Permission[] | 'everything'> {
  const doc = readFileSync(resolve(SRC, '../docs/architecture.md'), 'utf8');
  const section = doc.split(/^## /m).find((s) => s.startsWith('Rooms and what they may import')) ?? '';
  const rows = section
    .split('\n')
    .filter((l) => /^\| `src\//.test(l))
    .map((l) => l.split('|').map((c) => c.trim()));
  const rooms = rows.map((r) => /^`src\/([^`/]+)\/?`$/.exec(r[1] ?? '')?.[1] ?? '?');
  const table = new Map<string, Permission[] | 'everything'>();
  rows.forEach((r, i) => {
    const cell = r[3] ?? '';
    const room = rooms[i] as string;
    if (cell === 'everything') table.set(room, 'everything');
    else if (cell === 'everything below')
      table.set(
        room,
        rooms.slice(i + 1).map((x) => ({ room: x, typesOnly: false, blanket: true as const })),
      );
    else if (cell === 'nothing') table.set(room, []);
    else
      table.set(
        room,
        cell.split(',').map((item) => {
          const m = /^([a-z*.-]+)(\/[a-z/-]+)?( \(types\))?$/.exec(item.trim());
          if (!m) throw new Error(`docs/architecture.md, row ${room}: cannot read "${item.trim()}"`);
          return { room: m[1] as string, typesOnly: !!m[3], ...(m[2] ? { module: `${m[1]}${m[2]}` } : {}) };
        }),
      );
  });
  return table;
}
const allows = (p: Permission, to: string, typeOnly: boolean) =>
  p.room === roomOf(to) && (!p.typesOnly || typeOnly) && (!p.module || rel(to) === `${p.module}.ts` || rel(to).startsWith(`${p.module}/`));

describe('pure rooms do no I/O', () => {
  const PURE = ['snapshot', 'physiology', 'assess', 'cards', 'pages', 'console'];
  const IO = /^(node:(fs|net|http|https|child_process|dgram)|fs|express|pg|better-sqlite3|fhir-kit-client|pino)$/;
  const pureFiles = all.filter((f) => PURE.includes(relative(SRC, f).split('/')[0] ?? ''));
  it('has files to check', () => expect(pureFiles.length).toBeGreaterThan(50));
  it.each(pureFiles.map((f) => [relative(SRC, f), f]))('%s', (_name, f) => {
    for (const { spec, typeOnly } of importsOf(f)) {
      // The card catalogue is read once at start-up (catalogue.ts), never per call.
      if (relative(SRC, f) === 'cards/catalogue.ts' && spec === 'node:fs') continue;
      expect(IO.test(spec), `${spec}`).toBe(false);
      const target = local(f, spec);
      if (target && !typeOnly)
        expect(relative(SRC, target)).not.toMatch(/^(http|hooks\/gather|fhir\/fetcher|audit\/(sqlite|postgres|open)-store|cli)\b/);
    }
    expect(readFileSync(f, 'utf8')).not.toMatch(/\bnew Date\(\)|Date\.now\(\)/);
  });
});

describe('no import cycles in src/', () => {
  it('the file graph, type-only imports included, is acyclic', () => {
    expect(cyclesOf(graphOf(edges.map((e) => [rel(e.from), rel(e.to)])))).toEqual([]);
  });
  it('the room graph is acyclic, type-only imports included except those the table draws as `(types)`', () => {
    const table = importTable();
    const typesOnly = (from: string, to: string) => {
      const t = table.get(roomOf(from));
      return t !== 'everything' && !!t?.some((p) => p.typesOnly && allows(p, to, true));
    };
    const pairs = edges.filter((e) => roomOf(e.from) !== roomOf(e.to) && !(e.typeOnly && typesOnly(e.from, e.to)));
    expect(cyclesOf(graphOf(pairs.map((e) => [roomOf(e.from), roomOf(e.to)])))).toEqual([]);
  });
});

describe('the import table of docs/architecture.md', () => {
  const table = importTable();
  const roomsBuilt = [...new Set(all.map(roomOf))].sort();
  it('has one row for each room there is', () => {
    expect([...table.keys()].sort()).toEqual(roomsBuilt);
  });
  it('allows every import between rooms that the code makes', () => {
    const refused = edges
      .filter((e) => {
        const t = table.get(roomOf(e.from));
        return roomOf(e.from) !== roomOf(e.to) && t !== 'everything' && !t?.some((p) => allows(p, e.to, e.typeOnly));
      })
      .map((e) => `${rel(e.from)} → ${rel(e.to)}${e.typeOnly ? ' (types)' : ''}`);
    expect(refused).toEqual([]);
  });
  it('draws no permission the code does not use (except "everything" and "everything below")', () => {
    const unused: string[] = [];
    for (const [room, perms] of table) {
      if (perms === 'everything') continue;
      for (const p of perms.filter((x) => !x.blanket)) {
        const used = edges.some((e) => roomOf(e.from) === room && allows(p, e.to, e.typeOnly) && (!p.typesOnly || e.typeOnly));
        if (!used) unused.push(`${room}: ${p.module ?? p.room}${p.typesOnly ? ' (types)' : ''}`);
      }
    }
    expect(unused).toEqual([]);
  });
});

describe('advice carries codes, not prose (issue 19)', () => {
  const rel = (f: string) => relative(SRC, f);
  it("no code reads a finding's values back by key: decisions use the typed fields", () => {
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
