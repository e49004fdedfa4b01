/**
 * CDS Hooks 2.0 prefetch token resolution (§Prefetch tokens).
 * - `{{context.<field>}}` for a root-level primitive context field the hook marks "Prefetch Token: Yes"
 *   (nested paths are not 2.0 syntax and do not resolve);
 * - `{{userPractitionerId}}`, `{{userPractitionerRoleId}}`, `{{userPatientId}}`, `{{userRelatedPersonId}}`:
 *   the bare id of context.userId when it is of that type.
 * A template with a token that cannot be resolved is not usable: the caller neither expects the client to
 * have filled it nor queries it itself.
 */
import type { HookName } from './schemas.js';

/** Context fields each hook marks "Prefetch Token: Yes" (patient-view 1.1, order-select 1.0, order-sign 1.0). */
export const TOKEN_FIELDS: Record<HookName, readonly string[]> = {
  'patient-view': ['userId', 'patientId', 'encounterId'],
  'order-select': ['userId', 'patientId', 'encounterId'],
  'order-sign': ['userId', 'patientId', 'encounterId'],
};

const USER_TOKENS: Record<string, string> = {
  userPractitionerId: 'Practitioner',
  userPractitionerRoleId: 'PractitionerRole',
  userPatientId: 'Patient',
  userRelatedPersonId: 'RelatedPerson',
};

export type TokenResult = { ok: true; value: string } | { ok: false; token: string; reason: string };

/** Resolves every `{{…}}` token in a template; values are URL-encoded when they stand in a query string. */
export function resolvePrefetchTemplate(template: string, hook: HookName, context: Record<string, unknown>): TokenResult {
  let failure: { token: string; reason: string } | undefined;
  const queryStart = template.indexOf('?');
  const value = template.replace(/\{\{\s*([^}]*?)\s*\}\}/g, (whole, expr: string, offset: number) => {
    const resolved = resolveToken(expr, hook, context);
    if (typeof resolved !== 'string') {
      failure ??= { token: whole, reason: resolved.reason };
      return whole;
    }
    return queryStart >= 0 && offset > queryStart ? encodeURIComponent(resolved) : resolved;
  });
  return failure ? { ok: false, ...failure } : { ok: true, value };
}

function resolveToken(expr: string, hook: HookName, context: Record<string, unknown>): string | { reason: string } {
  const user = USER_TOKENS[expr];
  if (user) {
    const userId = context['userId'];
    if (typeof userId !== 'string') return { reason: 'context.userId is absent' };
    const [type, id, ...rest] = userId.split('/');
    if (type !== user || !id || rest.length) return { reason: `context.userId is not a ${user}` };
    return id;
  }
  const m = /^context\.([A-Za-z][A-Za-z0-9]*)$/.exec(expr);
  if (!m) return { reason: `"${expr}" is not a CDS Hooks 2.0 prefetch token` };
  const field = m[1] as string;
  if (!TOKEN_FIELDS[hook].includes(field)) return { reason: `context.${field} is not a prefetch token of ${hook}` };
  const v = context[field];
  if (v === undefined || v === null) return { reason: `context.${field} is absent` };
  if (typeof v !== 'string' && typeof v !== 'number' && typeof v !== 'boolean') return { reason: `context.${field} is not a primitive` };
  return String(v);
}
