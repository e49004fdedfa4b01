/**
 * A WHERE clause built once for both SQL dialects: SQLite numbers its parameters `?` in order, PostgreSQL names
 * them `$1, $2, …`. The list, stream and statistics queries of both stores take their filters from here, so a
 * filter is written once.
 */
export type Dialect = 'sqlite' | 'postgres';

export class Where {
  readonly args: Array<string | number> = [];
  private readonly conds: string[] = [];

  constructor(readonly dialect: Dialect) {}

  /** The placeholder of one more argument (pushed now), e.g. for LIMIT. */
  param(v: string | number): string {
    this.args.push(v);
    return this.dialect === 'sqlite' ? '?' : `$${this.args.length}`;
  }

  /** Adds a condition on one value: `cond` is given the value's placeholder. */
  add(cond: (p: string) => string, v: string | number): this {
    this.conds.push(cond(this.param(v)));
    return this;
  }

  /** Adds the condition when the value is given (not undefined or empty). */
  maybe(v: string | number | undefined, cond: (p: string) => string): this {
    return v === undefined || v === '' ? this : this.add(cond, v);
  }

  /** Adds a condition with no value of its own. */
  raw(cond: string): this {
    this.conds.push(cond);
    return this;
  }

  get empty(): boolean {
    return this.conds.length === 0;
  }

  /** `WHERE a AND b`, or '' when there is no condition. */
  get sql(): string {
    return this.conds.length ? `WHERE ${this.conds.join(' AND ')}` : '';
  }

  /** `a AND b` for appending to a WHERE of one's own, or '' when there is no condition. */
  get and(): string {
    return this.conds.length ? `${this.conds.join(' AND ')} AND ` : '';
  }
}

/** The filters on the advice table that list and records() share (alias `a.` optional). */
export function adviceFilters(
  w: Where,
  q: {
    patientId?: string | undefined;
    service?: string | undefined;
    from?: string | undefined;
    to?: string | undefined;
    outcome?: string | undefined;
  },
  alias = '',
): Where {
  return w
    .maybe(q.patientId, (p) => `${alias}patient_id = ${p}`)
    .maybe(q.service, (p) => `${alias}service = ${p}`)
    .maybe(q.from, (p) => `${alias}recorded_at >= ${p}`)
    .maybe(q.to, (p) => `${alias}recorded_at <= ${p}`)
    .maybe(q.outcome, (p) => `${alias}outcome = ${p}`);
}

/** How one dialect reads what an advice row's record holds (the row aliased `a`). */
export interface RecordSql {
  /** The most urgent indicator of the row's cards: critical, warning, info or none. */
  topIndicator: string;
  /** The row's responsiveness or tolerance verdict, or 'none'. */
  verdictOf(v: 'responsiveness' | 'tolerance'): string;
  /** `SELECT 1 FROM` the row's cards joined to their feedback (aliases `c`, `f`), `WHERE` the card is the row's. */
  cardFeedback: string;
}

/** The console's filters on what a record says: its most urgent indicator, its verdicts, its cards' feedback. */
export function recordFilters(
  w: Where,
  q: { indicator?: string | undefined; responsiveness?: string | undefined; tolerance?: string | undefined; feedback?: string | undefined },
  sql: RecordSql,
): Where {
  w.maybe(q.indicator, (p) => `${sql.topIndicator} = ${p}`)
    .maybe(q.responsiveness, (p) => `${sql.verdictOf('responsiveness')} = ${p}`)
    .maybe(q.tolerance, (p) => `${sql.verdictOf('tolerance')} = ${p}`);
  if (q.feedback === 'none') return w.raw(`NOT EXISTS (${sql.cardFeedback})`);
  return w.maybe(q.feedback, (p) => `EXISTS (${sql.cardFeedback} AND f.outcome = ${p})`);
}
