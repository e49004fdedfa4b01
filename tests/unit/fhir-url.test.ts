// resolveUnderBase: which references a FHIR server may send us to (link[next]) and which absolute URL is fetched.
// Expected resolutions follow the WHATWG URL Standard (https://url.spec.whatwg.org/, "basic URL parser": a special
// scheme equal to the base's with no "//" is relative; "." and ".." segments, also as %2e, are removed), which is
// what Node's URL implements; the over-HTTP attacks are in tests/integration/fhir-hostile.test.ts.
import { describe, expect, it } from 'vitest';
import { resolveUnderBase } from '../../src/fhir/fetcher.js';

const BASE = 'https://fhir.saltmarsh.example.org/r4';

describe('resolveUnderBase', () => {
  it.each([
    ['Observation?patient=Patient/p1&_count=5', 'https://fhir.saltmarsh.example.org/r4/Observation?patient=Patient/p1&_count=5'],
    ['https://fhir.saltmarsh.example.org/r4/Observation?page=2', 'https://fhir.saltmarsh.example.org/r4/Observation?page=2'],
    // HAPI-style paging links are the base itself with a query.
    [
      'https://fhir.saltmarsh.example.org/r4?_getpages=abc&_getpagesoffset=10',
      'https://fhir.saltmarsh.example.org/r4?_getpages=abc&_getpagesoffset=10',
    ],
    ['HTTPS://FHIR.saltmarsh.example.org/r4/Observation?page=2', 'https://fhir.saltmarsh.example.org/r4/Observation?page=2'],
    ['https://fhir.saltmarsh.example.org:443/r4/Observation#x', 'https://fhir.saltmarsh.example.org/r4/Observation'],
  ])('%s → %s', (ref, expected) => {
    expect(resolveUnderBase(ref, BASE)?.href).toBe(expected);
  });

  it.each([
    ['another host', 'https://elsewhere.example.org/r4/Observation'],
    ['another port', 'https://fhir.saltmarsh.example.org:8443/r4/Observation'],
    ['another scheme', 'http://fhir.saltmarsh.example.org/r4/Observation'],
    ['protocol-relative', '//elsewhere.example.org/r4/Observation'],
    ['one slash (relative here, host "elsewhere.example.org" alone)', 'https:/elsewhere.example.org/x'],
    ['no slash (relative here, host "elsewhere.example.org" alone)', 'https:elsewhere.example.org/x'],
    ['upper-case scheme, one slash', 'HTTPS:/elsewhere.example.org/x'],
    ['a path outside the base', 'https://fhir.saltmarsh.example.org/admin/Observation'],
    ['a sibling path sharing the prefix', 'https://fhir.saltmarsh.example.org/r4x/Observation'],
    ['dot segments out of the base', '../admin/Observation'],
    ['encoded dot segments out of the base', 'https://fhir.saltmarsh.example.org/r4/%2e%2e/admin'],
    ['credentials', 'https://user:pw@fhir.saltmarsh.example.org/r4/Observation'],
    ['data:', 'data:application/json,{}'],
    ['javascript:', 'javascript:alert(1)'],
    ['not a URL', 'http://[bad'],
  ])('%s: refused', (_name, ref) => {
    expect(resolveUnderBase(ref, BASE)).toBeUndefined();
  });

  it('on an http base (loopback trials), `http:/h:P/x` and `http:h:P/x` are refused, not read as paths', () => {
    const base = 'http://127.0.0.1:4100/fhir';
    expect(resolveUnderBase('http:/127.0.0.1:4200/x', base)).toBeUndefined();
    expect(resolveUnderBase('http:127.0.0.1:4200/x', base)).toBeUndefined();
    expect(resolveUnderBase('Observation?page=2', base)?.href).toBe('http://127.0.0.1:4100/fhir/Observation?page=2');
  });

  it('a base at the root allows any path on its origin', () => {
    expect(resolveUnderBase('/anything/Observation', 'https://fhir.saltmarsh.example.org')?.href).toBe(
      'https://fhir.saltmarsh.example.org/anything/Observation',
    );
  });
});
