/**
 * CDS Hooks 2.0 feedback (§Feedback): stored idempotently (duplicates are normal) and joined to the advice
 * record by card uuid. A batch may span several hook calls. Cards we never issued (or issued by another
 * service) get a 404 OperationOutcome naming them; the known ones in the same batch are still stored.
 */
import type { AuditStore, FeedbackRow } from '../audit/types.js';
import { HttpError, zodIssues } from '../http/errors.js';
import { feedbackRequestSchema } from './schemas.js';
import type { ServiceDefinition } from './services.js';

export async function recordFeedback(service: ServiceDefinition, body: unknown, store: AuditStore, now: () => Date): Promise<{ stored: number; duplicates: number }> {
  const parsed = feedbackRequestSchema.safeParse(body);
  if (!parsed.success) throw new HttpError(400, 'invalid', 'the body is not valid CDS Hooks 2.0 feedback', zodIssues(parsed.error.issues));
  const receivedAt = now().toISOString();
  const rows: FeedbackRow[] = [];
  const unknown: string[] = [];
  for (const f of parsed.data.feedback) {
    const owner = await store.cardOwner(f.card);
    if (!owner || owner.service !== service.id) {
      unknown.push(f.card);
      continue;
    }
    const reason = f.overrideReason?.reason;
    rows.push({
      cardUuid: f.card, outcome: f.outcome, acceptedSuggestions: (f.acceptedSuggestions ?? []).map((s) => s.id),
      ...(reason ? { overrideReason: { system: reason.system, code: reason.code, ...(reason.display ? { display: reason.display } : {}) } } : {}),
      ...(f.overrideReason?.userComment ? { userComment: f.overrideReason.userComment.slice(0, 2000) } : {}),
      outcomeTimestamp: new Date(f.outcomeTimestamp).toISOString(), receivedAt, service: service.id,
    });
  }
  const result = rows.length ? await store.addFeedback(rows) : { stored: 0, duplicates: 0 };
  if (unknown.length) {
    throw new HttpError(404, 'not-found', `no card with uuid ${unknown.slice(0, 10).join(', ')} was issued by ${service.id}; ${result.stored} other feedback item(s) stored`);
  }
  return result;
}
