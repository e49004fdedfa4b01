/**
 * Wiring: configuration → audit store, catalogue, thresholds, logger → the express app. No listen here,
 * so tests and the demo can run the very same app on a port of their choosing.
 */
import type { SiteMap } from './fhir/site-map.js';
import type { Logger } from 'pino';
import { resolveThresholds } from './assess/thresholds.js';
import { rulesVersion } from './config/rules-version.js';
import { openAuditStore } from './audit/open-store.js';
import type { AuditStore } from './audit/types.js';
import { loadCatalogue } from './cards/catalogue.js';
import { ConfigError, type AppConfig } from './config/config.js';
import type { fhirFetcher } from './fhir/fetcher.js';
import { createApp } from './http/app.js';
import { createLogger } from './log.js';
import { createMetrics } from './http/metrics.js';
import { authConfigSchema, type AuthConfig } from './auth/issuer-config.js';
import { createClientVerifier } from './auth/client-verifier.js';
import { requireAuditAccess, requireCdsClient, requireMetricsAccess } from './auth/middleware.js';
import { InMemoryReplayCache } from './auth/replay-cache.js';
import { adviceLinkUrl, ADVICE_LINK_LABEL, signerFromConfig } from './http/advice-link.js';
import { mountConsole } from './http/console.js';
import { mountPages } from './http/pages.js';

export interface Service {
  app: ReturnType<typeof createApp>;
  store: AuditStore;
  log: Logger;
  rulesVersion: string;
  /** The site's ConceptMaps and unit hints, when configured (a stored record's snapshot is rebuilt with them). */
  siteMap?: SiteMap;
  /** What the start-up line reports. */
  startup: {
    publicUrl: string;
    publicUrlFromEnv: boolean;
    trustedIssuers: number;
    auditReaders: number;
    auditStore: string;
    replayCache: 'shared' | 'per-process';
  };
  close(): Promise<void>;
}

export interface ServiceOptions {
  /** Injected clock (tests and replay); defaults to the system clock. */
  now?: () => Date;
  store?: AuditStore;
  log?: Logger;
  makeFetcher?: typeof fhirFetcher;
}

