/**
 * CDS Hooks 2.0 wire contracts, one zod schema each. Types come from z.infer.
 * Source: CDS Hooks 2.0 (STU2), https://cds-hooks.hl7.org/2.0/.
 */
import type { FhirResource } from 'fhir/r4.js';
import { z } from 'zod';
import { httpsOrLoopbackUrl } from '../auth/issuer-config.js';

// ---------------------------------------------------------------- limits on what a client sends (issue 13 item 5)
// Each is a 400 beyond it (never a 5xx), and each keeps a client from making the audit record large or the service
// recurse: the record copies the ids and the draft orders as received. Also in docs/security.md, "Limits and faults".

/**
 * Deepest nesting of objects and arrays in a request body (the body itself is level 1), checked right after parsing
 * (src/http/body-shape.ts). A full order-select request of the test fixtures nests 11 levels (a coding inside an
 * Observation inside a prefetch Bundle; tests/unit/body-shape.test.ts); 64 is our own bound, with room for
 * extensions and contained resources.
 */
export const MAX_JSON_DEPTH = 64;
/** Longest FHIR id: the R4 primitive type id is [A-Za-z0-9\-\.]{1,64} (FHIR R4, Data Types, "id"). */
export const MAX_ID_LENGTH = 64;
/** Longest resource type name taken from a client (R4 names are far shorter; 64 is our own bound). */
export const MAX_RESOURCE_TYPE_LENGTH = 64;
/** Longest hook name or prefetch key (CDS Hooks names are short, "order-select"; 64 is our own bound). */
export const MAX_NAME_LENGTH = 64;
/**
 * Largest context.draftOrders, as JSON text (UTF-16 code units, about bytes for ASCII): 256 KiB. The draft orders
 * are kept in the audit record as received; an order-sign bundle of a whole order set is a few tens of KB.
 * Our own bound, well below the body limit (TIDEMARK_BODY_LIMIT, 2 MB by default).
 */
export const MAX_DRAFT_ORDERS_CHARS = 256 * 1024;
/** Longest free text stored from feedback (overrideReason.userComment); our own bound. */
export const MAX_COMMENT_LENGTH = 2_000;

/** A string that is not empty: the standard asks senders to omit rather than send "". */
const text = z.string().min(1);
const jsonObject = z.record(z.string(), z.unknown());
const fhirId = z.string().regex(/^[A-Za-z0-9\-.]{1,64}$/, `must be a FHIR id (1-${MAX_ID_LENGTH} of A-Z a-z 0-9 - .)`);
const resourceTypeName = z
  .string()
  .regex(/^[A-Z][A-Za-z]{0,63}$/, `must be a FHIR resource type (a capital letter, then letters, at most ${MAX_RESOURCE_TYPE_LENGTH})`);

/** A FHIR resource as JSON: resourceType (and id when present) are checked here; the snapshot checks the rest. */
export const fhirResourceSchema = z.looseObject({ resourceType: resourceTypeName, id: fhirId.optional() });

export const fhirAuthorizationSchema = z.object({
  access_token: text,
  token_type: z.literal('Bearer'),
  expires_in: z.number().int(),
  scope: text,
  subject: text,
  patient: text.optional(),
});

/** draftOrders is a Bundle that may lack Bundle.type (cds-hooks/docs#659): accept it. */
export const draftOrdersSchema = z
  .looseObject({
    resourceType: z.literal('Bundle'),
    type: z.string().optional(),
    entry: z.array(z.looseObject({ resource: fhirResourceSchema.optional() })).optional(),
  })
  .refine((b) => jsonLength(b) <= MAX_DRAFT_ORDERS_CHARS, {
    message: `draftOrders is larger than ${MAX_DRAFT_ORDERS_CHARS / 1024} KiB of JSON`,
  });

/** Length of a value's JSON text; a value that cannot be written as JSON (too deep, a cycle) counts as too long. */
function jsonLength(v: unknown): number {
  try {
    return JSON.stringify(v)?.length ?? 0;
  } catch {
    return Number.POSITIVE_INFINITY;
  }
}

const referenceString = z
  .string()
  .regex(/^[A-Za-z]{1,64}\/[A-Za-z0-9\-.]{1,64}$/, 'must be a relative reference Type/id (each at most 64 characters)');

/** patient-view 1.1 context. */
export const patientViewContextSchema = z.looseObject({
  userId: referenceString,
  patientId: fhirId,
  encounterId: fhirId.optional(),
});

/** order-select 1.0 context. */
export const orderSelectContextSchema = z.looseObject({
  userId: referenceString,
  patientId: fhirId,
  encounterId: fhirId.optional(),
  selections: z.array(referenceString).min(1),
  draftOrders: draftOrdersSchema,
});

/** order-sign 1.0 context. */
export const orderSignContextSchema = z.looseObject({
  userId: referenceString,
  patientId: fhirId,
  encounterId: fhirId.optional(),
  draftOrders: draftOrdersSchema,
});

export const HOOK_CONTEXT_SCHEMAS = {
  'patient-view': patientViewContextSchema,
  'order-select': orderSelectContextSchema,
  'order-sign': orderSignContextSchema,
} as const;
export type HookName = keyof typeof HOOK_CONTEXT_SCHEMAS;

/** Prefetch values: a resource, a searchset Bundle, an OperationOutcome, or null. */
export const prefetchSchema = z.record(z.string().max(MAX_NAME_LENGTH), fhirResourceSchema.nullable());

