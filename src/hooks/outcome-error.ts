/**
 * What a call could not do, in the domain's words: a code and the issues to tell the client. The HTTP edge
 * alone turns a code into a status and the issues into an OperationOutcome (src/http/errors.ts).
 */

/** FHIR R4 IssueType codes the issues use (http://hl7.org/fhir/R4/valueset-issue-type.html). */
export type IssueType =
  | 'invalid'
  | 'structure'
  | 'required'
  | 'value'
  | 'not-found'
  | 'not-supported'
  | 'exception'
  | 'incomplete'
  | 'login'
  | 'forbidden'
  | 'too-costly'
  | 'transient';

/**
 * `invalid`: the request is not one we can read; `forbidden`: the caller may not ask this; `not-found`: no such
 * thing; `not-replayable`: the record holds nothing to re-run; `unobtainable`: required data came neither from
 * prefetch nor from the FHIR server; `not-stored`: the advice could not be stored for audit, so none is given.
 */
export type OutcomeCode = 'invalid' | 'forbidden' | 'not-found' | 'not-replayable' | 'unobtainable' | 'not-stored';

export interface OutcomeIssue {
  type: IssueType;
  text: string;
}

export class OutcomeError extends Error {
  override name = 'OutcomeError';
  constructor(
    readonly code: OutcomeCode,
    /** The issues as the client reads them, in order; the first says what happened. */
    readonly issues: readonly OutcomeIssue[],
  ) {
    super(issues[0]?.text ?? code);
  }
}

/** One summary issue and up to 20 detail lines of the same type. */
export function outcomeError(code: OutcomeCode, type: IssueType, text: string, details: readonly string[] = []): OutcomeError {
  return new OutcomeError(code, [{ type, text }, ...details.slice(0, 20).map((d) => ({ type, text: d }))]);
}

/** zod issues → "path: message" lines, short enough for a log and an OperationOutcome. */
export function zodIssues(issues: ReadonlyArray<{ path: PropertyKey[]; message: string }>, prefix = ''): string[] {
  return issues
    .slice(0, 20)
    .map((i) => `${[prefix, ...i.path.map(String)].filter(Boolean).join('.') || '(body)'}: ${i.message}`.slice(0, 300));
}
