/**
 * A CDS Hooks 2.0 response check of ours (test-only, so it lives under tests/): the response schema from the spec
 * (src/hooks/schemas.ts) plus its invariants (the FSH invariants of the CDS Hooks 3.0 ballot) and the JSON rule "omit optional
 * fields: never null, "", [] or {}" (except `cards: []`). Used by the tests over every card the service makes.
 */
import { hookResponseSchema } from '../../src/hooks/schemas.js';

export function checkCdsResponse(body: unknown): string[] {
  const problems: string[] = [];
  const parsed = hookResponseSchema.safeParse(body);
  if (!parsed.success) problems.push(...parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`));
  walkEmpty(body, '', problems);
  const cards = (body as { cards?: unknown[] })?.cards;
  if (Array.isArray(cards)) {
    const cardUuids = new Set<string>();
    cards.forEach((c, i) => {
      const card = c as Record<string, any>;
      if (typeof card['uuid'] === 'string') {
        if (cardUuids.has(card['uuid'])) problems.push(`cards.${i}.uuid: repeated`);
        cardUuids.add(card['uuid']);
      }
      if (typeof card['summary'] === 'string' && card['summary'].length >= 140)
        problems.push(`cards.${i}.summary: ${card['summary'].length} characters (must be under 140)`);
      if (typeof card['detail'] === 'string' && /<\s*[a-z!/]/i.test(card['detail'])) problems.push(`cards.${i}.detail: contains raw HTML`);
      const sugg = (card['suggestions'] ?? []) as Array<Record<string, any>>;
      if (sugg.length && !card['selectionBehavior']) problems.push(`cards.${i}: suggestions without selectionBehavior`);
      if (card['selectionBehavior'] === 'at-most-one' && sugg.filter((s) => s['isRecommended'] === true).length > 1)
        problems.push(`cards.${i}: more than one recommended suggestion with at-most-one`);
      const sUuids = new Set<string>();
      sugg.forEach((s, j) => {
        if (!s['uuid']) problems.push(`cards.${i}.suggestions.${j}: no uuid (feedback cannot name it)`);
        else if (sUuids.has(s['uuid'])) problems.push(`cards.${i}.suggestions.${j}.uuid: repeated`);
        else sUuids.add(s['uuid']);
        ((s['actions'] ?? []) as Array<Record<string, any>>).forEach((a, k) => {
          const where = `cards.${i}.suggestions.${j}.actions.${k}`;
          if (!a['description']) problems.push(`${where}: no description`);
          if (a['type'] === 'delete' && (!a['resourceId'] || a['resource']))
            problems.push(`${where}: a delete needs resourceId and no resource`);
          if ((a['type'] === 'create' || a['type'] === 'update') && !a['resource'])
            problems.push(`${where}: ${a['type']} without resource`);
          if (a['type'] === 'update' && !a['resource']?.id) problems.push(`${where}: update of a resource without id`);
        });
      });
      ((card['links'] ?? []) as Array<Record<string, any>>).forEach((l, j) => {
        if (l['appContext'] !== undefined && l['type'] !== 'smart') problems.push(`cards.${i}.links.${j}: appContext on a non-smart link`);
        if (typeof l['url'] === 'string' && !/^https?:\/\//.test(l['url'])) problems.push(`cards.${i}.links.${j}: url is not absolute`);
      });
      ((card['overrideReasons'] ?? []) as Array<Record<string, any>>).forEach((r, j) => {
        if (!r['display']) problems.push(`cards.${i}.overrideReasons.${j}: display is required`);
      });
    });
  }
  return problems;
}

function walkEmpty(v: unknown, path: string, out: string[]): void {
  if (v === null) out.push(`${path || '(root)'}: null`);
  else if (v === '') out.push(`${path}: empty string`);
  else if (Array.isArray(v)) {
    if (v.length === 0 && path !== 'cards') out.push(`${path}: empty array`);
    v.forEach((x, i) => walkEmpty(x, path ? `${path}.${i}` : String(i), out));
  } else if (typeof v === 'object') {
    const keys = Object.keys(v as object);
    if (keys.length === 0) out.push(`${path || '(root)'}: empty object`);
    for (const k of keys) walkEmpty((v as Record<string, unknown>)[k], path ? `${path}.${k}` : k, out);
  }
}
