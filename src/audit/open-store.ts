/** Picks the audit adapter from configuration. The caller runs init() before serving. */
import { PostgresAuditStore } from './postgres-store.js';
import { SqliteAuditStore } from './sqlite-store.js';
import type { AuditStore } from './types.js';

export interface AuditStoreConfig {
  TIDEMARK_AUDIT_STORE: 'sqlite' | 'postgres';
  TIDEMARK_SQLITE_PATH: string;
  TIDEMARK_PG_URL?: string | undefined;
}

export function openAuditStore(cfg: AuditStoreConfig, opts: { onError?: (err: Error) => void } = {}): AuditStore {
  switch (cfg.TIDEMARK_AUDIT_STORE) {
    case 'sqlite':
      return new SqliteAuditStore(cfg.TIDEMARK_SQLITE_PATH);
    case 'postgres':
      if (!cfg.TIDEMARK_PG_URL) throw new Error('TIDEMARK_PG_URL is required when TIDEMARK_AUDIT_STORE=postgres');
      return new PostgresAuditStore(cfg.TIDEMARK_PG_URL, opts.onError ? { onError: opts.onError } : {});
    default: {
      const never: never = cfg.TIDEMARK_AUDIT_STORE;
      throw new Error(`unknown audit store ${String(never)}`);
    }
  }
}
