/**
 * Impact of a rule change: every stored answered record re-run under candidate thresholds (and optionally a
 * candidate card catalogue) and compared with what was shown, through the comparable outcome of
 * src/audit/outcome.ts. Streaming: records come one at a time from the store's records() iterator and only
 * counts and a few example ids are kept, so a trail of any length runs in bounded memory. Nothing is written to
 * the trail. The tally is pure; formatting (table, CSV, NDJSON) is at the bottom.
 */
import { thresholdsSchema, type Thresholds } from '../assess/thresholds.js';
import type { Catalogue } from '../cards/catalogue.js';
import { csvRow } from './csv.js';
import { outcomeOf, outcomeOfRecord, type CardOutcome, type ComparableOutcome } from './outcome.js';
import { rerun } from './replay.js';
import { withSnapshot } from '../hooks/rebuild.js';
import type { SiteMap } from '../fhir/site-map.js';
import type { StoredAdvice } from './types.js';

/**
 * Candidate thresholds, validated exactly as a site's `thresholds` in the configuration file are (the same
 * schema: unknown keys, out-of-range values and inverted bands refused), over the published defaults.
 */
export function candidateThresholds(raw: unknown): { ok: true; thresholds: Thresholds } | { ok: false; message: string } {
  if (typeof raw !== 'object' || raw === null || Array.isArray(raw))
    return { ok: false, message: 'must be a JSON object (the shape of the configuration file\'s "thresholds")' };
  const r = thresholdsSchema.safeParse(raw);
  if (r.success) return { ok: true, thresholds: r.data };
  return {
    ok: false,
    message: r.error.issues
      .slice(0, 10)
      .map((i) => `${i.path.join('.') || '(root)'}: ${i.message}`)
      .join('; '),
  };
}

export interface CandidateRules {
  thresholds: Thresholds;
  catalogue: Catalogue;
  rulesVersion: string;
  /** The site maps the snapshot of a record stored with its inputs is rebuilt with (the candidate's normalisation). */
  siteMap?: SiteMap;
}

/**
 * What can change: the advice's verdicts and headline key, and per card kind whether the card is shown, its
 * indicator, its summary (the headline as shown) and its suggestion labels.
 */
export type ChangeDimension =
  | 'responsiveness'
  | 'confidence'
  | 'tolerance'
  | 'action'
  | 'next-test'
  | 'headline-key'
  | 'card'
  | 'indicator'
  | 'headline'
  | 'suggestions';

/** The advice-level dimensions and the field of the comparable outcome each compares. */
const ADVICE_DIMENSIONS = [
  ['responsiveness', 'responsiveness'],
  ['confidence', 'confidence'],
  ['tolerance', 'tolerance'],
  ['action', 'action'],
  ['next-test', 'nextTest'],
  ['headline-key', 'headlineKey'],
] as const satisfies ReadonlyArray<readonly [ChangeDimension, keyof ComparableOutcome]>;

/** Counts of records in which at least one thing of that sort changed. */
export interface ChangedCounts {
  any: number;
  responsiveness: number;
  /** The responsiveness verdict's confidence. */
  confidence: number;
  tolerance: number;
  action: number;
  nextTest: number;
  indicator: number;
  /** The card summary as shown, or the headline key. */
  headline: number;
  suggestions: number;
  /** A card kind shown before and not now, or the other way round. */
  cards: number;
}

export interface ChangeRow {
  dimension: ChangeDimension;
  /** The card kind for card-level changes; empty for the advice's verdicts and headline key. */
  cardKind: string;
  from: string;
  to: string;
  count: number;
  /** Up to EXAMPLES advice ids, oldest first. */
  examples: string[];
}

export interface KindRow {
  cardKind: string;
  /** Records that showed this kind then, or would show it now. */
  records: number;
  indicator: number;
  headline: number;
  suggestions: number;
  /** Shown then and not now, or now and not then. */
  shownOrAbsent: number;
}

