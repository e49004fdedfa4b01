/**
 * The service registry: each service declares its hook, its prefetch templates and which
 * of them it cannot do without. Discovery is generated from this list; code never branches on service ids.
 */
import { CODED_OBSERVATION_CODES, DYNAMIC_TEST_CODES, OBSERVATION_CODES, type NumericKind } from '../fhir/codes.js';
import type { SiteMap } from '../fhir/site-map.js';
import type { DiscoveryService, HookName } from './schemas.js';

export interface PrefetchQuery {
  /** R4 search or read, with CDS Hooks 2.0 tokens. */
  template: string;
  /** What the rules lose without it (for "missing data" findings). */
  purpose: string;
  /** Resource types accepted in the answer. */
  resourceTypes: readonly string[];
}

export interface ServiceDefinition {
  id: string;
  hook: HookName;
  title: string;
  description: string;
  prefetch: Record<string, PrefetchQuery>;
  /** Prefetch keys without which no advice can be given: if neither prefetch nor the FHIR server can supply them, 412. */
  required: readonly string[];
  usageRequirements?: string;
}

const codes = (kinds: readonly NumericKind[]): string =>
  OBSERVATION_CODES.filter((c) => kinds.includes(c.kind))
    .map((c) => `${c.system}|${c.code}`)
    .join(',');

const patientRef = 'Patient/{{context.patientId}}';
const obs = (codeList: string, count: number) => `Observation?patient=${patientRef}&code=${codeList}&_sort=-date&_count=${count}`;

/** Prefetch templates shared by the services (R4 syntax; `patient=Patient/id` works on every server we know). */
export const PREFETCH: Record<string, PrefetchQuery> = {
  patient: { template: patientRef, purpose: 'sex and age (predicted body weight)', resourceTypes: ['Patient'] },
  encounter: {
    template: 'Encounter/{{context.encounterId}}',
    purpose: 'ICU admission time (cumulative balance)',
    resourceTypes: ['Encounter'],
  },
  vitals: {
    template: obs(
      codes([
        'heartRate',
        'systolicBp',
        'diastolicBp',
        'meanBp',
        'respiratoryRate',
        'spo2',
        'cvp',
        'rightAtrialPressure',
        'capillaryRefill',
      ]),
      200,
    ),
    purpose: 'vital signs, venous pressure and capillary refill',
    resourceTypes: ['Observation'],
  },
  labs: {
    template: obs(codes(['lactate', 'albumin', 'creatinine']), 50),
    purpose: 'lactate, albumin and creatinine',
    resourceTypes: ['Observation'],
  },
  body: { template: obs(codes(['bodyWeight', 'bodyHeight']), 20), purpose: 'weight and height', resourceTypes: ['Observation'] },
  balance: {
    template: obs(codes(['urineOutput', 'fluidIntake', 'fluidOutput', 'fluidBalance']), 200),
    purpose: 'intake, output and urine output',
    resourceTypes: ['Observation'],
  },
  hemodynamics: {
    template: obs(
      [
        codes(['cardiacOutput', 'cardiacIndex', 'strokeVolume', 'strokeVolumeIndex', 'ppv', 'svv', 'ivcDiameterMax', 'ivcDiameterMin']),
        DYNAMIC_TEST_CODES.map((c) => `${c.system}|${c.code}`).join(','),
      ].join(','),
      100,
    ),
    purpose: 'monitor and ultrasound flow markers and dynamic tests',
    resourceTypes: ['Observation'],
  },
  ventilation: {
    template: obs(codes(['tidalVolume', 'peep', 'fio2']), 100),
    purpose: 'tidal volume, PEEP and FiO2',
    resourceTypes: ['Observation'],
  },
  // Rarely charted states get a key of their own, so minute-level device data cannot push them off the first page.
  assessments: {
    template: obs(
      [
        codes([
          'intraAbdominalPressure',
          'evlwi',
          'portalPulsatility',
          'edemaGrade',
          'bLineRegions',
          'bLineRegionsLeft',
          'bLineRegionsRight',
        ]),
        CODED_OBSERVATION_CODES.map((c) => `${c.system}|${c.code}`).join(','),
      ].join(','),
      50,
    ),
    purpose: 'ventilation state, rhythm, chest, echo and Doppler impressions, IAP, lung water and oedema',
    resourceTypes: ['Observation'],
  },
  conditions: {
    template: `Condition?patient=${patientRef}&clinical-status=active&_count=50`,
    purpose: 'conditions that lower tolerance',
    resourceTypes: ['Condition'],
  },
  fluidsGiven: {
    template: `MedicationAdministration?patient=${patientRef}&_sort=-effective-time&_count=100`,
    purpose: 'fluid and vasopressor administrations',
    resourceTypes: ['MedicationAdministration'],
  },
  medications: {
    template: `MedicationRequest?patient=${patientRef}&status=active&_count=50`,
    purpose: 'active vasopressor orders',
    resourceTypes: ['MedicationRequest'],
  },
};

