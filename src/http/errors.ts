/** Domain outcomes (src/hooks/outcome-error.ts) become an HTTP status and a FHIR OperationOutcome body here only. */
import type { IssueType, OutcomeCode, OutcomeError, OutcomeIssue } from '../hooks/outcome-error.js';

/** The one map from a domain outcome to its status (CDS Hooks 2.0 §Calling a CDS Service: 412 for missing data). */
export const STATUS_OF: Readonly<Record<OutcomeCode, number>> = {
  invalid: 400,
  forbidden: 403,
  'not-found': 404,
  'not-replayable': 422,
  unobtainable: 412,
  'not-stored': 500,
};

export interface OperationOutcomeBody {
  resourceType: 'OperationOutcome';
  issue: Array<{
    severity: 'error' | 'fatal' | 'warning';
    code: IssueType;
    details: { text: string };
    expression?: string[];
    diagnostics?: string;
  }>;
}

export function outcomeBody(issues: readonly OutcomeIssue[], severity: 'error' | 'fatal' = 'error'): OperationOutcomeBody {
  return {
    resourceType: 'OperationOutcome',
    issue: issues.map((i, n) => ({ severity: n === 0 ? severity : 'error', code: i.type, details: { text: i.text } })),
  };
}

export function operationOutcome(type: IssueType, text: string, severity: 'error' | 'fatal' = 'error'): OperationOutcomeBody {
  return outcomeBody([{ type, text }], severity);
}

/** The status and body of a domain outcome. */
export function httpOf(err: OutcomeError): { status: number; body: OperationOutcomeBody } {
  const status = STATUS_OF[err.code];
  return { status, body: outcomeBody(err.issues, status >= 500 ? 'fatal' : 'error') };
}