export interface ImpactReport {
  candidateRulesVersion: string;
  /** Records read from the store (answered records matching the filters). */
  read: number;
  /** Records re-run and compared. */
  replayed: number;
  unchanged: number;
  /** Answered records without a snapshot (cannot be re-run). */
  notReplayable: number;
  /** Records whose re-run threw (a rule that cannot read an old snapshot): counted, never fatal. */
  failed: number;
  failedExamples: string[];
  changed: ChangedCounts;
  byCardKind: KindRow[];
  /** By count, largest first. */
  changes: ChangeRow[];
  /** The seq of the last record read (resume with afterSeq). */
  lastSeq?: number;
  /** True when the run stopped at its record limit with more records left. */
  more: boolean;
}

/** Example ids kept per change. */
export const EXAMPLES = 5;
/**
 * Distinct (dimension, kind, from, to) rows kept; a change first seen after this many goes into an "(other)" row
 * of its dimension and kind, so summaries that carry values cannot grow the tally without bound.
 */
export const MAX_CHANGE_ROWS = 1000;
/** Which count of records a change of each dimension adds to. */
const COUNTED_AS: Record<ChangeDimension, keyof ChangedCounts> = {
  responsiveness: 'responsiveness',
  confidence: 'confidence',
  tolerance: 'tolerance',
  action: 'action',
  'next-test': 'nextTest',
  'headline-key': 'headline',
  card: 'cards',
  indicator: 'indicator',
  headline: 'headline',
  suggestions: 'suggestions',
};

/** Records re-run between two turns of the event loop. */
const YIELD_EVERY = 100;
const NONE = '(none)';
const SHOWN = 'shown';
const OTHER = '(other)';

const sep = '\u0000';

/** A running tally: add records one by one, read the report at any time. */
export class ImpactTally {
  private read = 0;
  private replayed = 0;
  private unchanged = 0;
  private notReplayable = 0;
  private failed = 0;
  private readonly failedExamples: string[] = [];
  private readonly changed: ChangedCounts = {
    any: 0,
    responsiveness: 0,
    confidence: 0,
    tolerance: 0,
    action: 0,
    nextTest: 0,
    indicator: 0,
    headline: 0,
    suggestions: 0,
    cards: 0,
  };
  private readonly rows = new Map<string, ChangeRow>();
  private readonly kinds = new Map<string, KindRow>();
  private lastSeq: number | undefined;

  constructor(private readonly rules: CandidateRules) {}

  /** A record whose inputs no longer make a call: read, and failed. */
  unreadable(rec: StoredAdvice): void {
    this.read += 1;
    this.lastSeq = rec.seq;
    this.countFailed(rec.id);
  }

  private countFailed(id: string): void {
    this.failed += 1;
    if (this.failedExamples.length < EXAMPLES) this.failedExamples.push(id);
  }

  add(rec: StoredAdvice): void {
    this.read += 1;
    this.lastSeq = rec.seq;
    if (!rec.snapshot || !rec.advice) {
      this.notReplayable += 1;
      return;
    }
    let now: ComparableOutcome;
    try {
      const r = rerun(rec, this.rules);
      if (!r) return void (this.notReplayable += 1);
      now = outcomeOf(r.advice, r.cards);
    } catch {
      return this.countFailed(rec.id);
    }
    this.replayed += 1;
    this.compare(rec.id, outcomeOfRecord(rec), now);
  }

