/**
 * Code lists: which FHIR codes map to which measurement kind, and the canonical UCUM unit of each kind.
 *
 * LOINC codes are those seen in public FHIR profiles (the German
 * Medical Informatics Initiative ICU module, the GECCO code list, the FHIR R4 vital-signs value set; docs/codes.md).
 * Markers that have no LOINC code (PPV, SVV, IVC diameters, VExUS parts, oedema grade, dynamic tests,
 * ventilation state) use Tidemark's own CodeSystem, published in docs/codes.md so that integrators can map
 * their local codes to it. We never guess a LOINC code.
 */

export const LOINC = 'http://loinc.org';
export const SNOMED = 'http://snomed.info/sct';
export const RXNORM = 'http://www.nlm.nih.gov/research/umls/rxnorm';
export const UCUM = 'http://unitsofmeasure.org';
export const ICD10 = 'http://hl7.org/fhir/sid/icd-10';
/** Tidemark's own CodeSystem for markers with no LOINC code. `.invalid` is a reserved TLD (RFC 2606): re-host or map as you like. */
export const TIDEMARK_MARKERS = 'https://tidemark.invalid/fhir/CodeSystem/marker';
/** Tidemark's own CodeSystem for coded answers (ventilation mode, rhythm, Doppler patterns, echo impressions). */
export const TIDEMARK_ANSWERS = 'https://tidemark.invalid/fhir/CodeSystem/answer';

/** Numeric measurement kinds. The name says what it is; the canonical unit is in KIND_UNITS. */
export const NUMERIC_KINDS = [
  'heartRate',
  'systolicBp',
  'diastolicBp',
  'meanBp',
  'respiratoryRate',
  'spo2',
  'fio2',
  'bodyWeight',
  'bodyHeight',
  'cvp',
  'rightAtrialPressure',
  'lactate',
  'albumin',
  'creatinine',
  'urineOutput',
  'fluidIntake',
  'fluidOutput',
  'fluidBalance',
  'cardiacOutput',
  'cardiacIndex',
  'strokeVolume',
  'strokeVolumeIndex',
  'ppv',
  'svv',
  'ivcDiameterMax',
  'ivcDiameterMin',
  'capillaryRefill',
  'tidalVolume',
  'peep',
  'intraAbdominalPressure',
  'evlwi',
  'portalPulsatility',
  'edemaGrade',
  'bLineRegions',
  'bLineRegionsLeft',
  'bLineRegionsRight',
] as const;
export type NumericKind = (typeof NUMERIC_KINDS)[number];

/** Canonical UCUM unit of each numeric kind; every value in a snapshot is in this unit. */
export const KIND_UNITS: Record<NumericKind, string> = {
  heartRate: '/min',
  systolicBp: 'mm[Hg]',
  diastolicBp: 'mm[Hg]',
  meanBp: 'mm[Hg]',
  respiratoryRate: '/min',
  spo2: '%',
  fio2: '%',
  bodyWeight: 'kg',
  bodyHeight: 'cm',
  cvp: 'mm[Hg]',
  rightAtrialPressure: 'mm[Hg]',
  lactate: 'mmol/L',
  albumin: 'g/L',
  creatinine: 'mg/dL',
  urineOutput: 'mL',
  fluidIntake: 'mL',
  fluidOutput: 'mL',
  fluidBalance: 'mL',
  cardiacOutput: 'L/min',
  cardiacIndex: 'L/min/m2',
  strokeVolume: 'mL',
  strokeVolumeIndex: 'mL/m2',
  ppv: '%',
  svv: '%',
  ivcDiameterMax: 'cm',
  ivcDiameterMin: 'cm',
  capillaryRefill: 's',
  tidalVolume: 'mL',
  peep: 'cm[H2O]',
  intraAbdominalPressure: 'mm[Hg]',
  evlwi: 'mL/kg',
  portalPulsatility: '%',
  edemaGrade: '{grade}',
  bLineRegions: '{regions}',
  bLineRegionsLeft: '{regions}',
  bLineRegionsRight: '{regions}',
};

