/**
 * Configuration: environment variables, plus an optional JSON file (TIDEMARK_CONFIG_FILE) for what does
 * not fit in a variable (site thresholds, trusted issuers). Validated with zod at start; a bad value stops
 * start-up with a message that names the variable.
 */
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { z } from 'zod';
import { parseSiteMap, SiteMapError, type SiteMap } from '../fhir/site-map.js';
import { DEFAULT_BYTE_CAPS } from '../fhir/fetcher.js';

const intFrom = (min: number, max: number) => z.coerce.number().int().min(min).max(max);
const boolFrom = z.enum(['true', 'false', '1', '0', 'yes', 'no']).transform((v) => v === 'true' || v === '1' || v === 'yes');

/** Environment variables and what they mean; docs/configuration.md lists the same. */
export const envSchema = z.object({
  PORT: intFrom(0, 65535).default(8080),
  /** Address to listen on. Unset: 127.0.0.1 in trial mode, 0.0.0.0 otherwise (loadConfig fills it in). */
  HOST: z.string().min(1).optional(),
  /** Public base URL of this service as CDS clients call it (JWT aud, card links). */
  TIDEMARK_PUBLIC_URL: z.url().optional(),
  TIDEMARK_AUDIT_STORE: z.enum(['sqlite', 'postgres']).default('sqlite'),
  TIDEMARK_SQLITE_PATH: z.string().min(1).default('data/tidemark-audit.sqlite'),
  TIDEMARK_PG_URL: z.string().min(1).optional(),
  /** Time budget for all FHIR queries of one call, ms (default 2 s). */
  TIDEMARK_FHIR_BUDGET_MS: intFrom(50, 30_000).default(2000),
  /** At most this many pages followed per searchset. */
  TIDEMARK_FHIR_MAX_PAGES: intFrom(1, 50).default(5),
  /** At most this many FHIR queries in flight per call. */
  TIDEMARK_FHIR_CONCURRENCY: intFrom(1, 32).default(8),
  /** Largest single FHIR answer read, bytes after decompression (default 16 MiB); a larger one is cut off. */
  TIDEMARK_FHIR_MAX_RESPONSE_BYTES: intFrom(64 * 1024, 1024 * 1024 * 1024).default(DEFAULT_BYTE_CAPS.maxResponseBytes),
  /** Largest sum of the FHIR answers of one call, bytes after decompression (default 48 MiB). */
  TIDEMARK_FHIR_MAX_CALL_BYTES: intFrom(64 * 1024, 4 * 1024 * 1024 * 1024).default(DEFAULT_BYTE_CAPS.maxCallBytes),
  TIDEMARK_LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  TIDEMARK_CONFIG_FILE: z.string().min(1).optional(),
  /** Local trial mode: accept calls without a verified client JWT. Never in production. */
  TIDEMARK_TRIAL_MODE: boolFrom.default(false),
  /** Bearer token for the audit API (alternative to an audit reader's JWT). */
  TIDEMARK_AUDIT_TOKEN: z.string().min(16).optional(),
  /** Bearer token that /metrics then requires; unset, /metrics answers anyone who can reach the port. */
  TIDEMARK_METRICS_TOKEN: z.string().min(16).optional(),
  /** Largest accepted request body. */
  TIDEMARK_BODY_LIMIT: z
    .string()
    .regex(/^\d+(kb|mb)$/i)
    .default('2mb'),
  /**
   * Key for the signed links to the reasoning pages (HMAC-SHA256), at least 32 characters. Without it the links
   * are off, except in trial mode, where a key is made for the process (links then die with it).
   */
  TIDEMARK_LINK_KEY: z.string().min(32).optional(),
  /** How long a reasoning-page link stays valid, minutes (default 12 h). */
  TIDEMARK_LINK_LIFETIME_MIN: intFrom(1, 7 * 24 * 60).default(720),
  /** How long a console session lasts after sign-in, minutes (default 30; the console is at /console). */
  TIDEMARK_CONSOLE_SESSION_MIN: intFrom(1, 12 * 60).default(30),
  /** The site's IANA time zone: times on the reasoning page are shown in it (default UTC). */
  TIDEMARK_TIME_ZONE: z
    .string()
    .min(1)
    .refine(isTimeZone, 'not an IANA time zone known to this Node.js (e.g. Europe/Berlin)')
    .default('UTC'),
  /** EHR origins allowed to frame the reasoning page (CSP frame-ancestors), comma-separated; none by default. */
  TIDEMARK_FRAME_ANCESTORS: z
    .string()
    .transform((v) =>
      v
        .split(',')
        .map((o) => o.trim())
        .filter(Boolean),
    )
    .pipe(z.array(z.string().regex(/^https?:\/\/[a-z0-9.-]+(:\d{1,5})?$/i, 'each entry must be an origin such as https://ehr.example.org')))
    .default([]),
});

