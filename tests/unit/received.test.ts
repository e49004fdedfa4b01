// The request body as the audit record keeps it (src/hooks/received.ts, decision 0006): every byte as the client
// sent it but the bearer token, which is a secret and never stored (docs/security.md). Invented tokens and ids.
import { describe, expect, it } from 'vitest';
import { REDACTED_TOKEN, receivedBody } from '../../src/hooks/received.js';

const auth = (token: string) => ({
  access_token: token,
  token_type: 'Bearer',
  expires_in: 300,
  scope: 'patient/*.read',
  subject: 'cds-client',
});

describe('receivedBody', () => {
  it('keeps the text byte for byte when the call carries no token', () => {
    // Odd spacing, key order and escapes are the client's and stay so.
    const text = '{ "hookInstance":"a1",\n  "hook" : "order-select", "note":"caf\\u00e9 \\/ ✓" }';
    expect(receivedBody(text, JSON.parse(text))).toEqual({ body: text, asReceived: true });
  });

  it('replaces the token and nothing else', () => {
    const body = { hook: 'order-select', fhirServer: 'https://fhir.invented.example/r4', fhirAuthorization: auth('tok.en-12345_ABC') };
    const text = JSON.stringify(body, null, 2);
    const kept = receivedBody(text, body);
    expect(kept.asReceived).toBe(true);
    expect(kept.body).not.toContain('tok.en-12345_ABC');
    expect(kept.body).toBe(text.replace('"tok.en-12345_ABC"', `"${REDACTED_TOKEN}"`));
    expect(JSON.parse(kept.body).fhirAuthorization.access_token).toBe(REDACTED_TOKEN);
  });

  it('a token the client escaped another way is not left in the text: the body is serialised again, and says so', () => {
    // "abc-token-9" with its first letter as a JSON \u escape (RFC 8259 §7): the text never holds the plain string.
    const text =
      '{"hook":"order-sign","fhirAuthorization":{"access_token":"\\u0061bc-token-9","token_type":"Bearer","expires_in":1,"scope":"s","subject":"c"}}';
    const parsed = JSON.parse(text);
    expect(parsed.fhirAuthorization.access_token).toBe('abc-token-9');
    const kept = receivedBody(text, parsed);
    expect(kept.asReceived).toBe(false);
    expect(kept.body).not.toContain('bc-token-9');
    expect(JSON.parse(kept.body)).toEqual({ ...parsed, fhirAuthorization: { ...parsed.fhirAuthorization, access_token: REDACTED_TOKEN } });
  });

  it('a key sent twice (JSON.parse keeps the last) cannot smuggle the token past the replacement', () => {
    const text = '{"fhirAuthorization":{"access_token":"first-1","access_token":"\\u0073econd-2","token_type":"Bearer"}}';
    const kept = receivedBody(text, JSON.parse(text));
    expect(kept.asReceived).toBe(false);
    expect(kept.body).not.toMatch(/second-2|\\u0073econd-2/);
  });

  it('without the text (a caller that kept none), the parsed body is serialised with the token replaced', () => {
    const body = { hook: 'patient-view', fhirAuthorization: auth('zzz-secret') };
    const kept = receivedBody(undefined, body);
    expect(kept).toEqual({
      body: JSON.stringify({ ...body, fhirAuthorization: { ...body.fhirAuthorization, access_token: REDACTED_TOKEN } }),
      asReceived: false,
    });
  });
});
