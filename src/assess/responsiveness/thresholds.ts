/**
 * Thresholds and time windows of the fluid-responsiveness rules. Every field has a default with its source, so
 * `responsivenessThresholdsSchema.parse({})` gives the defaults; a site may override any of them.
 * "[M]" marks a value or citation taken from memory and not re-confirmed against the paper.
 * Boundary conventions (≥ or >) are written beside each threshold and in docs/clinical-logic/responsiveness.md.
 * Unknown keys (a misspelt override) and inverted bands are rejected.
 */
import { z } from 'zod';

const minutes = (max: number) => z.number().min(1).max(max);
const percent = () => z.number().min(0).max(100);

export const responsivenessThresholdsSchema = z
  .strictObject({
    // ── Freshness windows, minutes: older data never counts ───────────────────────────────────────────────
    /** Heart rate, blood pressure, respiratory rate (common practice: charted at least hourly in the ICU). */
    vitalsMaxAgeMin: minutes(1440).default(60),
    /** PPV and SVV (common practice: they change within minutes with ventilation and volume). */
    ppvSvvMaxAgeMin: minutes(1440).default(30),
    /** Dynamic tests: PLR, mini fluid challenge, end-expiratory occlusion, tidal volume challenge (common practice). */
    dynamicTestMaxAgeMin: minutes(1440).default(60),
    /** IVC diameters (common practice: an echo finding is repeated when the state changes; 6 h). */
    ivcMaxAgeMin: minutes(2880).default(360),
    /** CVP and measured right atrial pressure (common practice, as vitals). */
    cvpMaxAgeMin: minutes(1440).default(60),
    /** Lactate (common practice: repeated every 2–6 h in shock). */
    lactateMaxAgeMin: minutes(2880).default(360),
    /** Capillary refill time (ANDROMEDA-SHOCK assessed it every 30 min, Hernández et al., JAMA 2019; window 60 min, common practice). */
    capillaryRefillMaxAgeMin: minutes(1440).default(60),
    /** Ventilation state, coded (common practice: charted at least every 4 h). */
    ventilationStateMaxAgeMin: minutes(2880).default(240),
    /** Heart rhythm, coded (common practice: charted at least every 4 h). */
    heartRhythmMaxAgeMin: minutes(2880).default(240),
    /** Tidal volume, set or delivered (common practice: ventilator charted hourly). */
    tidalVolumeMaxAgeMin: minutes(1440).default(60),
    /** Intra-abdominal pressure (common practice: intermittent bladder pressure every 4–6 h when monitored). */
    intraAbdominalPressureMaxAgeMin: minutes(2880).default(360),
    /** Chest open or closed, coded (common practice: changes only with surgery; 24 h). */
    chestStatusMaxAgeMin: minutes(10_080).default(1440),
    /** Body height for predicted body weight (common practice: recorded at admission; one year). */
    bodyHeightMaxAgeMin: minutes(5_256_000).default(525_600),
    /** Echo impression of LV function (common practice: one echo a day; 24 h). */
    echoImpressionMaxAgeMin: minutes(10_080).default(1440),

    // ── Response to the last fluid bolus (common practice, clinical-references §11) ──────────────────────────
    /** A bolus counts if it started within this many minutes before now and is completed (common practice). */
    lastBolusLookbackMin: minutes(1440).default(240),
    /** Smallest volume that counts as a bolus, mL (common practice: a fluid challenge is 250–500 mL). */
    bolusMinVolumeMl: z.number().min(1).max(5000).default(250),
    /** Longest infusion that counts as a bolus, minutes (common practice: given over 10–30 min; slower is not a challenge). */
    bolusMaxDurationMin: minutes(1440).default(60),
    /** Window before the bolus start whose readings form the baseline, minutes (common practice). */
    bolusPreWindowMin: minutes(240).default(30),
    /** Window after the bolus end whose readings form the response, minutes (common practice: the effect fades within about 30 min). */
    bolusPostWindowMin: minutes(240).default(30),
    /** Fewest readings each window needs for MAP and for heart rate (our choice: one reading is too noisy). */
    bolusMinPointsPerWindow: z.number().int().min(1).max(20).default(2),
    /** MAP rise that reads as a response, mmHg, ≥ (common practice: about 5–10 mmHg). */
    bolusMapRiseMmHg: z.number().min(0).max(50).default(5),
    /** Heart-rate fall that reads as a response, /min, ≥ (common practice: "falling heart rate"; our choice of 5/min). */
    bolusHrFallPerMin: z.number().min(0).max(50).default(5),
    /** Window before the start and after the end for capillary refill, lactate and urine output, minutes (common practice). */
    bolusSecondaryWindowMin: minutes(720).default(120),

    // ── PPV and SVV ─────────────────────────────────────────────────────────────────────────────────────────
    /** PPV ≥ this, percent: responsive (Michard et al., Am J Respir Crit Care Med 2000 [M]). Common practice reads ≥ 15–20 % as clear. */
    ppvThresholdPercent: percent().default(13),
    /** PPV below this, percent: unresponsive; from here up to the threshold is the grey zone (Cannesson et al., Anesthesiology 2011 [M]). */
    ppvGreyZoneLowPercent: percent().default(9),
    /** SVV ≥ this, percent: responsive (Marik et al., Crit Care Med 2009, pooled 11.6 ± 1.9 % [M]). */
    svvThresholdPercent: percent().default(11.6),
    /** SVV below this, percent: unresponsive; between this and the threshold: grey zone (our choice: pooled threshold − 1 SD, 11.6 − 1.9). */
    svvGreyZoneLowPercent: percent().default(9.7),
    /** Tidal volume needed for PPV/SVV validity, mL/kg PBW, ≥ (Monnet, Marik, Teboul, Ann Intensive Care 2016, Table 2). */
    minTidalVolumeMlPerKgPbw: z.number().min(0).max(20).default(8),
    /** HR/RR ratio needed for PPV/SVV validity, strictly > (De Backer et al., Anesthesiology 2009 [M citation]). */
    minHeartRateRespiratoryRateRatio: z.number().min(0).max(20).default(3.6),
    /** Intra-abdominal hypertension from this value, mmHg, ≥: PPV/SVV invalid (WSACS 2013, Kirkpatrick et al., Intensive Care Med 2013). */
    iahThresholdMmHg: z.number().min(0).max(40).default(12),

    // ── Dynamic tests ───────────────────────────────────────────────────────────────────────────────────────
    /** PLR: CO, CI, SV or VTI rise ≥ this, percent (Monnet, Marik, Teboul, Intensive Care Med 2016;42:1935). */
    plrFlowRisePercent: percent().default(10),
    /** PLR judged by pulse pressure: rise ≥ this, percent; weak, weighed as static (Monnet et al., Crit Care Med 2006 [M]). */
    plrPulsePressureRisePercent: percent().default(12),
    /** Mini fluid challenge (100 mL over 1 min): VTI, SV, CO or CI rise ≥ this, percent (Muller et al., Anesthesiology 2011;115:541). */
    miniFluidChallengeRisePercent: percent().default(10),
    /** End-expiratory occlusion: CI, CO or SV rise strictly > this, percent (Monnet et al., Crit Care Med 2009;37:951 [M]). */
    eeoFlowRisePercent: percent().default(5),
    /** End-expiratory occlusion by echo: VTI rise ≥ this, percent (echocardiographic EEO study, Crit Care 2018, PMC5804059; authors [M]). */
    eeoVtiRisePercent: percent().default(9),
    /** End-expiratory occlusion by pulse pressure: rise strictly > this, percent; weak, weighed as static (Monnet et al. 2009 [M]). */
    eeoPulsePressureRisePercent: percent().default(5),
    /** Tidal volume challenge (6 → 8 mL/kg PBW): absolute PPV rise ≥ this, points (Myatra et al., Crit Care Med 2017;45:415). */
    tidalVolumeChallengePpvRisePoints: z.number().min(0).max(30).default(3.5),
    /** Tidal volume challenge: absolute SVV rise ≥ this, points (Myatra et al. 2017 [M]). */
    tidalVolumeChallengeSvvRisePoints: z.number().min(0).max(30).default(2.5),

    // ── IVC ─────────────────────────────────────────────────────────────────────────────────────────────────
    /** Largest gap between the Dmax and Dmin readings that still counts as one measurement, minutes (our choice). */
    ivcPairToleranceMin: z.number().min(0).max(60).default(5),
    /** Spontaneous breathing: collapsibility strictly > this, percent, suggests response (Muller et al., Crit Care 2012;16:R188). */
    ivcCollapsibilityPercent: percent().default(40),
    /** Controlled ventilation: which distensibility index decides. */
    ivcDistensibilityMethod: z.enum(['barbier', 'feissel']).default('barbier'),
    /** Barbier distensibility strictly > this, percent: responsive; ≤: unresponsive (Barbier et al., Intensive Care Med 2004;30:1740). */
    ivcDistensibilityBarbierPercent: percent().default(18),
    /** Feissel variation strictly > this, percent: responsive; ≤: unresponsive (Feissel et al., Intensive Care Med 2004;30:1834 [M]). */
    ivcDistensibilityFeisselPercent: percent().default(12),
    /** IVC diameter cut, cm: ≤ is small, > is wide (Rudski et al., J Am Soc Echocardiogr 2010, 2.1 cm). */
    ivcDiameterCutCm: z.number().min(0.5).max(5).default(2.1),
    /** Small IVC collapsing strictly more than this, percent: static-extreme for (common practice §11; Rudski 2010 50 %). */
    ivcExtremeCollapsePercent: percent().default(50),
    /** Wide IVC collapsing strictly less than this, percent ("no respiratory variation"): static-extreme against (common practice §11; our reading: < 10 %). */
    ivcNoVariationPercent: percent().default(10),

    // ── CVP, at the extremes only (common practice §11; mid-range is no evidence: Marik 2008, 2013) ─────────
    /** CVP ≤ this, mmHg: static-extreme for (common practice: about 2–3 mmHg or less). */
    cvpLowMmHg: z.number().min(-10).max(20).default(3),
    /** CVP ≥ this, mmHg: static-extreme against (common practice: about 12 mmHg or more). */
    cvpHighMmHg: z.number().min(0).max(40).default(12),

    // ── Perfusion context (never decides responsiveness) ────────────────────────────────────────────────────
    /** Capillary refill strictly > this, seconds, is prolonged (ANDROMEDA-SHOCK, Hernández et al., JAMA 2019;321:654). */
    capillaryRefillMaxNormalS: z.number().min(0).max(20).default(3),
    /** Lactate strictly > this, mmol/L, is raised (Sepsis-3, Singer et al., JAMA 2016;315:801). */
    lactateMaxNormalMmolL: z.number().min(0).max(20).default(2),
    /** MAP strictly below this, mmHg, is below target (Surviving Sepsis Campaign 2021, Evans et al., Intensive Care Med 2021 [M grade]). */
    mapTargetMmHg: z.number().min(30).max(150).default(65),
    /** Shock index strictly > this is raised (Koch et al., Open Access Emerg Med 2019;11:179). */
    shockIndexHigh: z.number().min(0).max(5).default(1.0),

    // ── Combination ─────────────────────────────────────────────────────────────────────────────────────────
    /** Static (non-extreme) findings that must agree, with none against, before they decide (our choice; one never decides). */
    staticAgreementMinCount: z.number().int().min(2).max(10).default(2),
  })
  .superRefine((t, ctx) => {
    const band = (low: keyof typeof t, high: keyof typeof t, strict: boolean) => {
      const lo = t[low] as number;
      const hi = t[high] as number;
      if (strict ? lo >= hi : lo > hi) ctx.addIssue({ code: 'custom', path: [low], message: `${String(low)} must be ${strict ? 'below' : 'at most'} ${String(high)}` });
    };
    band('ppvGreyZoneLowPercent', 'ppvThresholdPercent', false);
    band('svvGreyZoneLowPercent', 'svvThresholdPercent', false);
    band('cvpLowMmHg', 'cvpHighMmHg', true);
  });

export type ResponsivenessThresholds = z.infer<typeof responsivenessThresholdsSchema>;

/** The defaults, parsed once. */
export const DEFAULT_RESPONSIVENESS_THRESHOLDS: ResponsivenessThresholds = responsivenessThresholdsSchema.parse({});