export const hookRequestSchema = z
  .object({
    hook: text.max(MAX_NAME_LENGTH),
    hookInstance: z.guid(),
    /** Where Tidemark reads missing data with the call's token: https only (http on a loopback host for trials). */
    fhirServer: httpsOrLoopbackUrl.optional(),
    fhirAuthorization: fhirAuthorizationSchema.optional(),
    context: jsonObject,
    prefetch: prefetchSchema.optional(),
    extension: jsonObject.optional(),
  })
  .refine((r) => !r.fhirAuthorization || r.fhirServer, {
    message: 'fhirServer is required when fhirAuthorization is given',
    path: ['fhirServer'],
  });
export type HookRequest = z.infer<typeof hookRequestSchema>;
export type PatientViewContext = z.infer<typeof patientViewContextSchema>;
export type OrderSelectContext = z.infer<typeof orderSelectContextSchema>;
export type OrderSignContext = z.infer<typeof orderSignContextSchema>;
export type HookContext = PatientViewContext | OrderSelectContext | OrderSignContext;

// ---------------------------------------------------------------- response

/** CDS Hooks' own Coding: code and system required; display required in overrideReasons. */
export const codingSchema = z.object({ code: text, system: text, display: text.optional() });
export const overrideReasonSchema = codingSchema.required({ display: true });

/** A FHIR resource in an action: resourceType and, when it has one, a FHIR id (typed as the R4 resource union). */
const actionResource = z.custom<FhirResource>((v) => fhirResourceSchema.safeParse(v).success, {
  message: 'must be a FHIR resource (resourceType, and a FHIR id when it has one)',
});

/**
 * CDS Hooks 2.0 Action, one shape per `type`: create and update carry the whole resource (an update's has its id);
 * a delete names `resourceId` (Type/id) and carries no resource (CDS Hooks 2.0; cds-hooks/docs#400).
 */
export const actionSchema = z.discriminatedUnion('type', [
  z.object({ type: z.literal('create'), description: text, resource: actionResource }),
  z.object({ type: z.literal('update'), description: text, resource: actionResource }),
  z.object({
    type: z.literal('delete'),
    description: text,
    resourceId: referenceString,
    resource: z.undefined({ error: 'a delete action has resourceId and no resource' }).optional(),
  }),
]);

export const suggestionSchema = z.object({
  label: text,
  uuid: z.uuid().optional(),
  isRecommended: z.boolean().optional(),
  actions: z.array(actionSchema).min(1).optional(),
});

export const linkSchema = z
  .object({
    label: text,
    url: z.url(),
    type: z.enum(['absolute', 'smart']),
    appContext: text.optional(),
  })
  .refine((l) => l.type === 'smart' || l.appContext === undefined, { message: 'appContext only on smart links' });

export const sourceSchema = z.object({
  label: text,
  url: z.url().optional(),
  icon: z.url().optional(),
  topic: codingSchema.optional(),
});

export const cardSchema = z
  .object({
    uuid: z.uuid().optional(),
    summary: text.max(139, 'summary must be under 140 characters'),
    detail: text.optional(),
    indicator: z.enum(['info', 'warning', 'critical']),
    source: sourceSchema,
    suggestions: z.array(suggestionSchema).min(1).optional(),
    selectionBehavior: z.enum(['at-most-one', 'any']).optional(),
    overrideReasons: z.array(overrideReasonSchema).min(1).optional(),
    links: z.array(linkSchema).min(1).optional(),
  })
  .refine((c) => !c.suggestions || c.selectionBehavior, { message: 'selectionBehavior is required with suggestions' })
  .refine((c) => c.selectionBehavior !== 'at-most-one' || (c.suggestions ?? []).filter((s) => s.isRecommended).length <= 1, {
    message: 'at most one suggestion may be recommended with at-most-one',
  });
export type Card = z.infer<typeof cardSchema>;
export type Suggestion = z.infer<typeof suggestionSchema>;
export type Action = z.infer<typeof actionSchema>;
export type Link = z.infer<typeof linkSchema>;

export const hookResponseSchema = z.object({
  cards: z.array(cardSchema),
  systemActions: z.array(actionSchema).min(1).optional(),
});
export type HookResponse = z.infer<typeof hookResponseSchema>;

export const discoveryServiceSchema = z.object({
  hook: text,
  title: text.optional(),
  description: text,
  id: text,
  prefetch: z.record(z.string(), text).optional(),
  usageRequirements: text.optional(),
  extension: jsonObject.optional(),
});
export const discoveryResponseSchema = z.object({ services: z.array(discoveryServiceSchema) });
export type DiscoveryService = z.infer<typeof discoveryServiceSchema>;

// ---------------------------------------------------------------- feedback

export const feedbackItemSchema = z
  .object({
    card: z.guid(),
    outcome: z.enum(['accepted', 'overridden']),
    acceptedSuggestions: z
      .array(z.object({ id: z.guid() }))
      .min(1)
      .optional(),
    // Early clients sent a bare Coding instead of { reason, userComment } (cds-hooks/docs#519): accept both.
    overrideReason: z
      .union([
        z
          .object({ reason: codingSchema.optional(), userComment: z.string().max(MAX_COMMENT_LENGTH).optional() })
          .refine((o) => o.reason || o.userComment, {
            message: 'overrideReason needs reason or userComment',
          }),
        codingSchema.transform((c) => ({ reason: c, userComment: undefined })),
      ])
      .optional(),
    outcomeTimestamp: z.iso.datetime({ offset: true }),
  })
  .refine((f) => f.outcome !== 'accepted' || f.acceptedSuggestions, { message: 'acceptedSuggestions is required when accepted' });
export const feedbackRequestSchema = z.object({ feedback: z.array(feedbackItemSchema).min(1) });
export type FeedbackItem = z.infer<typeof feedbackItemSchema>;
