/**
 * Fluid tolerance thresholds. Every field has a default and its source, so `toleranceThresholdsSchema.parse({})`
 * gives the published (or common-practice) values; a site may override single fields. Unknown keys are
 * rejected so that a misspelt override does not pass silently.
 */
import { z } from 'zod';

const minutes = (d: number) => z.number().int().positive().default(d);
const hours = (d: number) => z.number().positive().default(d);

export const toleranceThresholdsSchema = z
  .strictObject({
    // ── Fluid balance ────────────────────────────────────────────────────────────────────────────
    /** The latest intake/output record must be this recent for a balance to count (common practice: charting at least each shift). */
    balanceRecencyMinutes: minutes(720),
    /** Without an admission time, the cumulative balance starts at the earliest record within this many hours (common practice). */
    balanceFallbackLookbackHours: hours(168),
    /**
     * Adults: %FO ≥ this is a severe limit (Bouchard J et al., Kidney Int 2009;76:422 [M]: fluid overload > 10 % with higher mortality in
     * adults with AKI).
     */
    adultFluidOverloadPercent: z.number().positive().default(10),
    /** Children (< `paediatricBelowAgeYears`): %FO moderate band (Goldstein SL et al., Pediatrics 2001; children on CRRT). */
    fluidOverloadModeratePercent: z.number().positive().default(10),
    /** Children: %FO severe band, ≥ 20 % with higher mortality (Sutherland SM et al., Am J Kidney Dis 2010 [M]; children on CRRT). */
    fluidOverloadSeverePercent: z.number().positive().default(20),
    /** Below this age in years the paediatric bands apply (common practice: paediatric care to 18). */
    paediatricBelowAgeYears: z.number().positive().default(18),

    // ── Weight ───────────────────────────────────────────────────────────────────────────────────
    /** A weight up to this long before the admission time still counts as the admission weight (common practice). */
    admissionWeightWindowHours: hours(24),
    /** Weight used for per-kg figures (urine output) may be at most this old (common practice). */
    weightMaxAgeHours: hours(168),
    /** The latest weight must be this recent to judge weight gain (common practice). */
    latestWeightMaxAgeHours: hours(48),
    /** Weight gain is judged only when the two weights are at least this far apart (common practice). */
    weightGainMinIntervalHours: hours(12),
    /** Weight gain bands, the weight-based form of %FO (Selewski DT et al., Intensive Care Med 2011 — from memory). */
    weightGainModeratePercent: z.number().positive().default(10),
    weightGainSeverePercent: z.number().positive().default(20),

    // ── Oncotic pressure and leak ────────────────────────────────────────────────────────────────
    /** Low albumin: below the ALBIOS target of 30 g/L (Caironi P et al., N Engl J Med 2014). */
    albuminLowGPerL: z.number().positive().default(30),
    /** Severely low albumin, < 25 g/L (from memory; often so called). */
    albuminSevereLowGPerL: z.number().positive().default(25),
    /** Below this an albumin "in g/L" is taken as a unit error (g/dL sent as g/L) and not used (common practice). */
    albuminImplausibleBelowGPerL: z.number().nonnegative().default(8),
    /** Oedema grade freshness (common practice: assessed each nursing shift or day). */
    oedemaFreshMinutes: minutes(1440),
    /** Oedema grade (0–4) from which oedema limits tolerance (common practice). */
    oedemaLimitingGrade: z.number().int().min(1).max(4).default(2),

    // ── Lungs ────────────────────────────────────────────────────────────────────────────────────
    /** SpO2, FiO2 and PEEP freshness (common practice: continuous monitoring, charted hourly). */
    oxygenationFreshMinutes: minutes(120),
    /** SpO2/FiO2 below this ≈ PaO2/FiO2 < 200 (Rice TW et al., Chest 2007 — from memory). */
    spo2Fio2LowRatio: z.number().positive().default(235),
    /** Above this SpO2 the ratio is unreliable (flat part of the dissociation curve; Rice 2007 — from memory). */
    spo2PlateauPercent: z.number().positive().max(100).default(97),
    /** Trend window for SpO2/FiO2, FiO2 and PEEP (common practice: the last hours). */
    trendWindowMinutes: minutes(360),
    /** A trend needs an earlier value at least this long before the latest (common practice). */
    trendMinSpanMinutes: minutes(60),
    /** A fall of SpO2/FiO2 by at least this % of the earlier value is "falling" (common practice). */
    spo2Fio2FallPercent: z.number().positive().default(20),
    /** FiO2 rise (percentage points) that marks a rising oxygen need (common practice). */
    fio2RisePoints: z.number().positive().default(10),
    /** PEEP rise (cmH2O) that marks a rising oxygen need (common practice). */
    peepRiseCmH2O: z.number().positive().default(2),
    /** Bedside ultrasound freshness: lung ultrasound, IVC, VExUS parts (common practice: a snapshot of hours). */
    ultrasoundFreshMinutes: minutes(360),
    /** Regions (of 8; with the side charted, left + right) with B-pattern from which the finding is a moderate limit (common practice). */
    bLineModerateRegions: z.number().int().min(1).max(8).default(2),
    /**
     * B-pattern regions per side (of 4) for diffuse interstitial syndrome, ≥ on BOTH sides: severe and a harm sign (Volpicelli G et al.,
     * Intensive Care Med 2012;38:577 [M]: ≥ 2 positive regions on each side). One side or the side not charted: capped at moderate
     * (docs/clinical-logic).
     */
    bLineBilateralPerSide: z.number().int().min(1).max(4).default(2),
    /** EVLWI freshness (common practice: thermodilution repeated every few hours). */
    evlwiFreshMinutes: minutes(720),
    /** EVLWI at which pulmonary oedema is present (Tagami T et al., Crit Care 2010; Jozwiak M et al., Ann Intensive Care 2015). */
    evlwiOedemaMlPerKg: z.number().positive().default(10),

    // ── Venous congestion ────────────────────────────────────────────────────────────────────────
    /** VExUS IVC gate (Beaubien-Souligny W et al., Ultrasound J 2020). */
    vexusIvcCm: z.number().positive().default(2),
    /** Portal pulsatility fraction: mild from 30 %, severe from 50 % (Beaubien-Souligny 2020). */
    portalMildPercent: z.number().positive().default(30),
    portalSeverePercent: z.number().positive().default(50),
    /** High CVP (common practice; Boyd JH et al., Crit Care Med 2011: CVP > 12 mmHg with the highest mortality). */
    cvpHighMmHg: z.number().default(12),

    // ── Abdomen ──────────────────────────────────────────────────────────────────────────────────
    /** IAH threshold (WSACS 2013, Kirkpatrick AW et al., Intensive Care Med 2013). */
    iahMmHg: z.number().positive().default(12),
    /**
     * IAH grade from which the finding is severe: grade III (IAP > 20 mmHg, the pressure of abdominal compartment syndrome; WSACS 2013).
     */
    iahSevereGrade: z.number().int().min(1).max(4).default(3),
    /** MAP is paired with IAP only when measured this close to it (common practice). */
    mapPairMinutes: minutes(60),

    // ── Kidneys ──────────────────────────────────────────────────────────────────────────────────
    /** The latest urine record must end this recently for the urine criterion (common practice: hourly charting). */
    urineRecencyMinutes: minutes(180),
    /**
     * A urine amount charted without a period covers the time since the previous urine record, if that is at most this long (common
     * practice: charting every 1–4 h).
     */
    urinePointMaxGapMinutes: minutes(240),
    /** A KDIGO window counts only when charting covers at least this fraction of it (common practice). */
    urineCoverageFraction: z.number().gt(0).max(1).default(0.9),

    // ── Verdict ──────────────────────────────────────────────────────────────────────────────────
    /**
     * Moderate findings in this many different organ domains, one of them lungs, venous or balance, make tolerance poor (Tidemark's scheme;
     * docs/clinical-logic/tolerance.md).
     */
    poorWhenModerateDomains: z.number().int().min(2).default(3),
    /**
     * "Adequate" needs at least this many markers assessed, one of them lungs, venous or balance; fewer gives "not known" (our choice,
     * docs/clinical-logic).
     */
    adequateMinMarkers: z.number().int().min(1).default(3),
  })
  .superRefine((t, ctx) => {
    const pairs: Array<[keyof typeof t, keyof typeof t]> = [
      ['fluidOverloadModeratePercent', 'fluidOverloadSeverePercent'],
      ['weightGainModeratePercent', 'weightGainSeverePercent'],
      ['albuminSevereLowGPerL', 'albuminLowGPerL'],
      ['portalMildPercent', 'portalSeverePercent'],
      ['albuminImplausibleBelowGPerL', 'albuminSevereLowGPerL'],
    ];
    for (const [lower, upper] of pairs) {
      if ((t[lower] as number) > (t[upper] as number)) {
        ctx.addIssue({ code: 'custom', path: [lower], message: `${lower} must not exceed ${upper}` });
      }
    }
  });

export type ToleranceThresholds = z.infer<typeof toleranceThresholdsSchema>;

/** The defaults, parsed once. */
export const DEFAULT_TOLERANCE_THRESHOLDS: ToleranceThresholds = toleranceThresholdsSchema.parse({});
