/**
 * What a call brought, kept for its audit record (docs/decisions/0006-store-what-was-received.md): the request body's
 * text as it arrived, with one change, the `fhirAuthorization` bearer token replaced by a placeholder (a token is a
 * secret and is never stored; docs/security.md). Pure.
 */
import type { RecordInputs } from '../audit/types.js';
import type { FhirExchange } from './gather-types.js';

/** What stands in a stored request body where the client's access token was. */
export const REDACTED_TOKEN = '[redacted]';

/**
 * The body text to store. The token's JSON string, as serialised, is replaced wherever it occurs, so every other byte
 * is the client's. When the client escaped the token some other way (the text then holds no such string but the
 * parsed body does hold a token) or no text was kept, the parsed body is serialised again with the token replaced,
 * and `asReceived` says so.
 */
export function receivedBody(text: string | undefined, body: unknown): RecordInputs['request'] {
  const token = tokenOf(body);
  if (text !== undefined) {
    if (token === undefined) return { body: text, asReceived: true };
    const quoted = JSON.stringify(token);
    if (token !== '' && text.includes(quoted)) {
      const replaced = text.split(quoted).join(JSON.stringify(REDACTED_TOKEN));
      // Read back to be sure the token is gone (a client may have escaped it another way, or sent the key twice).
      if (tokenOfText(replaced) === REDACTED_TOKEN && !replaced.includes(token)) return { body: replaced, asReceived: true };
    }
  }
  return { body: JSON.stringify(withoutToken(body)) ?? 'null', asReceived: false };
}

/** The inputs of one call as its record keeps them. */
export function inputsOf(now: Date, request: RecordInputs['request'], fhir: readonly FhirExchange[]): RecordInputs {
  return { now: now.toISOString(), request, fhir: [...fhir] };
}

function tokenOf(body: unknown): string | undefined {
  if (!body || typeof body !== 'object') return undefined;
  const auth = (body as { fhirAuthorization?: unknown }).fhirAuthorization;
  if (!auth || typeof auth !== 'object') return undefined;
  const t = (auth as { access_token?: unknown }).access_token;
  return typeof t === 'string' ? t : undefined;
}

function tokenOfText(text: string): string | undefined {
  try {
    return tokenOf(JSON.parse(text));
  } catch {
    return undefined;
  }
}

function withoutToken(body: unknown): unknown {
  if (tokenOf(body) === undefined) return body;
  const b = body as { fhirAuthorization: Record<string, unknown> };
  return { ...b, fhirAuthorization: { ...b.fhirAuthorization, access_token: REDACTED_TOKEN } };
}