/**
 * Physiologically possible range of each kind, in the canonical unit. A value outside is flagged and
 * excluded as impossible (a typo or a unit error), not clamped. Bounds: common practice, chosen wide.
 */
export const KIND_BOUNDS: Record<NumericKind, readonly [number, number]> = {
  heartRate: [0, 350],
  systolicBp: [0, 350],
  diastolicBp: [0, 250],
  meanBp: [0, 300],
  respiratoryRate: [0, 120],
  spo2: [0, 100],
  fio2: [21, 100],
  bodyWeight: [0.3, 500],
  bodyHeight: [20, 260],
  cvp: [-15, 60],
  rightAtrialPressure: [-15, 60],
  lactate: [0, 40],
  albumin: [0, 80],
  creatinine: [0, 30],
  urineOutput: [0, 50_000],
  fluidIntake: [0, 50_000],
  fluidOutput: [0, 50_000],
  fluidBalance: [-50_000, 50_000],
  cardiacOutput: [0, 30],
  cardiacIndex: [0, 15],
  strokeVolume: [0, 300],
  strokeVolumeIndex: [0, 150],
  ppv: [0, 100],
  svv: [0, 100],
  ivcDiameterMax: [0, 5],
  ivcDiameterMin: [0, 5],
  capillaryRefill: [0, 60],
  tidalVolume: [0, 3000],
  peep: [0, 40],
  intraAbdominalPressure: [-5, 80],
  evlwi: [0, 60],
  portalPulsatility: [0, 100],
  edemaGrade: [0, 4],
  bLineRegions: [0, 8],
  // Per side: 4 regions each in the 8-region examination (Volpicelli G et al., Intensive Care Med 2012;38:577).
  bLineRegionsLeft: [0, 4],
  bLineRegionsRight: [0, 4],
};

export interface CodeRef {
  system: string;
  code: string;
  display: string;
}

