/**
 * `npx tsx bench/jwt-verify.ts [tokens]`: what checking one CDS client JWT costs in this process (no HTTP, no
 * service). It builds the real verifier (src/auth/client-verifier.ts) as src/service.ts does: the config file's
 * `issuers` block parsed by authConfigSchema (defaults for skew, age and algorithms), one trusted issuer with a static
 * ES384 JWKS as in `npm run bench -- --only=jwt`, and the in-memory replay cache the SQLite store uses. It signs
 * `tokens` fresh tokens (distinct jti, as the benchmark's load generator does), then times, one awaited call at a
 * time over the same tokens:
 *
 *   verifier      createClientVerifier(...).verify('Bearer …', aud): every check, the jti recorded
 *   guard         requireCdsClient around such a verifier, on a stub request (audience from the path, res.locals)
 *   bare jose     jose.jwtVerify(token, key) with the key imported once beforehand, the same claim options
 *   and the parts: both decodes of header and payload, the key lookup through jose's local JWKS (its import is
 *   cached per key), the signature alone (WebCrypto ECDSA P-384 over the signing input), jwtVerify through the
 *   key set (lookup + signature + claims), and the replay cache's `seen` with fresh keys.
 *
 * Then the replay cache alone in steady state (300 req/s over one retention, on a simulated clock): the mean time of
 * one `seen`, how many calls took over 1 ms and the 3 worst (where a purge of many entries at once would show).
 *
 * Prints the median and mean wall time per call in µs and the mean CPU time per call (process.cpuUsage, all
 * threads: WebCrypto runs its work on libuv's pool). Each pass runs twice in alternating order, the first round
 * after a warm-up. A development aid: it asserts nothing beyond every token being accepted once.
 */
import { randomUUID, webcrypto } from 'node:crypto';
import {
  calculateJwkThumbprint,
  createLocalJWKSet,
  decodeJwt,
  decodeProtectedHeader,
  exportJWK,
  generateKeyPair,
  importJWK,
  jwtVerify,
  SignJWT,
  type CryptoKey,
  type JSONWebKeySet,
} from 'jose';
import type { Request, Response } from 'express';
import { createClientVerifier } from '../src/auth/client-verifier.js';
import { authConfigSchema } from '../src/auth/issuer-config.js';
import { requireCdsClient } from '../src/auth/middleware.js';
import { InMemoryReplayCache } from '../src/auth/replay-cache.js';

const n = Number(process.argv[2] ?? 3000);
if (!Number.isInteger(n) || n < 10 || n > 100_000) throw new Error('tokens: a whole number from 10 to 100000');

const iss = 'https://ehr.bench.invalid';
const aud = 'https://tidemark.bench.invalid/cds-services/bolus-review-select';
const pair = await generateKeyPair('ES384', { extractable: true });
const jwk = { ...(await exportJWK(pair.publicKey)), alg: 'ES384', use: 'sig' };
const kid = await calculateJwkThumbprint(jwk);
const jwks = { keys: [{ ...jwk, kid }] };
const config = authConfigSchema.parse({ issuers: [{ iss, jwks }] });

const iat = Math.floor(Date.now() / 1000);
const sign = () =>
  new SignJWT({})
    .setProtectedHeader({ alg: 'ES384', kid, typ: 'JWT' })
    .setIssuer(iss)
    .setAudience(aud)
    .setIssuedAt(iat)
    .setExpirationTime(iat + 290)
    .setJti(randomUUID())
    .sign(pair.privateKey);
const warmN = Math.min(500, n);
const tokens: string[] = [];
for (let i = 0; i < n; i += 1) tokens.push(await sign());
const warmTokens: string[] = [];
for (let i = 0; i < warmN; i += 1) warmTokens.push(await sign());

const key = (await importJWK({ ...jwk, kid }, 'ES384')) as CryptoKey;
const localSet = createLocalJWKSet(jwks as JSONWebKeySet);
const claimOptions = {
  algorithms: [...config.algorithms],
  issuer: iss,
  audience: aud,
  typ: 'JWT',
  requiredClaims: ['exp', 'iat', 'jti'],
  clockTolerance: config.clockSkewSeconds,
  maxTokenAge: config.maxTokenAgeSeconds,
};
const enc = new TextEncoder();
/** A JWS compact token's signing input and raw signature (RFC 7515 §5.2). */
const parts = (t: string) => {
  const [h, p, s] = t.split('.') as [string, string, string];
  return { input: enc.encode(`${h}.${p}`), sig: Buffer.from(s, 'base64url') };
};

// Verifiers, guards and replay caches for the warm-up (index 2) and each round, so each records its tokens' jti afresh.
const verifiers = [0, 1, 2].map(() => createClientVerifier(config, { replayCache: new InMemoryReplayCache() }));
const silent = { warn() {} };
const guards = [0, 1, 2].map(() =>
  requireCdsClient({
    verifier: createClientVerifier(config, { replayCache: new InMemoryReplayCache() }),
    publicUrl: 'https://tidemark.bench.invalid',
    trialMode: false,
    log: silent,
  }),
);
/** The guard on a stub request: the slices of express's req and res it reads, as the service's route calls it. */
const guarded = (t: string, round: number) =>
  new Promise<void>((resolve, reject) => {
    const authorization = `Bearer ${t}`;
    const req = { method: 'POST', originalUrl: '/cds-services/bolus-review-select', get: () => authorization } as unknown as Request;
    const refused = () => reject(new Error('guard refused the token'));
    const res = { locals: {}, status: refused } as unknown as Response;
    void guards[round]!(req, res, () => resolve());
  });