  /** Counts one record's change from `then` to `now` (add() does this after re-running a record). */
  compare(id: string, then: ComparableOutcome, now: ComparableOutcome): void {
    const seen = new Set<keyof ChangedCounts>();
    const note = (dim: ChangeDimension, kind: string, from: string, to: string): void => {
      this.row(dim, kind, from, to, id);
      seen.add(COUNTED_AS[dim]);
    };
    for (const [dim, field] of ADVICE_DIMENSIONS) {
      const a = then[field];
      const b = now[field];
      if (a !== b) note(dim, '', a ?? NONE, b ?? NONE);
    }

    const thenByKind = byKind(then.cards);
    const nowByKind = byKind(now.cards);
    for (const kind of new Set([...thenByKind.keys(), ...nowByKind.keys()])) {
      const a = thenByKind.get(kind) ?? [];
      const b = nowByKind.get(kind) ?? [];
      const k = this.kind(kind);
      k.records += 1;
      const kindSeen = new Set<ChangeDimension>();
      // Cards of one kind are paired in the order shown; an unpaired card was shown then or would be now.
      for (let i = 0; i < Math.max(a.length, b.length); i += 1) {
        const x = a[i];
        const y = b[i];
        if (!x || !y) {
          note('card', kind, x ? SHOWN : NONE, y ? SHOWN : NONE);
          kindSeen.add('card');
          continue;
        }
        if (x.indicator !== y.indicator) {
          note('indicator', kind, x.indicator, y.indicator);
          kindSeen.add('indicator');
        }
        if (x.summary !== y.summary) {
          note('headline', kind, x.summary, y.summary);
          kindSeen.add('headline');
        }
        const sx = x.suggestions.join(' | ') || NONE;
        const sy = y.suggestions.join(' | ') || NONE;
        if (sx !== sy) {
          note('suggestions', kind, sx, sy);
          kindSeen.add('suggestions');
        }
      }
      if (kindSeen.has('indicator')) k.indicator += 1;
      if (kindSeen.has('headline')) k.headline += 1;
      if (kindSeen.has('suggestions')) k.suggestions += 1;
      if (kindSeen.has('card')) k.shownOrAbsent += 1;
    }
    if (!seen.size) return void (this.unchanged += 1);
    this.changed.any += 1;
    for (const d of seen) this.changed[d] += 1;
  }

  private row(dimension: ChangeDimension, cardKind: string, from: string, to: string, id: string): void {
    let key = [dimension, cardKind, from, to].join(sep);
    let r = this.rows.get(key);
    if (!r && this.rows.size >= MAX_CHANGE_ROWS) {
      key = [dimension, cardKind, OTHER, OTHER].join(sep);
      r = this.rows.get(key);
      if (!r) this.rows.set(key, (r = { dimension, cardKind, from: OTHER, to: OTHER, count: 0, examples: [] }));
    }
    if (!r) this.rows.set(key, (r = { dimension, cardKind, from, to, count: 0, examples: [] }));
    r.count += 1;
    if (r.examples.length < EXAMPLES) r.examples.push(id);
  }

  private kind(cardKind: string): KindRow {
    let k = this.kinds.get(cardKind);
    if (!k) this.kinds.set(cardKind, (k = { cardKind, records: 0, indicator: 0, headline: 0, suggestions: 0, shownOrAbsent: 0 }));
    return k;
  }

  report(more = false): ImpactReport {
    const order = Object.keys(COUNTED_AS);
    const changes = [...this.rows.values()]
      .map((r) => ({ ...r, examples: [...r.examples] }))
      .sort(
        (a, b) =>
          b.count - a.count ||
          order.indexOf(a.dimension) - order.indexOf(b.dimension) ||
          a.cardKind.localeCompare(b.cardKind) ||
          a.from.localeCompare(b.from) ||
          a.to.localeCompare(b.to),
      );
    return {
      candidateRulesVersion: this.rules.rulesVersion,
      read: this.read,
      replayed: this.replayed,
      unchanged: this.unchanged,
      notReplayable: this.notReplayable,
      failed: this.failed,
      failedExamples: [...this.failedExamples],
      changed: { ...this.changed },
      byCardKind: [...this.kinds.values()].map((k) => ({ ...k })).sort((a, b) => a.cardKind.localeCompare(b.cardKind)),
      changes,
      ...(this.lastSeq !== undefined ? { lastSeq: this.lastSeq } : {}),
      more,
    };
  }
}

function byKind(cards: readonly CardOutcome[]): Map<string, CardOutcome[]> {
  const m = new Map<string, CardOutcome[]>();
  for (const c of cards) m.set(c.kind, [...(m.get(c.kind) ?? []), c]);
  return m;
}

export interface ImpactOptions {
  /** Stop after this many records; the report then says `more` if another record followed. */
  maxRecords?: number;
  /** Called after every record with the number read so far (a progress bar). */
  onProgress?: (read: number) => void;
}

/**
 * Runs the tally over a stream of records (the store's records(), filtered to answered records), each with its
 * snapshot rebuilt from its inputs when it was stored as received; inputs that no longer make a call count as failed.
 */
