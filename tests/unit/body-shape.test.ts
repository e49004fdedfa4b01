// The depth check of request bodies (src/http/body-shape.ts): exact at the limit, safe at any depth, names the path.
import { describe, expect, it } from 'vitest';
import { pathTooDeep, tooDeep } from '../../src/http/body-shape.js';
import { MAX_JSON_DEPTH } from '../../src/hooks/schemas.js';
import { httpOf } from '../../src/http/errors.js';
import { basicResources, orderSelectRequest, prefetchOf } from '../helpers/hook-fixtures.js';

/** `n` nested arrays around 0, built as text and parsed (the engine's parser does not recurse). */
const nested = (n: number): unknown => JSON.parse(`${'['.repeat(n)}0${']'.repeat(n)}`);

describe('body depth', () => {
  it('counts the body itself as level 1; a primitive has no depth to refuse', () => {
    expect(pathTooDeep({ a: 1 }, 1)).toBeUndefined();
    expect(pathTooDeep({ a: {} }, 1)).toEqual(['a']);
    expect(pathTooDeep('text', 0)).toBeUndefined();
  });
  it('accepts exactly MAX_JSON_DEPTH levels and refuses one more', () => {
    expect(tooDeep(nested(MAX_JSON_DEPTH))).toBeUndefined();
    const e = tooDeep(nested(MAX_JSON_DEPTH + 1));
    expect(e && httpOf(e).status).toBe(400);
    expect(e?.issues[0]?.type).toBe('structure');
  });
  it('walks a million levels without overflowing the stack', () => {
    expect(() => tooDeep(nested(1_000_000))).not.toThrow();
    expect(tooDeep(nested(1_000_000))?.code).toBe('invalid');
  });
  it('names the path to the first point too deep, objects by key and arrays by index', () => {
    const body = { ok: [1, 2, { fine: true }], context: { draftOrders: { entry: [{ resource: { note: { a: [{ a: [] }] } } }] } } };
    expect(pathTooDeep(body, 6)).toEqual(['context', 'draftOrders', 'entry', 0, 'resource', 'note']);
    expect(
      tooDeep(body, 6)
        ?.issues.slice(1)
        .map((i) => i.text),
    ).toEqual(['too deep under context.draftOrders.entry[0].resource.note']);
  });
  it('finds depth in a later sibling after a shallow one', () => {
    expect(pathTooDeep([[1], [[[2]]]], 3)).toEqual([1, 0, 0]);
  });
  it('a full order-select request of the fixtures nests 11 levels, far within the limit (the figure in src/hooks/schemas.ts)', () => {
    const req = JSON.parse(JSON.stringify(orderSelectRequest({ prefetch: prefetchOf(basicResources()) })));
    expect(pathTooDeep(req, 11)).toBeUndefined();
    expect(pathTooDeep(req, 10)).toBeDefined();
  });
});
