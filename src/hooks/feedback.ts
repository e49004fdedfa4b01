/**
 * CDS Hooks 2.0 feedback (§Feedback): stored idempotently (duplicates are normal) and joined to the advice
 * record by card uuid. A batch may span several hook calls.
 *
 * Who may send it: only the issuer whose call received the card (the advice record keeps the verified issuer;
 * `trial-mode` in trial mode), and, when that call named a tenant, only for that same tenant. A card we never
 * issued, issued by another service, or issued to another issuer or tenant gets the same 404 OperationOutcome
 * naming it, so a client cannot learn another client's card uuids; a card whose record names no issuer (written
 * without a verified caller) takes no feedback from a verified one. The known ones in the same batch are still
 * stored.
 *
 * What it may say: acceptedSuggestions only with the card's own suggestion uuids, an override reason only one
 * of the card's own overrideReasons (system and code). Anything else is a 400 and nothing of the batch is stored.
 */
import type { AuditStore, FeedbackRow, StoredAdvice } from '../audit/types.js';
import { outcomeError, zodIssues } from './outcome-error.js';
import { feedbackRequestSchema, type Card, type FeedbackItem } from './schemas.js';
import type { ServiceDefinition } from './services.js';

/** The verified caller of the feedback endpoint (res.locals.client); undefined only where no guard runs. */
export interface FeedbackCaller {
  issuer?: string;
  tenant?: string;
}

export async function recordFeedback(
  service: ServiceDefinition,
  body: unknown,
  store: AuditStore,
  now: () => Date,
  caller?: FeedbackCaller,
): Promise<{ stored: number; duplicates: number }> {
  const parsed = feedbackRequestSchema.safeParse(body);
  if (!parsed.success)
    throw outcomeError('invalid', 'invalid', 'the body is not valid CDS Hooks 2.0 feedback', zodIssues(parsed.error.issues));
  const receivedAt = now().toISOString();
  const known: Array<{ item: FeedbackItem; index: number; card: Card | undefined }> = [];
  const unknown: string[] = [];
  // One read of each advice record: its client's tenant, and the card as it was issued.
  const records = new Map<string, Promise<StoredAdvice | undefined>>();
  for (const [index, f] of parsed.data.feedback.entries()) {
    const owner = await store.cardOwner(f.card);
    if (!owner || owner.service !== service.id || owner.issuer !== caller?.issuer) {
      unknown.push(f.card);
      continue;
    }
    if (!records.has(owner.adviceId)) records.set(owner.adviceId, store.get(owner.adviceId));
    const rec = await records.get(owner.adviceId);
    if (rec?.client?.tenant !== caller?.tenant) unknown.push(f.card);
    else known.push({ item: f, index, card: rec?.cards.find((c) => c.uuid === f.card) });
  }

  const problems = known.flatMap(({ item, index, card }) => cardProblems(item, card).map((p) => `feedback.${index}.${p}`));
  if (problems.length)
    throw outcomeError('invalid', 'invalid', 'the feedback does not match the card it names; nothing was stored', problems);

  const rows: FeedbackRow[] = known.map(({ item: f }) => {
    const reason = f.overrideReason?.reason;
    return {
      cardUuid: f.card,
      outcome: f.outcome,
      acceptedSuggestions: (f.acceptedSuggestions ?? []).map((s) => s.id),
      ...(reason
        ? { overrideReason: { system: reason.system, code: reason.code, ...(reason.display ? { display: reason.display } : {}) } }
        : {}),
      ...(f.overrideReason?.userComment ? { userComment: f.overrideReason.userComment.slice(0, 2000) } : {}),
      outcomeTimestamp: new Date(f.outcomeTimestamp).toISOString(),
      receivedAt,
      service: service.id,
    };
  });
  const result = rows.length ? await store.addFeedback(rows) : { stored: 0, duplicates: 0 };
  if (unknown.length) {
    throw outcomeError(
      'not-found',
      'not-found',
      `no card with uuid ${unknown.slice(0, 10).join(', ')} was issued by ${service.id} to this client; ${result.stored} other feedback item(s) stored`,
    );
  }
  return result;
}

/** What in one feedback item the card does not offer (paths relative to the item). Client values are not echoed. */
function cardProblems(f: FeedbackItem, card: Card | undefined): string[] {
  if (!card) return ['card: the card is not in its advice record'];
  const out: string[] = [];
  const suggestionIds = new Set((card.suggestions ?? []).flatMap((s) => (s.uuid ? [s.uuid] : [])));
  (f.acceptedSuggestions ?? []).forEach((s, i) => {
    if (!suggestionIds.has(s.id)) out.push(`acceptedSuggestions.${i}.id: not a suggestion of this card`);
  });
  const reason = f.overrideReason?.reason;
  if (reason && !(card.overrideReasons ?? []).some((r) => r.system === reason.system && r.code === reason.code)) {
    out.push("overrideReason.reason: not one of this card's overrideReasons (system and code)");
  }
  return out;
}