/** Observation codes → numeric kind. LOINC first; our own codes where LOINC has none (docs/codes.md). */
export const OBSERVATION_CODES: ReadonlyArray<CodeRef & { kind: NumericKind }> = [
  { system: LOINC, code: '8867-4', display: 'Heart rate', kind: 'heartRate' },
  { system: LOINC, code: '8480-6', display: 'Systolic blood pressure', kind: 'systolicBp' },
  { system: LOINC, code: '8462-4', display: 'Diastolic blood pressure', kind: 'diastolicBp' },
  { system: LOINC, code: '8478-0', display: 'Mean blood pressure', kind: 'meanBp' },
  { system: LOINC, code: '9279-1', display: 'Respiratory rate', kind: 'respiratoryRate' },
  { system: LOINC, code: '59408-5', display: 'Oxygen saturation in Arterial blood by Pulse oximetry', kind: 'spo2' },
  // The FHIR R4 oxygen saturation profile fixes 2708-6 and the US Core pulse oximetry profile adds 59408-5 beside it
  // (HL7/US-Core, us-core-pulse-oximetry; example satO2-fiO2); feeds also send 2708-6 alone, and an arterial blood gas
  // saturation carries it too. Both read as the saturation used by the SpO2/FiO2 ratio.
  { system: LOINC, code: '2708-6', display: 'Oxygen saturation in Arterial blood', kind: 'spo2' },
  { system: LOINC, code: '19994-3', display: 'Oxygen/Inspired gas setting [Volume Fraction] Ventilator', kind: 'fio2' },
  { system: LOINC, code: '71835-3', display: 'Oxygen/Inspired gas Respiratory system by O2 Analyzer --on ventilator', kind: 'fio2' },
  // Inhaled oxygen concentration: a component of the US Core pulse oximetry panel (beside 3151-8 flow rate, which is
  // not read) and, in public FHIR data, also an Observation of its own. Read as FiO2 in either place.
  { system: LOINC, code: '3150-0', display: 'Inhaled oxygen concentration', kind: 'fio2' },
  { system: LOINC, code: '29463-7', display: 'Body weight', kind: 'bodyWeight' },
  { system: LOINC, code: '8302-2', display: 'Body height', kind: 'bodyHeight' },
  { system: LOINC, code: '60985-9', display: 'Central venous pressure (CVP)', kind: 'cvp' },
  { system: LOINC, code: '8400-4', display: 'Right atrial Mean blood pressure', kind: 'rightAtrialPressure' },
  { system: LOINC, code: '2518-9', display: 'Lactate [Moles/volume] in Arterial blood', kind: 'lactate' },
  { system: LOINC, code: '2519-7', display: 'Lactate [Moles/volume] in Venous blood', kind: 'lactate' },
  { system: LOINC, code: '2524-7', display: 'Lactate [Moles/volume] in Serum or Plasma', kind: 'lactate' },
  { system: LOINC, code: '32693-4', display: 'Lactate [Moles/volume] in Blood', kind: 'lactate' },
  { system: LOINC, code: '19239-3', display: 'Lactate [Moles/volume] in Capillary blood', kind: 'lactate' },
  { system: LOINC, code: '19240-1', display: 'Lactate [Moles/volume] in Mixed venous blood', kind: 'lactate' },
  { system: LOINC, code: '1751-7', display: 'Albumin [Mass/volume] in Serum or Plasma', kind: 'albumin' },
  {
    system: LOINC,
    code: '61151-7',
    display: 'Albumin [Mass/volume] in Serum or Plasma by Bromocresol green (BCG) dye binding method',
    kind: 'albumin',
  },
  {
    system: LOINC,
    code: '61152-5',
    display: 'Albumin [Mass/volume] in Serum or Plasma by Bromocresol purple (BCP) dye binding method',
    kind: 'albumin',
  },
  { system: LOINC, code: '2160-0', display: 'Creatinine [Mass/volume] in Serum or Plasma', kind: 'creatinine' },
  { system: LOINC, code: '14682-9', display: 'Creatinine [Moles/volume] in Serum or Plasma', kind: 'creatinine' },
  { system: LOINC, code: '9187-6', display: 'Urine output', kind: 'urineOutput' },
  { system: LOINC, code: '9103-3', display: 'Fluid intake total', kind: 'fluidIntake' },
  { system: LOINC, code: '9257-7', display: 'Fluid output total', kind: 'fluidOutput' },
  { system: LOINC, code: '9097-7', display: 'Fluid balance 24 hour', kind: 'fluidBalance' },
  { system: LOINC, code: '8741-1', display: 'Left ventricular Cardiac output', kind: 'cardiacOutput' },
  { system: LOINC, code: '8737-9', display: 'Left ventricular Cardiac output by Indicator dilution', kind: 'cardiacOutput' },
  { system: LOINC, code: '75919-1', display: 'Cardiac index', kind: 'cardiacIndex' },
  { system: LOINC, code: '20562-5', display: 'Left ventricular Stroke volume', kind: 'strokeVolume' },
  { system: LOINC, code: '76297-1', display: 'Left ventricular Stroke volume index', kind: 'strokeVolumeIndex' },
  { system: LOINC, code: '44963-7', display: 'Capillary refill [Time] of Nail bed', kind: 'capillaryRefill' },
  { system: LOINC, code: '20112-9', display: 'Tidal volume setting Ventilator', kind: 'tidalVolume' },
  { system: LOINC, code: '76222-9', display: 'Tidal volume Ventilator --on ventilator', kind: 'tidalVolume' },
  { system: LOINC, code: '76248-4', display: 'PEEP Respiratory system --on ventilator', kind: 'peep' },
  { system: TIDEMARK_MARKERS, code: 'ppv', display: 'Pulse pressure variation', kind: 'ppv' },
  { system: TIDEMARK_MARKERS, code: 'svv', display: 'Stroke volume variation', kind: 'svv' },
  {
    system: TIDEMARK_MARKERS,
    code: 'ivc-diameter-max',
    display: 'Inferior vena cava diameter, maximum over the breath',
    kind: 'ivcDiameterMax',
  },
  {
    system: TIDEMARK_MARKERS,
    code: 'ivc-diameter-min',
    display: 'Inferior vena cava diameter, minimum over the breath',
    kind: 'ivcDiameterMin',
  },
  {
    system: TIDEMARK_MARKERS,
    code: 'intra-abdominal-pressure',
    display: 'Intra-abdominal pressure (bladder)',
    kind: 'intraAbdominalPressure',
  },
  { system: TIDEMARK_MARKERS, code: 'evlwi', display: 'Extravascular lung water index (per predicted body weight)', kind: 'evlwi' },
  { system: TIDEMARK_MARKERS, code: 'portal-pulsatility', display: 'Portal vein pulsatility fraction', kind: 'portalPulsatility' },
  { system: TIDEMARK_MARKERS, code: 'edema-grade', display: 'Peripheral oedema grade (0-4)', kind: 'edemaGrade' },
  { system: TIDEMARK_MARKERS, code: 'lung-us-b-regions', display: 'Lung ultrasound regions with B-pattern (of 8)', kind: 'bLineRegions' },
  {
    system: TIDEMARK_MARKERS,
    code: 'lung-us-b-regions-left',
    display: 'Lung ultrasound regions with B-pattern, left lung (of 4)',
    kind: 'bLineRegionsLeft',
  },
  {
    system: TIDEMARK_MARKERS,
    code: 'lung-us-b-regions-right',
    display: 'Lung ultrasound regions with B-pattern, right lung (of 4)',
    kind: 'bLineRegionsRight',
  },
];

