// Prefetch token resolution, checked against CDS Hooks 2.0 §Prefetch tokens (https://cds-hooks.hl7.org/2.0/#prefetch-tokens).
import { describe, expect, it } from 'vitest';
import { resolvePrefetchTemplate } from '../../src/hooks/prefetch-tokens.js';
import { discoveryDocument, PREFETCH } from '../../src/hooks/services.js';

const ctx = {
  userId: 'Practitioner/prac-9',
  patientId: 'pat-1',
  encounterId: 'enc-2',
  selections: ['MedicationRequest/m1'],
  draftOrders: { resourceType: 'Bundle' },
};

describe('resolvePrefetchTemplate', () => {
  it.each([
    ['Patient/{{context.patientId}}', 'patient-view', 'Patient/pat-1'],
    ['Encounter/{{context.encounterId}}', 'order-select', 'Encounter/enc-2'],
    [
      'Observation?patient={{context.patientId}}&code=http://loinc.org|8867-4&_sort=-date&_count=1',
      'order-sign',
      'Observation?patient=pat-1&code=http://loinc.org|8867-4&_sort=-date&_count=1',
    ],
    ['Practitioner/{{userPractitionerId}}', 'order-select', 'Practitioner/prac-9'],
    ['{{context.userId}}', 'patient-view', 'Practitioner/prac-9'],
    ['Observation?patient={{ context.patientId }}', 'patient-view', 'Observation?patient=pat-1'],
  ] as const)('%s (%s) → %s', (template, hook, expected) => {
    expect(resolvePrefetchTemplate(template, hook, ctx)).toEqual({ ok: true, value: expected });
  });

  it.each([
    // 2.0: user tokens resolve only when context.userId is of that type.
    ['PractitionerRole/{{userPractitionerRoleId}}', 'context.userId is not a PractitionerRole'],
    ['Patient/{{userPatientId}}', 'context.userId is not a Patient'],
    // 2.0: only root-level primitive fields marked "Prefetch Token: Yes"; nested paths are 3.0-draft syntax.
    ['MedicationRequest/{{context.draftOrders.entry.resource.id}}', 'is not a CDS Hooks 2.0 prefetch token'],
    ['X?y={{context.selections}}', 'context.selections is not a prefetch token of order-select'],
    ['X?y={{today()}}', 'is not a CDS Hooks 2.0 prefetch token'],
  ])('%s does not resolve', (template, reason) => {
    const r = resolvePrefetchTemplate(template, 'order-select', ctx);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.reason).toContain(reason);
  });

  it('an absent optional field (encounterId) leaves the template unresolved', () => {
    const r = resolvePrefetchTemplate('Encounter/{{context.encounterId}}', 'patient-view', { userId: 'Practitioner/a', patientId: 'p' });
    expect(r).toMatchObject({ ok: false, reason: 'context.encounterId is absent' });
  });

  it('values in a query string are URL-encoded', () => {
    const r = resolvePrefetchTemplate('Observation?patient={{context.patientId}}', 'patient-view', {
      userId: 'Practitioner/a',
      patientId: 'a&b=c',
    });
    expect(r).toEqual({ ok: true, value: 'Observation?patient=a%26b%3Dc' });
  });
});

describe('discovery prefetch templates', () => {
  it('use R4 search syntax (_sort=-date, not sort:desc) and only 2.0 tokens', () => {
    for (const s of discoveryDocument().services) {
      for (const t of Object.values(s.prefetch ?? {})) {
        expect(t).not.toMatch(/sort:desc|sort:asc/);
        for (const m of t.matchAll(/\{\{\s*([^}]*?)\s*\}\}/g))
          expect(m[1]).toMatch(/^(context\.(patientId|encounterId|userId)|user(Practitioner|PractitionerRole|Patient|RelatedPerson)Id)$/);
        expect(resolvePrefetchTemplate(t, s.hook as 'patient-view', ctx).ok).toBe(true);
      }
    }
    expect(PREFETCH['vitals']?.template).toContain('_sort=-date');
  });
});
