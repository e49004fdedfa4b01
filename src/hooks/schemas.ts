/**
 * CDS Hooks 2.0 wire contracts, one zod schema each (conventions §3). Types come from z.infer.
 * Source: CDS Hooks 2.0 (STU2), https://cds-hooks.hl7.org/2.0/ — condensed in ../shared/cds-hooks-2.0.md.
 */
import { z } from 'zod';
import { httpsOrLoopbackUrl } from '../auth/issuer-config.js';

/** A string that is not empty: the standard asks senders to omit rather than send "". */
const text = z.string().min(1);
const jsonObject = z.record(z.string(), z.unknown());

/** A FHIR resource as JSON: only resourceType is required here; the snapshot checks the rest. */
export const fhirResourceSchema = z.looseObject({ resourceType: text });

export const fhirAuthorizationSchema = z.object({
  access_token: text,
  token_type: z.literal('Bearer'),
  expires_in: z.number().int(),
  scope: text,
  subject: text,
  patient: text.optional(),
});

/** draftOrders is a Bundle that may lack Bundle.type (cds-hooks/docs#659): accept it. */
export const draftOrdersSchema = z.looseObject({
  resourceType: z.literal('Bundle'),
  type: z.string().optional(),
  entry: z.array(z.looseObject({ resource: fhirResourceSchema.optional() })).optional(),
});

const referenceString = z.string().regex(/^[A-Za-z]+\/[A-Za-z0-9\-.]{1,64}$/, 'must be a relative reference Type/id');
const fhirId = z.string().regex(/^[A-Za-z0-9\-.]{1,64}$/, 'must be a FHIR id (1-64 of A-Z a-z 0-9 - .)');

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
export const prefetchSchema = z.record(z.string(), fhirResourceSchema.nullable());

export const hookRequestSchema = z
  .object({
    hook: text,
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

export const actionSchema = z
  .object({
    type: z.enum(['create', 'update', 'delete']),
    description: text,
    resource: fhirResourceSchema.optional(),
    resourceId: referenceString.optional(),
  })
  .refine((a) => a.type !== 'delete' || (a.resourceId && !a.resource), {
    message: 'a delete action has resourceId and no resource',
  })
  .refine((a) => a.type === 'delete' || a.resource, { message: 'create and update actions carry the whole resource' });

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
  .refine(
    (c) => c.selectionBehavior !== 'at-most-one' || (c.suggestions ?? []).filter((s) => s.isRecommended).length <= 1,
    { message: 'at most one suggestion may be recommended with at-most-one' },
  );
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
    acceptedSuggestions: z.array(z.object({ id: z.guid() })).min(1).optional(),
    // Early clients sent a bare Coding instead of { reason, userComment } (cds-hooks/docs#519): accept both.
    overrideReason: z
      .union([
        z.object({ reason: codingSchema.optional(), userComment: z.string().optional() }).refine((o) => o.reason || o.userComment, {
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