/**
 * Observation.bodySite of a whole-chest B-pattern count (`lung-us-b-regions`) that names one lung: the count is then
 * that lung's (of 4). SNOMED CT body structures 44029006 |Left lung structure| and 3341006 |Right lung structure|,
 * as used for Observation/Specimen bodySite in public FHIR and DICOM mapping tables (docs/codes.md). Any other
 * bodySite (both lungs, a lobe, the chest) leaves the count whole-chest with the side unknown.
 */
export const LUNG_SIDE_SITES: ReadonlyArray<CodeRef & { kind: 'bLineRegionsLeft' | 'bLineRegionsRight' }> = [
  { system: SNOMED, code: '44029006', display: 'Left lung structure', kind: 'bLineRegionsLeft' },
  { system: SNOMED, code: '3341006', display: 'Right lung structure', kind: 'bLineRegionsRight' },
];

/**
 * The kind a numeric Observation is read as, given its bodySite: a whole-chest B-pattern count on one lung is that
 * side's count; every other kind, and a count with no one-lung bodySite, is unchanged. Two different lungs named at
 * once leave the side unknown.
 */
export function kindAtSite(
  kind: NumericKind,
  bodySite: { coding?: ReadonlyArray<{ system?: string | undefined; code?: string | undefined }> | undefined } | undefined,
): NumericKind {
  if (kind !== 'bLineRegions' || !bodySite?.coding) return kind;
  const sides = new Set(
    bodySite.coding.flatMap((c) => LUNG_SIDE_SITES.filter((s) => s.system === c.system && s.code === c.code).map((s) => s.kind)),
  );
  const [only] = sides;
  return sides.size === 1 && only ? only : kind;
}

/** Coded (non-numeric) observation kinds: the Observation carries a valueCodeableConcept from TIDEMARK_ANSWERS. */
export const CODED_KINDS = [
  'ventilationMode',
  'heartRhythm',
  'hepaticVeinPattern',
  'renalVeinPattern',
  'lvFunction',
  'chestStatus',
] as const;
export type CodedKind = (typeof CODED_KINDS)[number];

