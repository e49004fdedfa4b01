// The reasoning-page link signer (src/http/advice-link.ts) and the page settings (src/config/config.ts).
// Outside check: the HMAC-SHA256 test vectors of RFC 4231 §4 (test cases 1, 2 and 6).
import { describe, expect, it } from 'vitest';
import { adviceLinkUrl, createLinkSigner, hmacSha256, signerFromConfig } from '../../src/http/advice-link.js';
import { pageCsp } from '../../src/http/pages.js';
import { ConfigError, loadConfig } from '../../src/config/config.js';

describe('hmacSha256 against RFC 4231 §4', () => {
  it('test case 1: key 0x0b × 20, "Hi There"', () => {
    expect(hmacSha256(Buffer.alloc(20, 0x0b), 'Hi There').toString('hex')).toBe(
      'b0344c61d8db38535ca8afceaf0bf12b881dc200c9833da726e9376c2e32cff7',
    );
  });
  it('test case 2: key "Jefe", "what do ya want for nothing?"', () => {
    expect(hmacSha256('Jefe', 'what do ya want for nothing?').toString('hex')).toBe(
      '5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843',
    );
  });
  it('test case 6: a key larger than the block size (0xaa × 131)', () => {
    expect(hmacSha256(Buffer.alloc(131, 0xaa), 'Test Using Larger Than Block-Size Key - Hash Key First').toString('hex')).toBe(
      '60e431591ee0b67f0d8a26aacbf5b77f8e0bc6213728c5140546040f0ee37f54',
    );
  });
});

describe('createLinkSigner', () => {
  const KEY = 'unit-test-link-key-0123456789abcdef';
  const ID = '5b0c7a52-1f3e-4c1a-9d55-0c2b7e9f4a10';
  const NOW = Date.parse('2026-11-20T14:00:00Z');
  const s = createLinkSigner(KEY, 720);

  it('signs id and expiry: exp is now + lifetime in seconds, sig is base64url HMAC-SHA256 of "{id}.{exp}"', () => {
    const q = s.sign(ID, NOW);
    expect(q.exp).toBe(NOW / 1000 + 720 * 60);
    expect(q.sig).toBe(hmacSha256(KEY, `${ID}.${q.exp}`).toString('base64url'));
    expect(s.verify(ID, String(q.exp), q.sig, NOW)).toBe('ok');
    expect(s.verify(ID, String(q.exp), q.sig, q.exp * 1000 - 1)).toBe('ok');
  });
  it('an expired link is "expired" at and after its expiry', () => {
    const q = s.sign(ID, NOW);
    expect(s.verify(ID, String(q.exp), q.sig, q.exp * 1000)).toBe('expired');
    expect(s.verify(ID, String(q.exp), q.sig, q.exp * 1000 + 86_400_000)).toBe('expired');
  });
  it('a changed id, expiry or signature, another key or a malformed query is "bad"', () => {
    const q = s.sign(ID, NOW);
    const other = createLinkSigner(`${KEY}x`, 720);
    expect(s.verify(`${ID.slice(0, -1)}1`, String(q.exp), q.sig, NOW)).toBe('bad');
    expect(s.verify(ID, String(q.exp + 1), q.sig, NOW)).toBe('bad');
    // The last character of 32 bytes in base64url holds 4 bits and 2 padding bits: a changed padding bit is a change too.
    expect(s.verify(ID, String(q.exp), `${q.sig.slice(0, -1)}${q.sig.endsWith('A') ? 'B' : 'A'}`, NOW)).toBe('bad');
    expect(s.verify(ID, String(q.exp), `${q.sig.slice(0, 5)}${q.sig[5] === 'x' ? 'y' : 'x'}${q.sig.slice(6)}`, NOW)).toBe('bad');
    expect(other.verify(ID, String(q.exp), q.sig, NOW)).toBe('bad');
    for (const [exp, sig] of [
      [undefined, q.sig],
      [String(q.exp), undefined],
      [[String(q.exp)], q.sig],
      [String(q.exp), [q.sig]],
      ['-1', q.sig],
      ['1e9', q.sig],
      [String(q.exp), `${q.sig}=`],
      [String(q.exp), q.sig.slice(1)],
      [String(q.exp), ''],
    ] as const) {
      expect(s.verify(ID, exp, sig, NOW), `${String(exp)} / ${String(sig)}`).toBe('bad');
    }
  });
  it('the URL carries id, exp and sig under the public base', () => {
    const q = s.sign(ID, NOW);
    const u = new URL(adviceLinkUrl('https://tidemark.tern-hospital.example/', ID, q));
    expect(u.pathname).toBe(`/advice/${ID}`);
    expect(u.searchParams.get('exp')).toBe(String(q.exp));
    expect(u.searchParams.get('sig')).toBe(q.sig);
  });
});

