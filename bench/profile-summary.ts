/**
 * Summarises a V8 .cpuprofile (node --cpu-prof): the top self-time entries by function, and self time by
 * package or source file. Usable on its own:  npx tsx bench/profile-summary.ts <file.cpuprofile> [top]
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

interface ProfileNode {
  id: number;
  callFrame: { functionName: string; url: string; lineNumber: number; columnNumber: number };
  children?: number[];
}
interface Profile {
  nodes: ProfileNode[];
  samples: number[];
  timeDeltas: number[];
  startTime: number;
  endTime: number;
}

export interface SelfTime {
  name: string;
  where: string;
  ms: number;
  pct: number;
}

function shortUrl(url: string): string {
  if (!url) return '(native)';
  const nm = url.lastIndexOf('node_modules/');
  if (nm >= 0) return url.slice(nm + 'node_modules/'.length);
  const root = url.indexOf('/work/main/');
  if (root >= 0) return url.slice(root + '/work/main/'.length);
  return url.replace(/^file:\/\//, '');
}

/** The package (node_modules/<pkg>) or source file a frame belongs to. */
function owner(url: string): string {
  if (!url) return '(native / GC / idle)';
  if (url.startsWith('node:')) return url;
  const nm = url.lastIndexOf('node_modules/');
  if (nm >= 0) {
    const rest = url.slice(nm + 'node_modules/'.length).split('/');
    return rest[0]?.startsWith('@') ? `${rest[0]}/${rest[1] ?? ''}` : (rest[0] ?? url);
  }
  return shortUrl(url);
}

export function summarise(file: string, top = 25): { total: number; byFunction: SelfTime[]; byOwner: SelfTime[] } {
  const p = JSON.parse(readFileSync(file, 'utf8')) as Profile;
  const byId = new Map(p.nodes.map((n) => [n.id, n]));
  const self = new Map<number, number>();
  for (let i = 0; i < p.samples.length; i += 1) {
    const id = p.samples[i] as number;
    self.set(id, (self.get(id) ?? 0) + (p.timeDeltas[i] ?? 0));
  }
  let total = 0;
  const fn = new Map<string, SelfTime>();
  const own = new Map<string, SelfTime>();
  for (const [id, us] of self) {
    const n = byId.get(id);
    if (!n) continue;
    const ms = us / 1000;
    const name = n.callFrame.functionName || '(anonymous)';
    if (name === '(idle)' || name === '(program)') {
      // idle time is not work; (program) is native work outside JS
      if (name === '(idle)') continue;
    }
    total += ms;
    const where = `${shortUrl(n.callFrame.url)}${n.callFrame.url ? `:${n.callFrame.lineNumber + 1}` : ''}`;
    const key = `${name} ${where}`;
    const f = fn.get(key) ?? { name, where, ms: 0, pct: 0 };
    f.ms += ms;
    fn.set(key, f);
    const ok = name === '(garbage collector)' || name === '(program)' ? name : owner(n.callFrame.url);
    const o = own.get(ok) ?? { name: ok, where: '', ms: 0, pct: 0 };
    o.ms += ms;
    own.set(ok, o);
  }
  const rank = (m: Map<string, SelfTime>) =>
    [...m.values()]
      .map((x) => ({ ...x, pct: (100 * x.ms) / total }))
      .sort((a, b) => b.ms - a.ms)
      .slice(0, top);
  return { total, byFunction: rank(fn), byOwner: rank(own) };
}

export function formatSummary(file: string, top = 25): string {
  const s = summarise(file, top);
  const lines = [`CPU profile ${file}: ${(s.total / 1000).toFixed(1)} s of busy time (idle excluded)`, '', 'Top self time by function:'];
  for (const f of s.byFunction) lines.push(`  ${f.ms.toFixed(0).padStart(7)} ms ${f.pct.toFixed(1).padStart(5)} %  ${f.name}  ${f.where}`);
  lines.push('', 'Self time by package or file:');
  for (const o of s.byOwner.slice(0, 15)) lines.push(`  ${o.ms.toFixed(0).padStart(7)} ms ${o.pct.toFixed(1).padStart(5)} %  ${o.name}`);
  return lines.join('\n');
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  const [file, top] = process.argv.slice(2);
  if (!file) {
    process.stderr.write('usage: npx tsx bench/profile-summary.ts <file.cpuprofile> [top]\n');
    process.exit(2);
  }
  process.stdout.write(`${formatSummary(file, Number(top ?? 25))}\n`);
}
