/**
 * The shape of a parsed JSON body: how deep it nests. A body nested thousands of levels deep is cheap to send (a
 * 25 KB body nests 5,000 levels) and used to reach code that recurses over it (JSON.stringify of the audit record,
 * which carries the draft orders as received): `Maximum call stack size exceeded`, a 500 and a false "audit write
 * failed" alarm (issue 13 item 5). The depth is measured here, without recursion, right after the body is parsed,
 * and a body deeper than the limit is a 400 naming where it goes too deep, before any other code sees it.
 */
import type { RequestHandler } from 'express';
import { MAX_JSON_DEPTH } from '../hooks/schemas.js';
import { outcomeError, type OutcomeError } from '../hooks/outcome-error.js';

interface Frame {
  v: Record<string, unknown> | unknown[];
  keys: string[] | null;
  i: number;
}

/**
 * The path to the first object or array nested deeper than `limit` (the body itself is level 1), say
 * `["context", "draftOrders", "entry", 0, …]`, or undefined if there is none. One depth-first walk with its own
 * stack, so any depth is walked safely, and it stops at the first point too deep.
 */
export function pathTooDeep(value: unknown, limit: number): Array<string | number> | undefined {
  if (value === null || typeof value !== 'object') return undefined;
  const frame = (v: object): Frame =>
    Array.isArray(v) ? { v, keys: null, i: 0 } : { v: v as Record<string, unknown>, keys: Object.keys(v), i: 0 };
  const stack: Frame[] = [frame(value)];
  while (stack.length) {
    const f = stack[stack.length - 1] as Frame;
    const n = f.keys ? f.keys.length : (f.v as unknown[]).length;
    if (f.i >= n) {
      stack.pop();
      continue;
    }
    const key: string | number = f.keys ? (f.keys[f.i] as string) : f.i;
    f.i += 1;
    const c: unknown = (f.v as Record<string | number, unknown>)[key];
    if (c === null || typeof c !== 'object') continue;
    if (stack.length >= limit) return stack.map((s) => (s.keys ? (s.keys[s.i - 1] as string) : s.i - 1));
    stack.push(frame(c));
  }
  return undefined;
}

/** Why a body is refused for its nesting, or undefined if it is within the limit (MAX_JSON_DEPTH). */
export function tooDeep(body: unknown, limit = MAX_JSON_DEPTH): OutcomeError | undefined {
  const path = pathTooDeep(body, limit);
  if (!path) return undefined;
  const shown = path
    .slice(0, 12)
    .map((k) => (typeof k === 'number' ? `[${k}]` : `.${k.slice(0, 40)}`))
    .join('')
    .replace(/^\./, '');
  return outcomeError('invalid', 'structure', `the body nests deeper than ${limit} levels of objects and arrays`, [
    `too deep under ${shown}${path.length > 12 ? '…' : ''}`,
  ]);
}

/** Wraps a body parser (express.json) so that a body nested deeper than the limit goes to the error handler as a 400. */
export function withDepthLimit(parse: RequestHandler, limit = MAX_JSON_DEPTH): RequestHandler {
  return (req, res, next) => {
    parse(req, res, (err?: unknown) => {
      if (err) return next(err);
      const refused = tooDeep(req.body, limit);
      return refused ? next(refused) : next();
    });
  };
}
