/**
 * Listens on the configured address and logs the one start-up line an operator checks first: where the service
 * listens, the public URL it expects in token audiences, how many issuers it trusts, and which audit store it uses.
 */
import type { Server } from 'node:http';
import type { AppConfig } from '../config/config.js';
import type { Service } from '../service.js';

export function listen(svc: Service, cfg: Pick<AppConfig, 'PORT' | 'HOST' | 'hostFromEnv' | 'TIDEMARK_TRIAL_MODE'>): Promise<Server> {
  return new Promise((resolve, reject) => {
    const server = svc.app.listen(cfg.PORT, cfg.HOST, (err?: Error) => {
      if (err) {
        reject(err);
        return;
      }
      const addr = server.address();
      const host = typeof addr === 'object' && addr ? addr.address : cfg.HOST;
      const port = typeof addr === 'object' && addr ? addr.port : cfg.PORT;
      const { publicUrl, trustedIssuers, auditReaders, auditStore, replayCache } = svc.startup;
      const loopbackOnly = cfg.TIDEMARK_TRIAL_MODE && !cfg.hostFromEnv;
      svc.log.info(
        {
          host,
          port,
          publicUrl,
          trustedIssuers,
          auditReaders,
          auditStore,
          replayCache,
          rulesVersion: svc.rulesVersion,
          ...(cfg.TIDEMARK_TRIAL_MODE && { trialMode: true }),
        },
        `Tidemark listening on ${host}:${port}, public URL ${publicUrl}, ${trustedIssuers} trusted issuer(s), audit store ${auditStore}` +
          (loopbackOnly ? `; trial mode: listening on ${host} only (set HOST to listen elsewhere)` : ''),
      );
      resolve(server);
    });
  });
}
