/**
 * Thresholds of the need (perfusion) and phase judgements. Every field has a default with its source; a site may
 * override any of them (`thresholds.need`). Windows are shared: ../common/windows.ts.
 */
import { z } from 'zod';

export const needThresholdsSchema = z.strictObject({
  /** MAP strictly below this, mmHg, is below target (Surviving Sepsis Campaign 2021, Evans L et al., Intensive Care Med 2021;47:1181). */
  mapTargetMmHg: z.number().min(30).max(150).default(65),
  /** Lactate strictly above this, mmol/L, is raised (Sepsis-3, Singer M et al., JAMA 2016;315:801). */
  lactateMaxNormalMmolL: z.number().min(0).max(20).default(2),
  /** Capillary refill strictly above this, seconds, is prolonged (ANDROMEDA-SHOCK, Hernández G et al., JAMA 2019;321:654). */
  capillaryRefillMaxNormalS: z.number().min(0).max(20).default(3),
  /** Urine output strictly below this, mL/kg/h, over `urineHours` is low (KDIGO 2012, Kidney Int Suppl 2012;2:1). */
  urineLowMlPerKgPerHour: z.number().min(0).max(5).default(0.5),
  /** Hours of urine output judged (KDIGO 2012: 6 h). */
  urineHours: z.number().min(1).max(24).default(6),
  /** A vasoactive started or raised within this many minutes is rising support (common practice). */
  vasopressorRiseLookbackMin: z.number().int().min(10).max(1440).default(120),
  /** Shock index strictly above this is raised; shown as context only (Koch E et al., Open Access Emerg Med 2019;11:179). */
  shockIndexHigh: z.number().min(0).max(5).default(1.0),
  /**
   * Early resuscitation: within this many hours of the onset of shock (docs/clinical-logic: "first hours"; SSC 2021 judges the first 3 h;
   * our default 6 h).
   */
  earlyPhaseHours: z.number().min(1).max(48).default(6),
  /** Lactate at or above this, mmol/L, marks shock for the phase (SSC 2021: lactate ≥ 4 mmol/L). */
  earlyLactateMmolL: z.number().min(0).max(20).default(4),
  /**
   * Early resuscitation ends once this much IV fluid per kg admission weight has been given (SSC 2021: ≥ 30 mL/kg in the first 3 h, weak,
   * low quality).
   */
  earlyMlPerKg: z.number().min(1).max(100).default(30),
  /** Without an admission time, shock onset is the earliest hypotension or lactate ≥ 4 within this many hours (our choice). */
  onsetLookbackHours: z.number().min(1).max(72).default(24),
});
export type NeedThresholds = z.infer<typeof needThresholdsSchema>;
export const DEFAULT_NEED_THRESHOLDS: NeedThresholds = needThresholdsSchema.parse({});