export async function impactOf(
  records: AsyncIterable<StoredAdvice>,
  rules: CandidateRules,
  opts: ImpactOptions = {},
): Promise<ImpactReport> {
  const tally = new ImpactTally(rules);
  let n = 0;
  for await (const rec of records) {
    if (opts.maxRecords !== undefined && n >= opts.maxRecords) return tally.report(true);
    const rebuilt = await withSnapshot(rec, rules.siteMap).catch(() => undefined);
    if (rebuilt) tally.add(rebuilt);
    else tally.unreadable(rec);
    n += 1;
    opts.onProgress?.(n);
    // Re-running rules is synchronous work: let other callbacks (hook calls on the same service) run in between.
    if (n % YIELD_EVERY === 0) await new Promise<void>((r) => setImmediate(r));
  }
  return tally.report(false);
}

// ------------------------------------------------------------------------------------------------ formats

export type ImpactFormat = 'table' | 'csv' | 'ndjson';

const CSV_HEADER = ['dimension', 'card_kind', 'from', 'to', 'count', 'examples'];

/** The report as text in the given format (CSV and NDJSON: one line per change; NDJSON starts with the totals). */
export function formatImpact(r: ImpactReport, format: ImpactFormat): string {
  if (format === 'ndjson') {
    const { changes, ...totals } = r;
    return [JSON.stringify({ type: 'totals', ...totals }), ...changes.map((c) => JSON.stringify({ type: 'change', ...c }))]
      .map((l) => `${l}\n`)
      .join('');
  }
  if (format === 'csv')
    return [
      csvRow(CSV_HEADER),
      ...r.changes.map((c) => csvRow([c.dimension, c.cardKind, c.from, c.to, c.count, c.examples.join(' ')])),
    ].join('');
  return table(r);
}

/** Terminal-safe: control characters (from any client text quoted in a summary) shown as spaces; long text cut. */
const plain = (s: string, max = 60): string => {
  const t = s.replace(/[\u0000-\u001f\u007f-\u009f]/g, ' ');
  return t.length > max ? `${t.slice(0, max - 1)}…` : t;
};

function columns(rows: string[][]): string {
  const widths = rows[0]?.map((_, i) => Math.max(...rows.map((r) => (r[i] ?? '').length))) ?? [];
  return rows
    .map((r) =>
      r
        .map((c, i) => (i === r.length - 1 ? c : c.padEnd(widths[i] ?? 0)))
        .join('  ')
        .trimEnd(),
    )
    .join('\n');
}

function table(r: ImpactReport): string {
  const c = r.changed;
  const out = [
    `Impact of candidate rules ${r.candidateRulesVersion}`,
    `records read ${r.read}, replayed ${r.replayed}, unchanged ${r.unchanged}, changed ${c.any}, not replayable ${r.notReplayable}, failed ${r.failed}` +
      (r.failedExamples.length ? ` (e.g. ${r.failedExamples.join(' ')})` : '') +
      (r.more ? `; stopped at the record limit after seq ${r.lastSeq}` : ''),
    `records changed in: responsiveness ${c.responsiveness}, confidence ${c.confidence}, tolerance ${c.tolerance}, action ${c.action}, next test ${c.nextTest}, ` +
      `indicator ${c.indicator}, headline ${c.headline}, suggestions ${c.suggestions}, cards shown/absent ${c.cards}`,
    '',
    'By card kind (records changed)',
    columns([
      ['card kind', 'records', 'indicator', 'headline', 'suggestions', 'shown/absent'],
      ...r.byCardKind.map((k) => [k.cardKind, ...[k.records, k.indicator, k.headline, k.suggestions, k.shownOrAbsent].map(String)]),
    ]),
    '',
  ];
  if (!r.changes.length) out.push('No changes.');
  else {
    out.push('By change');
    out.push(
      columns([
        ['what', 'card kind', 'change', 'count', 'examples'],
        ...r.changes.map((x) => [
          x.dimension,
          x.cardKind || '-',
          `${plain(x.from)} → ${plain(x.to)}`,
          String(x.count),
          x.examples.join(' '),
        ]),
      ]),
    );
  }
  return `${out.join('\n')}\n`;
}
