/**
 * Recognising IV fluids and vasoactive drugs in MedicationRequest / MedicationAdministration /
 * ServiceRequest. Codes first (RxNorm), then the text, because fluid orders are often free text.
 * Text patterns use generic names only.
 */
import type { CodeableConcept } from 'fhir/r4.js';
import { RXNORM, SNOMED } from './codes.js';
import { FLUID_SET, type FluidClass } from './value-sets.js';

/** RxNorm clinical drugs read by code (value-sets/fluids.json, each with its source); the rest by generic name. */
const RXNORM_FLUIDS: ReadonlyMap<string, FluidClass> = new Map(
  FLUID_SET.fluids.flatMap((f) => (f.rxcui ? [[f.rxcui, f.fluidClass] as const] : [])),
);

/**
 * RxNorm ingredient codes of vasoactive drugs (from memory; verify against RxNav):
 * norepinephrine 7512, epinephrine 3992, vasopressin 11149, phenylephrine 8163, dopamine 3628, dobutamine 3616.
 */
const RXNORM_VASOACTIVE: Record<string, string> = {
  '7512': 'norepinephrine',
  '3992': 'epinephrine',
  '11149': 'vasopressin',
  '8163': 'phenylephrine',
  '3628': 'dopamine',
  '3616': 'dobutamine',
};

const VASOACTIVE_TEXT =
  /\b(nor-?epinephrine|noradrenaline|epinephrine|adrenaline|vasopressin|phenylephrine|dopamine|dobutamine|angiotensin ii|terlipressin)\b/i;

/**
 * Hartmann's solution (compound sodium lactate) is the UK name of a lactated Ringer's composition. The same name is
 * also an operation (Hartmann's procedure and its reversal), which a ServiceRequest may carry: not a fluid.
 */
const HARTMANN_FLUID = /(?<!reversal of )\bhartmann(?:['’]s|s)?(?![a-z'’])(?!\s*(procedure|operation|reversal|resection|pouch|stump))/;

/** Fluid class from free text (generic names). Order matters: albumin before saline (albumin may be "in sodium chloride"). */
export function fluidClassFromText(text: string): FluidClass | undefined {
  const t = text.toLowerCase();
  if (/albumin/.test(t)) {
    if (/\b(20|25)\s*%|\b(200|250)\s*mg\/ml|\b(20|25)\s*g\/100\s*ml/.test(t)) return 'albumin-hyper';
    if (/\b(4|4\.5|5)\s*%|\b(40|45|50)\s*mg\/ml/.test(t)) return 'albumin-iso';
    return 'albumin-iso';
  }
  if (/gelatin|starch|dextran/.test(t)) return 'other-colloid';
  if (/ringer|sodium lactate|balanced (crystalloid|solution)|multiple electrolytes|acetate.*gluconate/.test(t) || HARTMANN_FLUID.test(t))
    return 'balanced-crystalloid';
  if (
    /sodium chloride\s*(0\.9|9\s*mg\/ml)|0\.9\s*%\s*(sodium chloride|nacl|saline)|normal saline|\bnacl\s*0\.9|\bns\b.*bolus|saline\s*0\.9/.test(
      t,
    )
  )
    return 'saline';
  if (/\b(crystalloid|fluid bolus|iv fluid|volume bolus)\b/.test(t)) return 'other';
  return undefined;
}

export function conceptText(cc: CodeableConcept | undefined): string {
  if (!cc) return '';
  return [cc.text, ...(cc.coding ?? []).map((c) => c.display)].filter(Boolean).join(' ');
}

/** What to show a person: the text, else the first coding's display. */
export function conceptLabel(cc: CodeableConcept | undefined): string {
  return cc?.text ?? cc?.coding?.find((c) => c.display)?.display ?? '';
}

export function classifyFluid(cc: CodeableConcept | undefined): FluidClass | undefined {
  for (const c of cc?.coding ?? []) {
    const byCode = c.system === RXNORM && c.code ? RXNORM_FLUIDS.get(c.code.trim()) : undefined;
    if (byCode) return byCode;
  }
  return fluidClassFromText(conceptText(cc));
}

export function classifyVasoactive(cc: CodeableConcept | undefined): string | undefined {
  for (const c of cc?.coding ?? []) {
    if (c.system === RXNORM && c.code && RXNORM_VASOACTIVE[c.code]) return RXNORM_VASOACTIVE[c.code];
  }
  const m = VASOACTIVE_TEXT.exec(conceptText(cc));
  return m?.[1]?.toLowerCase();
}

/** SNOMED CT 47625008 "Intravenous route" (from memory; the FHIR R4 route-codes example value set uses SNOMED). */
export function isIntravenous(route: CodeableConcept | undefined): boolean | undefined {
  if (!route) return undefined;
  if ((route.coding ?? []).some((c) => c.system === SNOMED && c.code === '47625008')) return true;
  const t = conceptText(route).toLowerCase();
  if (!t) return undefined;
  return /intraven|\biv\b/.test(t);
}
