/**
 * Wiring: configuration → audit store, catalogue, thresholds, logger → the express app. No listen here,
 * so tests and the demo can run the very same app on a port of their choosing.
 */
import type { Logger } from 'pino';
import { resolveThresholds } from './assess/thresholds.js';
import { rulesVersion } from './config/rules-version.js';
import { openAuditStore } from './audit/open-store.js';
import type { AuditStore } from './audit/types.js';
import { loadCatalogue } from './cards/catalogue.js';
import { ConfigError, type AppConfig } from './config/config.js';
import { fhirFetcher } from './fhir/gather.js';
import { createApp } from './http/app.js';
import { createLogger } from './log.js';
import { createMetrics } from './http/metrics.js';
import { authConfigSchema } from './auth/issuer-config.js';
import { createClientVerifier } from './auth/client-verifier.js';
import { requireAuditAccess, requireCdsClient } from './auth/middleware.js';
import { adviceLinkUrl, ADVICE_LINK_LABEL, signerFromConfig } from './http/advice-link.js';
import { mountPages } from './http/pages.js';

export interface Service {
  app: ReturnType<typeof createApp>;
  store: AuditStore;
  log: Logger;
  rulesVersion: string;
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
  const version = rulesVersion(digest, thresholds);
  const store = opts.store ?? openAuditStore(cfg, { onError: (e) => log.error({ err: e.message }, 'audit store connection error') });
  await store.init();
  const publicUrl = cfg.TIDEMARK_PUBLIC_URL ?? `http://localhost:${cfg.PORT}`;
  const auth = authConfigSchema.safeParse({ issuers: cfg.file.issuers ?? [] });
  if (!auth.success) {
    throw new ConfigError(`invalid configuration: TIDEMARK_CONFIG_FILE issuers: ${auth.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  }
  const verifier = createClientVerifier(auth.data);
  const warnings: string[] = [];
  if (cfg.TIDEMARK_TRIAL_MODE) {
    warnings.push('local trial mode: CDS calls are accepted without a verified client JWT; never use with real patients');
    log.warn({}, warnings[0] as string);
  }
  const links = signerFromConfig(cfg);
  if (links.warning) {
    warnings.push(links.warning);
    log.warn({}, links.warning);
  }
  const now = opts.now ?? (() => new Date());
  const signer = links.signer;
  if (!cfg.TIDEMARK_TRIAL_MODE && auth.data.issuers.length === 0) warnings.push('no trusted issuers configured: every CDS call is refused');
  const metrics = createMetrics();
  const app = createApp({
    metrics,
    onResponse: metrics.onResponse,
    cdsClientAuth: requireCdsClient({ verifier, publicUrl, trialMode: cfg.TIDEMARK_TRIAL_MODE, log }),
    auditAuth: requireAuditAccess({ ...(cfg.TIDEMARK_AUDIT_TOKEN ? { auditToken: cfg.TIDEMARK_AUDIT_TOKEN } : {}), verifier, publicUrl, log }),
    readinessWarnings: warnings,
    pages: (a) => mountPages(a, {
      store, catalogue, thresholds, rulesVersion: version, now, timeZone: cfg.TIDEMARK_TIME_ZONE, frameAncestors: cfg.TIDEMARK_FRAME_ANCESTORS, log,
      ...(signer ? { signer } : {}),
    }),
    ...(signer ? { adviceLink: (id: string) => ({ label: ADVICE_LINK_LABEL, url: adviceLinkUrl(publicUrl, id, signer.sign(id, now().getTime())) }) } : {}),
    ...(cfg.file.corsOrigins ? { corsOrigins: cfg.file.corsOrigins } : {}),
    extraRoutes: (a) => {
      a.get('/metrics', async (_req, res) => {
        res.type(metrics.registry.contentType).send(await metrics.registry.metrics());
      });
    },
    store, catalogue, thresholds, rulesVersion: version, publicUrl, log, bodyLimit: cfg.TIDEMARK_BODY_LIMIT,
    gatherOptions: { budgetMs: cfg.TIDEMARK_FHIR_BUDGET_MS, maxPages: cfg.TIDEMARK_FHIR_MAX_PAGES, concurrency: cfg.TIDEMARK_FHIR_CONCURRENCY },
    now,
    ...(opts.makeFetcher ? { makeFetcher: opts.makeFetcher } : {}),
  });
  return { app, store, log, rulesVersion: version, close: () => store.close() };
}
