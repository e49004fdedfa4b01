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
