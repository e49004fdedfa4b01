/** Prometheus metrics (prom-client): requests by service and status, latency, FHIR fetch errors by kind, audit write latency. */
import { Counter, Gauge, Histogram, Registry, collectDefaultMetrics } from 'prom-client';
import type { GatherOutcome } from '../hooks/gather-types.js';

export interface Metrics {
  registry: Registry;
  onResponse(route: string, service: string, status: number, seconds: number): void;
  observeGather(outcomes: GatherOutcome[]): void;
  observeAuditWrite(seconds: number, ok: boolean): void;
}

export interface MetricsSources {
  /** The audit store's group commits so far (AuditStore.commitStats), read at each scrape. */
  commitStats?: () => { commits: number; records: number };
}

export function createMetrics(sources: MetricsSources = {}): Metrics {
  const registry = new Registry();
  const stats = sources.commitStats;
  if (stats) {
    // Records per commit is the size of the audit store's groups (issue 18: group commit that actually groups).
    new Gauge({
      name: 'tidemark_audit_commits',
      help: 'Audit store transactions committed since start (one group commit each)',
      registers: [registry],
      collect() {
        this.set(stats().commits);
      },
    });
    new Gauge({
      name: 'tidemark_audit_committed_records',
      help: 'Audit records committed since start',
      registers: [registry],
      collect() {
        this.set(stats().records);
      },
    });
  }
  collectDefaultMetrics({ register: registry, prefix: 'tidemark_process_' });
  const requests = new Counter({
    name: 'tidemark_http_requests_total',
    help: 'HTTP requests by route, service and status',
    labelNames: ['route', 'service', 'status'],
    registers: [registry],
  });
  const latency = new Histogram({
    name: 'tidemark_http_request_duration_seconds',
    help: 'HTTP request latency',
    labelNames: ['route', 'service'],
    buckets: [0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5],
    registers: [registry],
  });
  const fhirErrors = new Counter({
    name: 'tidemark_fhir_fetch_errors_total',
    help: 'FHIR gathering failures by kind',
    labelNames: ['kind'],
    registers: [registry],
  });
  const fhirFetches = new Counter({
    name: 'tidemark_fhir_fetches_total',
    help: 'Prefetch keys by source (prefetch or fhir-server)',
    labelNames: ['source'],
    registers: [registry],
  });
  const audit = new Histogram({
    name: 'tidemark_audit_write_duration_seconds',
    help: 'Audit record write latency',
    labelNames: ['ok'],
    buckets: [0.0005, 0.001, 0.002, 0.005, 0.01, 0.02, 0.05, 0.1, 0.5],
    registers: [registry],
  });
  const known = new Set(['bolus-review-select', 'bolus-review-sign', 'fluid-overview']);
  return {
    registry,
    onResponse(route, service, status, seconds) {
      // Only known service ids become label values: an attacker must not grow the label set.
      let svc = service ? 'unknown' : '';
      if (known.has(service)) svc = service;
      requests.inc({ route, service: svc, status: String(status) });
      latency.observe({ route, service: svc }, seconds);
    },
    observeGather(outcomes) {
      for (const o of outcomes) {
        if (o.source !== 'none') fhirFetches.inc({ source: o.source });
        if (['http-error', 'timeout', 'network-error', 'not-fhir', 'truncated', 'too-large', 'redirect'].includes(o.status))
          fhirErrors.inc({ kind: o.status });
      }
    },
    observeAuditWrite(seconds, ok) {
      audit.observe({ ok: String(ok) }, seconds);
    },
  };
}