describe('signerFromConfig', () => {
  const base = { TIDEMARK_LINK_LIFETIME_MIN: 30 };
  it('uses the configured key', () => {
    const { signer, warning } = signerFromConfig({ ...base, TIDEMARK_LINK_KEY: 'k'.repeat(32), TIDEMARK_TRIAL_MODE: false });
    expect(warning).toBeUndefined();
    const q = signer!.sign('a', 0);
    expect(q.sig).toBe(hmacSha256('k'.repeat(32), `a.${30 * 60}`).toString('base64url'));
  });
  it('in trial mode without a key: a key for this process, with a warning', () => {
    const a = signerFromConfig({ ...base, TIDEMARK_TRIAL_MODE: true });
    const b = signerFromConfig({ ...base, TIDEMARK_TRIAL_MODE: true });
    expect(a.warning).toMatch(/TIDEMARK_LINK_KEY/);
    expect(a.signer!.sign('a', 0).sig).not.toBe(b.signer!.sign('a', 0).sig);
  });
  it('otherwise without a key: links off, with a warning', () => {
    const r = signerFromConfig({ ...base, TIDEMARK_TRIAL_MODE: false });
    expect(r.signer).toBeUndefined();
    expect(r.warning).toMatch(/no link/);
  });
});

describe('page settings', () => {
  it('defaults: UTC, 12 h, no framing', () => {
    const c = loadConfig({});
    expect(c.TIDEMARK_TIME_ZONE).toBe('UTC');
    expect(c.TIDEMARK_LINK_LIFETIME_MIN).toBe(720);
    expect(c.TIDEMARK_FRAME_ANCESTORS).toEqual([]);
    expect(pageCsp(c.TIDEMARK_FRAME_ANCESTORS)).toContain("frame-ancestors 'none'");
  });
  it('a zone IANA knows, origins as a list; a wrong zone, a bad origin or a short key stop start-up naming the variable', () => {
    const c = loadConfig({
      TIDEMARK_TIME_ZONE: 'Pacific/Auckland',
      TIDEMARK_FRAME_ANCESTORS: 'https://ehr.tern.example, https://ehr2.tern.example:8443',
    });
    expect(c.TIDEMARK_TIME_ZONE).toBe('Pacific/Auckland');
    expect(pageCsp(c.TIDEMARK_FRAME_ANCESTORS)).toContain('frame-ancestors https://ehr.tern.example https://ehr2.tern.example:8443');
    expect(() => loadConfig({ TIDEMARK_TIME_ZONE: 'Mars/Olympus' })).toThrow(/TIDEMARK_TIME_ZONE/);
    expect(() => loadConfig({ TIDEMARK_FRAME_ANCESTORS: "https://ehr.example 'unsafe-inline'" })).toThrow(/TIDEMARK_FRAME_ANCESTORS/);
    expect(() => loadConfig({ TIDEMARK_FRAME_ANCESTORS: 'https://ehr.example/path' })).toThrow(ConfigError);
    expect(() => loadConfig({ TIDEMARK_LINK_KEY: 'too-short' })).toThrow(/TIDEMARK_LINK_KEY/);
  });
});