const caches = [0, 1, 2].map(() => new InMemoryReplayCache());

type Pass = { name: string; run: (t: string, round: number) => unknown };
const passes: Pass[] = [
  {
    name: 'verifier (every check, jti recorded)',
    run: async (t, round) => {
      const r = await verifiers[round]!.verify(`Bearer ${t}`, aud);
      if (!r.ok) throw new Error(`token refused: ${r.reason}`);
    },
  },
  { name: 'guard (requireCdsClient, stub request)', run: (t, round) => guarded(t, round) },
  { name: 'bare jose.jwtVerify, key imported once', run: (t) => jwtVerify(t, key, { ...claimOptions, currentDate: new Date() }) },
  { name: '  decode header + payload', run: (t) => [decodeProtectedHeader(t), decodeJwt(t)] },
  { name: '  key lookup (local JWKS, cached import)', run: (t) => localSet(decodeProtectedHeader(t), undefined) },
  {
    name: '  signature alone (WebCrypto verify)',
    run: async (t) => {
      const { input, sig } = parts(t);
      if (!(await webcrypto.subtle.verify({ name: 'ECDSA', hash: 'SHA-384' }, key, sig, input))) throw new Error('bad signature');
    },
  },
  {
    name: '  jwtVerify through the local JWKS',
    run: (t) => jwtVerify(t, localSet, { ...claimOptions, currentDate: new Date() }),
  },
  { name: '  replay cache seen (fresh jti)', run: (t, round) => caches[round]!.seen(`${iss} ${t.slice(-36)}`, iat + 300) },
];

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m]! : (s[m - 1]! + s[m]!) / 2;
};
const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;

async function measure(p: Pass, list: string[], round: number): Promise<{ wall: number[]; cpuUs: number }> {
  const wall: number[] = [];
  const cpu0 = process.cpuUsage();
  for (let i = 0; i < list.length; i += 1) {
    const t0 = performance.now();
    await p.run(list[i]!, round);
    wall.push((performance.now() - t0) * 1000);
  }
  const cpu = process.cpuUsage(cpu0);
  return { wall, cpuUs: (cpu.user + cpu.system) / list.length };
}

// Warm-up: every pass over tokens of its own, with the instances of index 2.
for (const p of passes) await measure(p, warmTokens, 2);

const results = new Map<string, { wall: number[]; cpu: number[] }>(passes.map((p) => [p.name, { wall: [], cpu: [] }]));
for (const round of [0, 1]) {
  const order = round === 0 ? passes : [...passes].reverse();
  for (const p of order) {
    const m = await measure(p, tokens, round);
    const r = results.get(p.name)!;
    r.wall.push(...m.wall);
    r.cpu.push(m.cpuUs);
  }
}

const f = (x: number) => x.toFixed(1).padStart(8);
console.log(`${n} fresh ES384 tokens, each pass twice; node ${process.version}`);
console.log(`${'µs per call'.padEnd(44)}${'median'.padStart(8)}${'mean'.padStart(8)}${'CPU'.padStart(8)}`);
for (const p of passes) {
  const r = results.get(p.name)!;
  console.log(`${p.name.padEnd(44)}${f(median(r.wall))}${f(mean(r.wall))}${f(mean(r.cpu))}`);
}

// The jti memory in steady state: 300 req/s (the benchmark's paced rate, bench/run.ts) for one retention of 360 s
// (maxTokenAgeSeconds 300 + clockSkewSeconds 60, the defaults in src/auth/issuer-config.ts) fills it with 108,000
// entries; then 60 s more of calls on a simulated clock, each timed: a call that forgets many entries at once shows
// among the worst, beside the garbage collections.
{
  const rate = 300;
  const retention = config.maxTokenAgeSeconds + config.clockSkewSeconds;
  let clockMs = Date.now();
  const cache = new InMemoryReplayCache({ nowMs: () => clockMs });
  for (let i = 0; i < rate * retention; i += 1) {
    cache.seen(`${iss} ${randomUUID()}`, clockMs / 1000 + retention);
    clockMs += 1000 / rate;
  }
  const filled = cache.size;
  const keys = Array.from({ length: rate * 60 }, () => `${iss} ${randomUUID()}`);
  const times = new Float64Array(keys.length);
  keys.forEach((k, i) => {
    const t0 = performance.now();
    cache.seen(k, clockMs / 1000 + retention);
    times[i] = (performance.now() - t0) * 1000;
    clockMs += 1000 / rate;
  });
  const sorted = [...times].sort((a, b) => a - b);
  const worst = sorted.slice(-3).reverse();
  console.log(
    `replay cache holding ${filled} jti, ${keys.length} more calls over 60 s (simulated clock): mean ${mean(sorted).toFixed(2)} µs, ` +
      `${sorted.filter((t) => t > 1000).length} calls over 1 ms, the 3 worst ${worst.map((t) => (t / 1000).toFixed(2)).join(', ')} ms ` +
      '(a garbage collection lands in some call too)',
  );
}

const v = results.get(passes[0]!.name)!;
const b = results.get(passes[2]!.name)!;
console.log(
  `verifier / bare jose: median ${(median(v.wall) / median(b.wall)).toFixed(2)}×, CPU ${(mean(v.cpu) / mean(b.cpu)).toFixed(2)}×`,
);