export const CODED_OBSERVATION_CODES: ReadonlyArray<CodeRef & { kind: CodedKind }> = [
  { system: TIDEMARK_MARKERS, code: 'ventilation-mode', display: 'Breathing and ventilation state', kind: 'ventilationMode' },
  { system: LOINC, code: '8884-9', display: 'Heart rate rhythm', kind: 'heartRhythm' },
  { system: TIDEMARK_MARKERS, code: 'heart-rhythm', display: 'Heart rhythm (coded)', kind: 'heartRhythm' },
  { system: TIDEMARK_MARKERS, code: 'hepatic-vein-pattern', display: 'Hepatic vein Doppler pattern', kind: 'hepaticVeinPattern' },
  { system: TIDEMARK_MARKERS, code: 'renal-vein-pattern', display: 'Intrarenal venous Doppler pattern', kind: 'renalVeinPattern' },
  { system: TIDEMARK_MARKERS, code: 'lv-function', display: 'Echo impression of left ventricular function', kind: 'lvFunction' },
  { system: TIDEMARK_MARKERS, code: 'chest-status', display: 'Chest open or closed', kind: 'chestStatus' },
];

/** Allowed answer codes (system TIDEMARK_ANSWERS) per coded kind. */
export const CODED_ANSWERS: Record<CodedKind, readonly string[]> = {
  ventilationMode: ['controlled-no-effort', 'controlled-with-effort', 'spontaneous'],
  heartRhythm: ['sinus', 'atrial-fibrillation', 'other-irregular', 'paced'],
  hepaticVeinPattern: ['normal', 'mild', 'severe'],
  renalVeinPattern: ['continuous', 'biphasic', 'monophasic'],
  lvFunction: ['hyperdynamic', 'normal', 'reduced', 'severely-reduced'],
  chestStatus: ['closed', 'open'],
};

/** Dynamic tests: one Observation each, with components `before` and `after` (see docs/codes.md). */
export const DYNAMIC_TESTS = ['plr', 'miniFluidChallenge', 'endExpiratoryOcclusion', 'tidalVolumeChallenge'] as const;
export type DynamicTestKind = (typeof DYNAMIC_TESTS)[number];
export const DYNAMIC_TEST_CODES: ReadonlyArray<CodeRef & { kind: DynamicTestKind }> = [
  { system: TIDEMARK_MARKERS, code: 'passive-leg-raise', display: 'Passive leg raising test', kind: 'plr' },
  {
    system: TIDEMARK_MARKERS,
    code: 'mini-fluid-challenge',
    display: 'Mini fluid challenge (100 mL over 1 min)',
    kind: 'miniFluidChallenge',
  },
  { system: TIDEMARK_MARKERS, code: 'end-expiratory-occlusion', display: 'End-expiratory occlusion test', kind: 'endExpiratoryOcclusion' },
  {
    system: TIDEMARK_MARKERS,
    code: 'tidal-volume-challenge',
    display: 'Tidal volume challenge (6 to 8 mL/kg PBW)',
    kind: 'tidalVolumeChallenge',
  },
];
/** Component codes of a dynamic test Observation. */
export const DYNAMIC_COMPONENT = { before: 'before', after: 'after', measured: 'measured-variable' } as const;
/** What a dynamic test measured (component `measured-variable`, valueCodeableConcept in TIDEMARK_ANSWERS). */
export const DYNAMIC_MEASURED = ['cardiacOutput', 'cardiacIndex', 'strokeVolume', 'pulsePressure', 'vti', 'ppv', 'svv'] as const;
export type DynamicMeasured = (typeof DYNAMIC_MEASURED)[number];
/** Canonical unit of each dynamic-test measured variable (before and after are normalised to it). */
export const DYNAMIC_MEASURED_UNITS: Readonly<Record<DynamicMeasured, string>> = {
  cardiacOutput: 'L/min',
  cardiacIndex: 'L/min/m2',
  strokeVolume: 'mL',
  pulsePressure: 'mm[Hg]',
  vti: 'cm',
  ppv: '%',
  svv: '%',
};

export function findNumericKind(
  codings: ReadonlyArray<{ system?: string | undefined; code?: string | undefined }>,
): NumericKind | undefined {
  for (const c of codings) {
    const hit = OBSERVATION_CODES.find((o) => o.system === c.system && o.code === c.code);
    if (hit) return hit.kind;
  }
  return undefined;
}
