/**
 * Thresholds: one place, each with its source; a site may override any of them in the configuration file
 * (`thresholds`), validated here. The active thresholds are part of the rules version.
 */
import { z } from 'zod';

export const perfusionThresholdsSchema = z.object({
  /** Initial MAP target, mmHg: Surviving Sepsis Campaign 2021 (Evans et al., Intensive Care Med 2021;47:1181). */
  mapTargetMmHg: z.number().min(40).max(120).default(65),
  /** Lactate above this, mmol/L, signals hypoperfusion: Sepsis-3 (Singer et al., JAMA 2016;315:801). */
  lactateHighMmolL: z.number().min(0.5).max(20).default(2),
  /** Shock index above this: Koch et al., Open Access Emerg Med 2019;11:179. */
  shockIndexHigh: z.number().min(0.3).max(3).default(1.0),
  /** Vital signs older than this are stale, minutes (common practice). */
  vitalsWindowMinutes: z.number().int().min(5).max(1440).default(60),
  /** Lactate older than this is stale, minutes (common practice: lactate is usually repeated every 2–6 h in shock). */
  lactateWindowMinutes: z.number().int().min(30).max(2880).default(360),
});
export type PerfusionThresholds = z.infer<typeof perfusionThresholdsSchema>;

export const thresholdsSchema = z
  .object({
    perfusion: perfusionThresholdsSchema.default(perfusionThresholdsSchema.parse({})),
  })
  .strict();
export type Thresholds = z.infer<typeof thresholdsSchema>;

/** Defaults merged with a site's overrides; throws a ZodError naming the bad key. */
export function resolveThresholds(overrides: unknown = {}): Thresholds {
  return thresholdsSchema.parse(overrides ?? {});
}