/** True for a time zone name Intl knows (IANA names; "UTC"). */
function isTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat('en-GB', { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}

/**
 * The optional JSON file: site threshold overrides, trusted CDS clients, audit readers and the token rules.
 * The auth entries are checked in full by authConfigSchema (src/auth/issuer-config.ts) when the service is built.
 */
export const fileSchema = z
  .object({
    thresholds: z.record(z.string(), z.unknown()).optional(),
    issuers: z.array(z.unknown()).optional(),
    /** Issuers whose JWTs open the audit API (and nothing else); a CDS issuer is not one unless listed here too. */
    auditReaders: z.array(z.unknown()).optional(),
    clockSkewSeconds: z.unknown().optional(),
    maxTokenAgeSeconds: z.unknown().optional(),
    algorithms: z.unknown().optional(),
    corsOrigins: z.array(z.string()).optional(),
    /**
     * The site's FHIR R4 ConceptMaps (docs/integration.md): each a file path (relative to this file) or the
     * ConceptMap itself. Checked at start by src/fhir/site-map.ts; part of the rules version.
     */
    conceptMaps: z
      .array(z.union([z.string().min(1), z.record(z.string(), z.unknown())]))
      .max(50)
      .optional(),
    /** Site unit text → UCUM code, for unit text that is not UCUM (docs/integration.md). Part of the rules version. */
    unitHints: z.record(z.string(), z.string()).optional(),
  })
  .strict();

export type EnvConfig = z.infer<typeof envSchema>;
export type FileConfig = z.infer<typeof fileSchema>;
export interface AppConfig extends Omit<EnvConfig, 'HOST'> {
  /** The address to listen on: HOST, or its default for the mode. */
  HOST: string;
  /** Whether HOST was set, or is the default (127.0.0.1 in trial mode, 0.0.0.0 otherwise). */
  hostFromEnv: boolean;
  file: FileConfig;
  /** The site's maps and unit hints, checked (absent: none). */
  siteMap?: SiteMap;
}

export class ConfigError extends Error {
  override name = 'ConfigError';
}

function describe(issues: z.core.$ZodIssue[], prefix: string): string {
  return issues.map((i) => `${prefix}${i.path.join('.') || '(root)'}: ${i.message}`).join('; ');
}

/** Reads and validates configuration. Throws ConfigError naming the variable at fault. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env): AppConfig {
  const picked = Object.fromEntries(
    Object.keys(envSchema.shape)
      .filter((k) => env[k] !== undefined && env[k] !== '')
      .map((k) => [k, env[k]]),
  );
  const parsed = envSchema.safeParse(picked);
  if (!parsed.success) throw new ConfigError(`invalid configuration: ${describe(parsed.error.issues, '')}`);
  const cfg = parsed.data;
  if (cfg.TIDEMARK_AUDIT_STORE === 'postgres' && !cfg.TIDEMARK_PG_URL) {
    throw new ConfigError('invalid configuration: TIDEMARK_PG_URL is required when TIDEMARK_AUDIT_STORE=postgres');
  }
  let file: FileConfig = {};
  if (cfg.TIDEMARK_CONFIG_FILE) {
    let raw: unknown;
    try {
      raw = JSON.parse(readFileSync(cfg.TIDEMARK_CONFIG_FILE, 'utf8'));
    } catch (e) {
      throw new ConfigError(
        `invalid configuration: TIDEMARK_CONFIG_FILE (${cfg.TIDEMARK_CONFIG_FILE}) could not be read as JSON: ${(e as Error).message}`,
      );
    }
    const f = fileSchema.safeParse(raw);
    if (!f.success) throw new ConfigError(`invalid configuration: TIDEMARK_CONFIG_FILE ${describe(f.error.issues, '')}`);
    file = f.data;
  }
  // Trial mode takes calls without a token and has a well-known audit token: it stays on loopback unless asked.
  const host = cfg.HOST ?? (cfg.TIDEMARK_TRIAL_MODE ? '127.0.0.1' : '0.0.0.0');
  const siteMap = loadSiteMap(file, cfg.TIDEMARK_CONFIG_FILE ? dirname(resolve(cfg.TIDEMARK_CONFIG_FILE)) : process.cwd());
  return { ...cfg, HOST: host, hostFromEnv: cfg.HOST !== undefined, file, ...(siteMap ? { siteMap } : {}) };
}

/**
 * Reads the ConceptMap files named in the configuration file (paths relative to it) and checks maps and unit
 * hints. Throws ConfigError naming the element at fault (`conceptMaps[0].group[1].element[3].target[0].code`).
 */
export function loadSiteMap(file: FileConfig, baseDir: string): SiteMap | undefined {
  if (!file.conceptMaps?.length && !file.unitHints) return undefined;
  const names: string[] = [];
  const maps = (file.conceptMaps ?? []).map((m, i) => {
    if (typeof m !== 'string') {
      names.push('');
      return m;
    }
    names.push(m);
    try {
      return JSON.parse(readFileSync(resolve(baseDir, m), 'utf8')) as unknown;
    } catch (e) {
      throw new ConfigError(
        `invalid configuration: TIDEMARK_CONFIG_FILE conceptMaps[${i}] (${m}) could not be read as JSON: ${(e as Error).message}`,
      );
    }
  });
  try {
    return parseSiteMap(maps, file.unitHints ?? {}, names);
  } catch (e) {
    if (e instanceof SiteMapError) throw new ConfigError(`invalid configuration: TIDEMARK_CONFIG_FILE ${e.message}`);
    throw e;
  }
}
