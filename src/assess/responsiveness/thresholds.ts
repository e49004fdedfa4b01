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
    // Freshness windows are shared with the other questions: ../common/windows.ts.

    // ── Response to the last fluid bolus ───────────────────────────────────────────────────────────────────
    /** A bolus counts if it started within this many minutes before now and is completed (common practice). */
    lastBolusLookbackMin: minutes(1440).default(240),
    /** Smallest volume that counts as a bolus, mL (common practice: a fluid challenge is 250–500 mL). */
    bolusMinVolumeMl: z.number().min(1).max(5000).default(250),
    /** Longest infusion that counts as a bolus, minutes (common practice: given over 10–30 min; slower is not a challenge). */
    bolusMaxDurationMin: minutes(1440).default(60),
    /**
     * Dense monitor data: flow readings no further apart than this, minutes (Aya HD et al., Crit Care Med 2016;44:880: readings every few
     * minutes).
     */
    denseMaxGapMin: z.number().min(1).max(30).default(5),
    /**
     * A flow reading this close after the end of the bolus, minutes: the response peaks ~1 min after the end and fades within ~10 min (Aya
     * 2016).
     */
    flowAfterEndMaxMin: z.number().min(1).max(30).default(10),
    /** A flow reading this close before the start of the bolus serves as baseline, minutes (our choice, as flowAfterEndMaxMin). */
    flowBeforeStartMaxMin: z.number().min(1).max(30).default(10),
    /** Flow (CO, CI, SV) rise that reads as a response to the bolus, percent, ≥ (Aya 2016 used a 10 % rise in cardiac output [M]). */
    bolusFlowRisePercent: percent().default(10),
    /** Hourly charting: baseline = the newest MAP/HR within this many minutes before the start (docs/clinical-logic: hourly vitals). */
    bolusPreWindowMin: minutes(240).default(90),
    /** Hourly charting: response = readings within this many minutes after the end (docs/clinical-logic: hourly vitals). */
    bolusPostWindowMin: minutes(240).default(90),
    /** MAP rise that reads as a response, mmHg, ≥ (common practice: about 5–10 mmHg). Weak static marker (docs/clinical-logic). */
    bolusMapRiseMmHg: z.number().min(0).max(50).default(5),
    /** Heart-rate fall that reads as a response, /min, ≥ (common practice: "falling heart rate"; our choice of 5/min). */
    bolusHrFallPerMin: z.number().min(0).max(50).default(5),
    /** Window before the start and after the end for capillary refill, lactate and urine output, minutes (common practice). */
    bolusSecondaryWindowMin: minutes(720).default(120),

    // ── PPV and SVV ─────────────────────────────────────────────────────────────────────────────────────────
    /** PPV ≥ this, percent: responsive (Michard et al., Am J Respir Crit Care Med 2000 [M]). Common practice reads ≥ 15–20 % as clear. */
    ppvThresholdPercent: percent().default(13),
    /**
     * PPV below this, percent: unresponsive; from here up to the threshold is the grey zone (Cannesson et al., Anesthesiology 2011 [M]).
     */
    ppvGreyZoneLowPercent: percent().default(9),
    /** SVV ≥ this, percent: responsive (Marik et al., Crit Care Med 2009, pooled 11.6 ± 1.9 % [M]). */
    svvThresholdPercent: percent().default(11.6),
    /**
     * SVV below this, percent: unresponsive; between this and the threshold: grey zone (our choice: pooled threshold − 1 SD, 11.6 − 1.9).
     */
    svvGreyZoneLowPercent: percent().default(9.7),
    /** Tidal volume needed for PPV/SVV validity, mL/kg PBW, ≥ (Monnet, Marik, Teboul, Ann Intensive Care 2016, Table 2). */
    minTidalVolumeMlPerKgPbw: z.number().min(0).max(20).default(8),
    /** HR/RR ratio needed for PPV/SVV validity, strictly > (De Backer et al., Anesthesiology 2009 [M citation]). */
    minHeartRateRespiratoryRateRatio: z.number().min(0).max(20).default(3.6),
    /**
     * Intra-abdominal hypertension from this value, mmHg, ≥: a high PPV/SVV is doubtful (WSACS 2013; false positives: Jacques D et al.,
     * Crit Care 2011 [M]).
     */
    iahThresholdMmHg: z.number().min(0).max(40).default(12),
    /**
     * A cardiac output, cardiac index or stroke volume reading this recent means a flow monitor is in use, minutes (our choice): PLR is
     * offered, else a mini fluid challenge with VTI (docs/clinical-logic).
     */
    flowMonitorRecentMin: minutes(1440).default(240),

    // ── Dynamic tests ───────────────────────────────────────────────────────────────────────────────────────
    /** PLR: CO, CI, SV or VTI rise ≥ this, percent (Monnet, Marik, Teboul, Intensive Care Med 2016;42:1935). */
    plrFlowRisePercent: percent().default(10),
    /** PLR judged by pulse pressure: rise ≥ this, percent; weak, weighed as static (Monnet et al., Crit Care Med 2006 [M]). */
    plrPulsePressureRisePercent: percent().default(12),
    /** Mini fluid challenge (100 mL over 1 min): VTI, SV, CO or CI rise ≥ this, percent (Muller et al., Anesthesiology 2011;115:541). */
    miniFluidChallengeRisePercent: percent().default(10),
    /** End-expiratory occlusion: CI, CO or SV rise strictly > this, percent (Monnet et al., Crit Care Med 2009;37:951 [M]). */
    eeoFlowRisePercent: percent().default(5),
    /**
     * End-expiratory occlusion by echo: VTI rise ≥ this, percent (echocardiographic EEO study, Crit Care 2018, PMC5804059; authors [M]).
     */
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
    /**
     * Wide IVC (> ivcDiameterCutCm) collapsing strictly less than this, percent ("no respiratory variation"): static against (common
     * practice; our reading: < 10 %).
     */
    ivcNoVariationPercent: percent().default(10),

    // ── CVP, at the extremes only, static (common practice; it never decides alone: Eskesen TG et al., Intensive Care Med 2016;42:324) ─
    /** CVP ≤ this, mmHg: static-extreme for (common practice: about 2–3 mmHg or less). */
    cvpLowMmHg: z.number().min(-10).max(20).default(3),
    /** CVP ≥ this, mmHg: static-extreme against (common practice: about 12 mmHg or more). */
    cvpHighMmHg: z.number().min(0).max(40).default(12),

    // ── Combination ─────────────────────────────────────────────────────────────────────────────────────────
    /**
     * Static markers that must agree, with none against, for a low-confidence verdict (docs/clinical-logic: two agreeing statics at most
     * give low confidence).
     */
    staticAgreementMinCount: z.number().int().min(2).max(10).default(2),
  })
  .superRefine((t, ctx) => {
    const band = (low: keyof typeof t, high: keyof typeof t, strict: boolean) => {
      const lo = t[low] as number;
      const hi = t[high] as number;
      if (strict ? lo >= hi : lo > hi)
        ctx.addIssue({ code: 'custom', path: [low], message: `${String(low)} must be ${strict ? 'below' : 'at most'} ${String(high)}` });
    };
    band('ppvGreyZoneLowPercent', 'ppvThresholdPercent', false);
    band('svvGreyZoneLowPercent', 'svvThresholdPercent', false);
    band('cvpLowMmHg', 'cvpHighMmHg', true);
  });

export type ResponsivenessThresholds = z.infer<typeof responsivenessThresholdsSchema>;

/** The defaults, parsed once. */
export const DEFAULT_RESPONSIVENESS_THRESHOLDS: ResponsivenessThresholds = responsivenessThresholdsSchema.parse({});