export async function buildService(cfg: AppConfig, opts: ServiceOptions = {}): Promise<Service> {
  const log = opts.log ?? createLogger(cfg.TIDEMARK_LOG_LEVEL);
  let thresholds;
  try {
    thresholds = resolveThresholds(cfg.file.thresholds ?? {});
  } catch (e) {
    throw new ConfigError(`invalid configuration: TIDEMARK_CONFIG_FILE thresholds: ${(e as Error).message}`);
  }
  const { catalogue, digest } = loadCatalogue();
  const version = rulesVersion(digest, thresholds, undefined, cfg.siteMap);
  const auth = authConfigOf(cfg, 'issuers');
  // Audit readers are an allowlist of their own: a CDS issuer's token opens the audit API only if it is listed here too.
  const auditReaders = authConfigOf(cfg, 'auditReaders');
  const store = opts.store ?? openAuditStore(cfg, { onError: (e) => log.error({ err: e.message }, 'audit store connection error') });
  await store.init();
  const publicUrl = cfg.TIDEMARK_PUBLIC_URL ?? `http://localhost:${cfg.PORT}`;
  // One replay memory for both lists; with the PostgreSQL store it is a table every replica shares.
  const sharedReplay = store.sharedReplayCache?.();
  const replayCache = sharedReplay ?? new InMemoryReplayCache();
  const verifier = createClientVerifier(auth, { replayCache });
  const auditVerifier = createClientVerifier(auditReaders, { replayCache });
  const fhirServers = new Map(auth.issuers.flatMap((i) => (i.fhirServers ? [[i.iss, i.fhirServers] as const] : [])));
  const unlisted = auth.issuers.filter((i) => !i.fhirServers).map((i) => i.iss);
  if (unlisted.length)
    log.warn(
      { issuers: unlisted },
      "trusted issuers without a fhirServers list: any https FHIR server their calls name gets the call's token (docs/security.md)",
    );
  const warnings: string[] = [];
  if (cfg.TIDEMARK_TRIAL_MODE) {
    // Shown at /readyz; the start-up log line comes from the CDS guard (src/auth/middleware.ts), once.
    warnings.push('local trial mode: CDS calls are accepted without a verified client JWT; never use with real patients');
  }
  const links = signerFromConfig(cfg);
  if (links.warning) {
    warnings.push(links.warning);
    log.warn({}, links.warning);
  }
  const now = opts.now ?? (() => new Date());
  const signer = links.signer;
  if (!cfg.TIDEMARK_TRIAL_MODE && auth.issuers.length === 0) warnings.push('no trusted issuers configured: every CDS call is refused');
  if (!cfg.TIDEMARK_TRIAL_MODE && cfg.TIDEMARK_PUBLIC_URL === undefined) {
    const w = `TIDEMARK_PUBLIC_URL is not set: the expected token audience is ${publicUrl}/..., which no client behind a proxy or on another host will send`;
    warnings.push(w);
    log.warn({ publicUrl }, w);
  }
  const metrics = createMetrics(store.commitStats ? { commitStats: () => store.commitStats!() } : {});
  const auditAuth = requireAuditAccess({
    ...(cfg.TIDEMARK_AUDIT_TOKEN ? { auditToken: cfg.TIDEMARK_AUDIT_TOKEN } : {}),
    verifier: auditVerifier,
    publicUrl,
    log,
  });
  const app = createApp({
    metrics,
    onResponse: metrics.onResponse,
    cdsClientAuth: requireCdsClient({ verifier, publicUrl, trialMode: cfg.TIDEMARK_TRIAL_MODE, log }),
    auditAuth,
    readinessWarnings: warnings,
    pages: (a) => {
      mountPages(a, {
        store,
        catalogue,
        thresholds,
        rulesVersion: version,
        now,
        timeZone: cfg.TIDEMARK_TIME_ZONE,
        frameAncestors: cfg.TIDEMARK_FRAME_ANCESTORS,
        log,
        ...(signer ? { signer } : {}),
        ...(cfg.siteMap ? { siteMap: cfg.siteMap } : {}),
      });
      mountConsole(a, {
        store,
        catalogue,
        catalogueDigest: digest,
        thresholds,
        rulesVersion: version,
        now,
        timeZone: cfg.TIDEMARK_TIME_ZONE,
        publicUrl,
        auditAuth,
        sessionMinutes: cfg.TIDEMARK_CONSOLE_SESSION_MIN,
        bodyLimit: cfg.TIDEMARK_BODY_LIMIT,
        log,
        ...(cfg.TIDEMARK_AUDIT_TOKEN ? { auditToken: cfg.TIDEMARK_AUDIT_TOKEN } : {}),
        ...(cfg.siteMap ? { siteMap: cfg.siteMap } : {}),
      });
    },
    ...(signer
      ? { adviceLink: (id: string) => ({ label: ADVICE_LINK_LABEL, url: adviceLinkUrl(publicUrl, id, signer.sign(id, now().getTime())) }) }
      : {}),
    ...(cfg.file.corsOrigins ? { corsOrigins: cfg.file.corsOrigins } : {}),
    extraRoutes: (a) => {
      a.get('/metrics', requireMetricsAccess({ metricsToken: cfg.TIDEMARK_METRICS_TOKEN, log }), async (_req, res) => {
        res.type(metrics.registry.contentType).send(await metrics.registry.metrics());
      });
    },
    store,
    catalogue,
    catalogueDigest: digest,
    thresholds,
    rulesVersion: version,
    publicUrl,
    timeZone: cfg.TIDEMARK_TIME_ZONE,
    log,
    bodyLimit: cfg.TIDEMARK_BODY_LIMIT,
    ...(cfg.siteMap ? { siteMap: cfg.siteMap } : {}),
    gatherOptions: {
      budgetMs: cfg.TIDEMARK_FHIR_BUDGET_MS,
      maxPages: cfg.TIDEMARK_FHIR_MAX_PAGES,
      concurrency: cfg.TIDEMARK_FHIR_CONCURRENCY,
      maxResponseBytes: cfg.TIDEMARK_FHIR_MAX_RESPONSE_BYTES,
      maxCallBytes: cfg.TIDEMARK_FHIR_MAX_CALL_BYTES,
    },
    now,
    fhirServersFor: (issuer) => fhirServers.get(issuer),
    ...(opts.makeFetcher ? { makeFetcher: opts.makeFetcher } : {}),
  });
  const startup = {
    publicUrl,
    publicUrlFromEnv: cfg.TIDEMARK_PUBLIC_URL !== undefined,
    trustedIssuers: verifier.issuerCount,
    auditReaders: auditVerifier.issuerCount,
    auditStore: store.kind,
    replayCache: sharedReplay ? ('shared' as const) : ('per-process' as const),
  };
  return { app, store, log, rulesVersion: version, startup, ...(cfg.siteMap ? { siteMap: cfg.siteMap } : {}), close: () => store.close() };
}

/**
 * The verification settings for one list of the config file (`issuers` or `auditReaders`) with the file's token
 * rules (clockSkewSeconds, maxTokenAgeSeconds, algorithms), which apply to both lists.
 */
function authConfigOf(cfg: AppConfig, list: 'issuers' | 'auditReaders'): AuthConfig {
  const { clockSkewSeconds, maxTokenAgeSeconds, algorithms } = cfg.file;
  const parsed = authConfigSchema.safeParse({
    issuers: cfg.file[list] ?? [],
    ...(clockSkewSeconds !== undefined && { clockSkewSeconds }),
    ...(maxTokenAgeSeconds !== undefined && { maxTokenAgeSeconds }),
    ...(algorithms !== undefined && { algorithms }),
  });
  if (!parsed.success) {
    const where = (path: PropertyKey[]) => (path[0] === 'issuers' ? [list, ...path.slice(1)] : path).join('.');
    throw new ConfigError(
      `invalid configuration: TIDEMARK_CONFIG_FILE ${parsed.error.issues.map((i) => `${where(i.path)}: ${i.message}`).join('; ')}`,
    );
  }
  return parsed.data;
}
