/**
 * Auth room: who may call Tidemark, and how their tokens are checked (CDS Hooks 2.0 §Trusting CDS
 * Clients; RFC 7515, RFC 7517, RFC 7519). This file holds the configuration schema only; it may
 * import zod and nothing else from the project.
 *
 * The JSON shape lives in the config file's `issuers` block (docs/security.md has an example).
 */
import { z } from 'zod';

/** Signature algorithms a CDS client may use. `none` and HMAC are never accepted (CDS Hooks 2.0 §6). */
export const ALLOWED_ALGORITHMS = ['ES384', 'RS384'] as const;
export type AllowedAlgorithm = (typeof ALLOWED_ALGORITHMS)[number];

const LOOPBACK_HOSTS = new Set(['127.0.0.1', 'localhost', '[::1]']);

/**
 * A URL we fetch from (key sets here, a call's fhirServer in src/hooks/schemas.ts): https, or http on a
 * loopback host (local tests and trials only). No embedded credentials, no fragment, so the value is what an
 * operator sees in the log. Any other scheme (data:, file:, ftp:, …) is refused.
 */
export const httpsOrLoopbackUrl = z.url().superRefine((value, ctx) => {
  const u = new URL(value);
  const secure = u.protocol === 'https:' || (u.protocol === 'http:' && LOOPBACK_HOSTS.has(u.hostname));
  if (!secure) ctx.addIssue({ code: 'custom', message: 'must be an https URL (http only on a loopback host)' });
  if (u.username !== '' || u.password !== '') ctx.addIssue({ code: 'custom', message: 'must not carry credentials' });
  if (u.hash !== '') ctx.addIssue({ code: 'custom', message: 'must not have a fragment' });
});

const keySetUrl = httpsOrLoopbackUrl;

/** An origin only (scheme, host, port), as listed in an issuer's `fhirServers`; kept in its normal form. */
const fhirServerOrigin = httpsOrLoopbackUrl
  .refine(
    (v) => {
      const u = new URL(v);
      return (u.pathname === '/' || u.pathname === '') && u.search === '';
    },
    { message: 'must be an origin only (scheme, host and port), with no path or query' },
  )
  .transform((v) => new URL(v).origin);

/** Members of a JWK that only a private or symmetric key has (RFC 7518 §6.2.2, §6.3.2, §6.4). */
const PRIVATE_MEMBERS = ['d', 'p', 'q', 'dp', 'dq', 'qi', 'oth', 'k'] as const;

/** One public signature key, as pasted into the config file. `kid` is required: tokens name their key. */
export const publicJwkSchema = z
  .object({
    kty: z.enum(['EC', 'RSA']),
    kid: z.string().min(1),
    alg: z.enum(ALLOWED_ALGORITHMS).optional(),
    use: z.literal('sig').optional(),
    crv: z.string().optional(),
    x: z.string().optional(),
    y: z.string().optional(),
    n: z.string().optional(),
    e: z.string().optional(),
  })
  .loose()
  .superRefine((jwk, ctx) => {
    for (const m of PRIVATE_MEMBERS) {
      if (m in jwk) ctx.addIssue({ code: 'custom', path: [m], message: 'private key material does not belong in the config' });
    }
    if (jwk.kty === 'EC' && (jwk.crv === undefined || jwk.x === undefined || jwk.y === undefined)) {
      ctx.addIssue({ code: 'custom', message: 'an EC key needs crv, x and y' });
    }
    if (jwk.kty === 'RSA' && (jwk.n === undefined || jwk.e === undefined)) {
      ctx.addIssue({ code: 'custom', message: 'an RSA key needs n and e' });
    }
  });

/** One trusted CDS client (an EHR installation) and where its public keys come from. */
export const trustedIssuerSchema = z
  .object({
    /** The `iss` claim the client puts in its tokens, compared exactly. */
    iss: z.url(),
    /** The client's JWKS endpoint. Exactly one of jwksUrl and jwks. */
    jwksUrl: keySetUrl.optional(),
    /** The client's public keys, exchanged out of band. Exactly one of jwksUrl and jwks. */
    jwks: z
      .object({ keys: z.array(publicJwkSchema).min(1) })
      .strict()
      .refine((s) => new Set(s.keys.map((k) => k.kid)).size === s.keys.length, { message: 'kid values must be unique' })
      .optional(),
    /** `jku` header values this client may use, compared as exact strings. Any other jku is refused unfetched. */
    allowedJku: z.array(keySetUrl).min(1).optional(),
    /** If present, the token's `tenant` claim must be one of these. */
    tenants: z.array(z.string().min(1)).min(1).optional(),
    /**
     * If present, the FHIR server origins (`https://host[:port]`) this client's calls may name as fhirServer;
     * a call naming any other is refused before any request is made. Recommended: without it any https
     * fhirServer is accepted and receives the call's fhirAuthorization token.
     */
    fhirServers: z.array(fhirServerOrigin).min(1).optional(),
  })
  .strict()
  .refine((i) => (i.jwksUrl === undefined) !== (i.jwks === undefined), {
    message: 'give exactly one of jwksUrl and jwks',
  });

/** Verification settings: the trusted issuers plus clock rules. */
export const authConfigSchema = z
  .object({
    issuers: z.array(trustedIssuerSchema).default([]),
    /** Leeway for exp and iat against our clock, seconds. */
    clockSkewSeconds: z.number().int().min(0).max(300).default(60),
    /** A token whose iat is older than this is refused even if exp is later, seconds. */
    maxTokenAgeSeconds: z.number().int().min(1).max(3600).default(300),
    /**
     * Accepted `alg` values. Pinned to ES384 and RS384 (CDS Hooks 2.0 RECOMMENDED); a site may only
     * narrow the list, never widen it.
     */
    algorithms: z
      .array(z.enum(ALLOWED_ALGORITHMS))
      .min(1)
      .default([...ALLOWED_ALGORITHMS]),
  })
  .strict()
  .superRefine((c, ctx) => {
    const seen = new Set<string>();
    c.issuers.forEach((i, idx) => {
      if (seen.has(i.iss)) ctx.addIssue({ code: 'custom', path: ['issuers', idx, 'iss'], message: 'issuer listed twice' });
      seen.add(i.iss);
    });
  });

export type PublicJwk = z.output<typeof publicJwkSchema>;
export type TrustedIssuer = z.output<typeof trustedIssuerSchema>;
export type AuthConfig = z.output<typeof authConfigSchema>;
export type AuthConfigInput = z.input<typeof authConfigSchema>;