const all = PREFETCH;
const orderUsage =
  "Sends draftOrders with the fluid MedicationRequest (or ServiceRequest). Needs read access to the patient's Observation, Condition, MedicationAdministration and MedicationRequest resources.";

export const SERVICES: readonly ServiceDefinition[] = [
  {
    id: 'bolus-review-select',
    hook: 'order-select',
    title: 'Fluid bolus review (on select)',
    description:
      'When an IV fluid bolus is selected, estimates whether cardiac output is likely to rise with volume and how well the patient will tolerate it, and suggests a next step. Advisory only.',
    prefetch: all,
    required: ['vitals'],
    usageRequirements: orderUsage,
  },
  {
    id: 'bolus-review-sign',
    hook: 'order-sign',
    title: 'Fluid bolus review (on sign)',
    description:
      'Before a fluid bolus order is signed, restates fluid responsiveness and tolerance with the evidence used and what is missing. Advisory only.',
    prefetch: all,
    required: ['vitals'],
    usageRequirements: orderUsage,
  },
  {
    id: 'fluid-overview',
    hook: 'patient-view',
    title: 'ICU fluid overview',
    description: 'On opening the chart: fluid balance, tolerance to more volume and the latest responsiveness evidence. Advisory only.',
    prefetch: all,
    required: ['vitals'],
  },
];

export function findService(id: string, services: readonly ServiceDefinition[] = SERVICES): ServiceDefinition | undefined {
  return services.find((s) => s.id === id);
}

/**
 * The services as a site with these maps runs them: every Observation search that asks for a Tidemark code also asks
 * for the site codes read as it (src/fhir/site-map.ts), so that a hospital's server returns them and the EHR's
 * prefetch (from discovery) includes them. Without maps, the registry itself.
 */
export function servicesFor(siteMap: SiteMap | undefined): readonly ServiceDefinition[] {
  if (!siteMap || siteMap.read.size === 0) return SERVICES;
  const sources = new Map<string, string[]>();
  for (const [source, site] of siteMap.read) {
    const target = `${site.target.system}|${site.target.code}`;
    sources.set(target, [...(sources.get(target) ?? []), source]);
  }
  const widen = (template: string): string =>
    template.replace(/([?&]code=)([^&]*)/, (_m, head: string, list: string) => {
      const codes = list.split(',');
      const added = codes.flatMap((c) => sources.get(c) ?? []).filter((c) => !codes.includes(c));
      return `${head}${[...codes, ...new Set(added)].join(',')}`;
    });
  return SERVICES.map((s) => ({
    ...s,
    prefetch: Object.fromEntries(Object.entries(s.prefetch).map(([k, q]) => [k, { ...q, template: widen(q.template) }])),
  }));
}

/** Discovery entries generated from the registry (CDS Hooks 2.0 §Discovery). */
export function discoveryDocument(services: readonly ServiceDefinition[] = SERVICES): { services: DiscoveryService[] } {
  return {
    services: services.map((s) => ({
      hook: s.hook,
      title: s.title,
      description: s.description,
      id: s.id,
      prefetch: Object.fromEntries(Object.entries(s.prefetch).map(([k, q]) => [k, q.template])),
      ...(s.usageRequirements ? { usageRequirements: s.usageRequirements } : {}),
    })),
  };
}
