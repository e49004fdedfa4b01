/**
 * JSON with object keys sorted, so the same value always gives the same text: the audit chain's 0.1.0 hash rule
 * (src/audit/chain.ts) and the rules-version digests. A copy with its keys inserted in sorted order is written by
 * one JSON.stringify (why: docs/benchmarks.md); a value whose copy could serialise differently (a sparse array, an
 * integer key — engines put those first — or `__proto__`) takes the plain recursive way. Both give the same text.
 */
export function canonicalJson(v: unknown): string {
  let copy: unknown;
  try {
    copy = sortedCopy(v, new Map());
  } catch (e) {
    if (e !== IRREGULAR) throw e;
    return canonical(v);
  }
  return JSON.stringify(copy) ?? 'null';
}

const IRREGULAR = new Error('not copyable in sorted order');
const INTEGER_KEY = /^\d+$/;

/** The value with every object's keys inserted in sorted order; functions and symbols become null, as canonical() writes them. */
function sortedCopy(v: unknown, arrays: Map<unknown[], unknown[]>): unknown {
  if (typeof v === 'function' || typeof v === 'symbol') return null;
  if (v === null || typeof v !== 'object') return v;
  if (Array.isArray(v)) {
    const done = arrays.get(v);
    if (done) return done;
    const out = new Array<unknown>(v.length);
    for (let i = 0; i < v.length; i += 1) {
      const x: unknown = v[i];
      if (x === undefined && !(i in v)) throw IRREGULAR;
      out[i] = sortedCopy(x, arrays);
    }
    arrays.set(v, out);
    return out;
  }
  const o = v as Record<string, unknown>;
  const out: Record<string, unknown> = {};
  for (const k of Object.keys(o).sort()) {
    const c = k.charCodeAt(0);
    if ((c >= 48 && c <= 57 && INTEGER_KEY.test(k)) || k === '__proto__') throw IRREGULAR;
    const x = o[k];
    if (x !== undefined) out[k] = sortedCopy(x, arrays);
  }
  return out;
}

/** The reference form: recursive, one string. */
function canonical(v: unknown): string {
  if (v === null || typeof v !== 'object') return JSON.stringify(v) ?? 'null';
  if (Array.isArray(v)) {
    let s = '[';
    for (let i = 0; i < v.length; i += 1) {
      if (i > 0) s += ',';
      const x: unknown = v[i];
      // undefined → null as JSON.stringify does; a hole of a sparse array stays empty.
      if (x !== undefined) s += canonical(x);
      else if (i in v) s += 'null';
    }
    return `${s}]`;
  }
  const o = v as Record<string, unknown>;
  let s = '{';
  let first = true;
  for (const k of Object.keys(o).sort()) {
    const x = o[k];
    if (x === undefined) continue;
    s += `${first ? '' : ','}${JSON.stringify(k)}:${canonical(x)}`;
    first = false;
  }
  return `${s}}`;
}
