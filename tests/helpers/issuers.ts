/**
 * Invented CDS clients and audit readers for tests over real HTTP: each has a real ES384 key pair (jose), a
 * config-file entry with its public key, and mints real signed JWTs (RFC 7519) with a fresh jti per call.
 */
import { randomUUID } from 'node:crypto';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { calculateJwkThumbprint, exportJWK, generateKeyPair, SignJWT, type CryptoKey, type JWK } from 'jose';

export interface TestIssuer {
  iss: string;
  /** The entry for the config file's `issuers` or `auditReaders`. */
  entry: { iss: string; jwks: { keys: JWK[] }; tenants?: string[] };
  /** A signed token for `aud`; `scope` and `tenant` optional; `iat` in seconds (default now), exp 300 s later unless told. */
  mint(aud: string, opts?: { scope?: string; tenant?: string; iat?: number; expInSeconds?: number }): Promise<string>;
}

export async function makeIssuer(iss: string, alg: 'ES384' | 'RS384' = 'ES384', tenants?: string[]): Promise<TestIssuer> {
  const pair = await generateKeyPair(alg, { extractable: true });
  const jwk = { ...(await exportJWK(pair.publicKey)), alg, use: 'sig' };
  const kid = await calculateJwkThumbprint(jwk);
  const privateKey: CryptoKey = pair.privateKey;
  return {
    iss,
    entry: { iss, jwks: { keys: [{ ...jwk, kid }] }, ...(tenants ? { tenants } : {}) },
    mint(aud, o = {}) {
      const iat = o.iat ?? Math.floor(Date.now() / 1000);
      return new SignJWT({ ...(o.scope !== undefined && { scope: o.scope }), ...(o.tenant !== undefined && { tenant: o.tenant }) })
        .setProtectedHeader({ alg, kid, typ: 'JWT' })
        .setIssuer(iss)
        .setAudience(aud)
        .setIssuedAt(iat)
        .setExpirationTime(iat + (o.expInSeconds ?? 300))
        .setJti(randomUUID())
        .sign(privateKey);
    },
  };
}

/** Writes a config file into a fresh temp folder and returns its path. */
export function writeConfigFile(content: unknown): string {
  const file = join(mkdtempSync(join(tmpdir(), 'tm-cfg-')), 'config.json');
  writeFileSync(file, JSON.stringify(content));
  return file;
}
