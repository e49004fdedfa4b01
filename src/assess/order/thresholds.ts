/**
 * Figures used to describe an ordered bolus. Every field has a default and its source, so
 * `orderThresholdsSchema.parse({})` gives them; unknown keys are rejected.
 */
import { z } from 'zod';

export const orderThresholdsSchema = z
  .strictObject({
    /**
     * Share of a crystalloid left in the vessels once distributed: about a quarter (published: saline PV:ISF ≈ 1:3, Ernest D et al., Crit
     * Care Med 1999;27:46; 9 % after cardiac surgery, Ernest 2001).
     */
    crystalloidRetainedFraction: z.number().gt(0).max(1).default(0.25),
    /** The bedside rule of thumb, shown beside the published figure only: about a third (common practice). */
    crystalloidRuleOfThumbFraction: z
      .number()
      .gt(0)
      .max(1)
      .default(1 / 3),
    /** Crystalloid plasma expansion while infusing: 50–60 % (Hahn RG, Acta Anaesthesiol Scand 2020). */
    crystalloidDuringInfusionLowFraction: z.number().gt(0).max(1).default(0.5),
    crystalloidDuringInfusionHighFraction: z.number().gt(0).max(1).default(0.6),
    /** Crystalloid plasma expansion 30 min after the end: 15–20 % (Hahn 2020). */
    crystalloidThirtyMinutesAfterLowFraction: z.number().gt(0).max(1).default(0.15),
    crystalloidThirtyMinutesAfterHighFraction: z.number().gt(0).max(1).default(0.2),
    /** Most of a crystalloid bolus has left the circulation within about 4–6 h (common practice). */
    crystalloidMostGoneLowHours: z.number().positive().default(4),
    crystalloidMostGoneHighHours: z.number().positive().default(6),
    /** Iso-oncotic albumin (4–5 %) expands plasma by about the volume infused (Hahn 2020; Ernest 1999). */
    albuminIsoOncoticFactor: z.number().positive().default(1),
    /**
     * Hyper-oncotic albumin (20–25 %) expands plasma by about twice the volume infused (Crit Care 2020, doi 10.1186/s13054-020-02855-0).
     */
    albuminHyperOncoticFactor: z.number().positive().default(2),
    /** Colloids: intravascular half-life about 2–3 h (Hahn 2020). */
    colloidHalfLifeLowHours: z.number().positive().default(2),
    colloidHalfLifeHighHours: z.number().positive().default(3),
    /** Estimates are rounded to this step so that they do not look more precise than they are (common practice). */
    estimateRoundingMl: z.number().positive().default(10),
    /** SSC 2021: at least 30 mL/kg crystalloid within the first 3 h (Evans L et al., Intensive Care Med 2021; weak, low quality). */
    sepsisMlPerKg: z.number().positive().default(30),
    sepsisWindowHours: z.number().positive().default(3),
    /** Weight for per-kg figures: the latest weight up to this old, else the admission weight (common practice). */
    weightMaxAgeHours: z.number().positive().default(168),
    /** A weight up to this long before admission counts as the admission weight (common practice). */
    admissionWeightWindowHours: z.number().positive().default(24),
    /** Without an admission time, the earliest weight within this many hours is used (common practice). */
    balanceFallbackLookbackHours: z.number().positive().default(168),
  })
  .superRefine((t, ctx) => {
    const pairs: Array<[keyof typeof t, keyof typeof t]> = [
      ['crystalloidDuringInfusionLowFraction', 'crystalloidDuringInfusionHighFraction'],
      ['crystalloidThirtyMinutesAfterLowFraction', 'crystalloidThirtyMinutesAfterHighFraction'],
      ['crystalloidMostGoneLowHours', 'crystalloidMostGoneHighHours'],
      ['colloidHalfLifeLowHours', 'colloidHalfLifeHighHours'],
    ];
    for (const [lo, hi] of pairs) {
      if (t[lo] > t[hi]) ctx.addIssue({ code: 'custom', path: [lo], message: `${lo} must not exceed ${hi}` });
    }
  });

export type OrderThresholds = z.infer<typeof orderThresholdsSchema>;
export const DEFAULT_ORDER_THRESHOLDS: OrderThresholds = orderThresholdsSchema.parse({});
