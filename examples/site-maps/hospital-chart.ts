/**
 * An invented patient of the invented Harbourside General Hospital, charted the way a hospital's systems send it:
 * monitor values under IEEE 11073-10101 terms with MDC unit text, flowsheet rows under local codes, one LOINC lab.
 * Valid FHIR R4; times relative to `now`, UTC.
 */
import type { Observation, Patient } from 'fhir/r4.js';

export const SITE_PATIENT = 'hg-site-07';
export const IEEE = 'urn:iso:std:iso:11073:10101';
export const FLOWSHEET = 'https://harbourside.invalid/fhir/CodeSystem/icu-flowsheet';
/** The example maps and hints (examples/site-maps/). */
export const SITE_CONFIG = 'examples/site-maps/tidemark-config.json';

const at = (now: Date, minutesAgo: number) => new Date(now.getTime() - minutesAgo * 60_000).toISOString().replace(/\.\d{3}Z$/, 'Z');

function obs(
  id: string,
  system: string,
  code: string,
  display: string,
  value: number,
  unit: string,
  minutesAgo: number,
  now: Date,
  ucum = false,
): Observation {
  return {
    resourceType: 'Observation',
    id,
    status: 'final',
    code: { coding: [{ system, code, display }] },
    subject: { reference: `Patient/${SITE_PATIENT}` },
    effectiveDateTime: at(now, minutesAgo),
    valueQuantity: { value, unit, ...(ucum ? { system: 'http://unitsofmeasure.org', code: unit } : {}) },
  };
}

export function siteChart(now: Date): Array<Patient | Observation> {
  return [
    { resourceType: 'Patient', id: SITE_PATIENT, gender: 'female', birthDate: '1961-04-12' },
    obs('st-abp-sys-1', IEEE, '150037', 'MDC_PRESS_BLD_ART_ABP_SYS', 88, 'MDC_DIM_MMHG', 5, now),
    obs('st-abp-dia-1', IEEE, '150038', 'MDC_PRESS_BLD_ART_ABP_DIA', 46, 'MDC_DIM_MMHG', 5, now),
    obs('st-abp-mean-1', IEEE, '150039', 'MDC_PRESS_BLD_ART_ABP_MEAN', 60, 'mm[Hg]', 5, now, true),
    obs('st-hr-1', IEEE, '147842', 'MDC_ECG_HEART_RATE', 118, 'MDC_DIM_BEAT_PER_MIN', 5, now),
    obs('st-pr-1', IEEE, '149530', 'MDC_PULS_OXIM_PULS_RATE', 117, 'MDC_DIM_BEAT_PER_MIN', 5, now),
    obs('st-spo2-1', IEEE, '150456', 'MDC_PULS_OXIM_SAT_O2', 94, 'MDC_DIM_PERCENT', 5, now),
    obs('st-ppv-1', FLOWSHEET, 'FLO-3301', 'PPV % (arterial line monitor)', 17, '%', 10, now, true),
    obs('st-var-1', FLOWSHEET, 'FLO-3399', 'Resp variation (PPV or SVV, as charted)', 15, '%', 10, now, true),
    obs('st-cvp-1', FLOWSHEET, 'FLO-2001', 'CVP (transduced)', 7, 'mmHg', 12, now),
    // A flowsheet row no map covers: the report must list it for the integration team.
    obs('st-pcwp-1', FLOWSHEET, 'FLO-9120', 'Wedge pressure', 14, 'mmHg', 30, now),
    obs('st-pcwp-2', FLOWSHEET, 'FLO-9120', 'Wedge pressure', 15, 'mmHg', 90, now),
    // Unit text no hint covers: found, read as systolic pressure, then excluded for its unit.
    obs('st-abp-sys-2', IEEE, '150037', 'MDC_PRESS_BLD_ART_ABP_SYS', 92, 'mm Hg art', 65, now),
    obs('st-lac-1', 'http://loinc.org', '2524-7', 'Lactate [Moles/volume] in Serum or Plasma', 3.4, 'mmol/L', 40, now, true),
  ];
}
