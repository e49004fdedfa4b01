/** Errors that become an HTTP status and a FHIR OperationOutcome body, in exactly one place (the app's error handler). */

export type IssueCode = 'invalid' | 'structure' | 'required' | 'value' | 'not-found' | 'not-supported' | 'exception' | 'incomplete' | 'login' | 'forbidden' | 'too-costly' | 'transient';

export class HttpError extends Error {
  override name = 'HttpError';
  constructor(
    readonly status: number,
    readonly code: IssueCode,
    message: string,
    readonly diagnostics?: string[],
  ) {
    super(message);
  }
}

export interface OperationOutcomeBody {
  resourceType: 'OperationOutcome';
  issue: Array<{ severity: 'error' | 'fatal' | 'warning'; code: IssueCode; details: { text: string }; expression?: string[]; diagnostics?: string }>;
}

export function operationOutcome(code: IssueCode, text: string, diagnostics: string[] = [], severity: 'error' | 'fatal' = 'error'): OperationOutcomeBody {
  return {
    resourceType: 'OperationOutcome',
    issue: [
      { severity, code, details: { text } },
      ...diagnostics.slice(0, 20).map((d) => ({ severity: 'error' as const, code, details: { text: d } })),
    ],
  };
}

/** zod issues → "path: message" lines, short enough for a log and an OperationOutcome. */
export function zodIssues(issues: ReadonlyArray<{ path: PropertyKey[]; message: string }>, prefix = ''): string[] {
  return issues.slice(0, 20).map((i) => `${[prefix, ...i.path.map(String)].filter(Boolean).join('.') || '(body)'}: ${i.message}`.slice(0, 300));
}
