/**
 * KDIGO acute kidney injury staging (KDIGO Clinical Practice Guideline for Acute Kidney Injury,
 * Kidney Int Suppl 2012;2:1–138). Creatinine in mg/dL, urine output in mL/kg/h.
 */

export type KdigoStage = 0 | 1 | 2 | 3;

/** Urine output rate in mL/kg/h over the hours the charting covers. */
export function urineOutputMlPerKgPerHour(volumeMl: number, weightKg: number, hours: number): number {
  if (!(weightKg > 0)) throw new RangeError('weightKg must be > 0');
  if (!(hours > 0)) throw new RangeError('hours must be > 0');
  return volumeMl / weightKg / hours;
}

/** A trailing window of urine output: its length and the mean rate over it. */
export interface UrineWindow {
  hours: number;
  mlPerKgPerHour: number;
}

/**
 * KDIGO 2012 stage from urine output: stage 1 < 0.5 mL/kg/h for 6–12 h; stage 2 < 0.5 for ≥ 12 h;
 * stage 3 < 0.3 for ≥ 24 h or anuria for ≥ 12 h. The rate of a window is its mean (KDIGO does not say
 * whether every hour or the mean must meet the criterion; the mean is the common reading).
 * Returns undefined when no window is at least 6 h long (the criterion cannot be judged).
 */
export function kdigoStageFromUrineOutput(windows: readonly UrineWindow[]): KdigoStage | undefined {
  const judged = windows.filter((w) => w.hours >= 6);
  if (judged.length === 0) return undefined;
  let stage: KdigoStage = 0;
  for (const w of judged) {
    if ((w.hours >= 24 && w.mlPerKgPerHour < 0.3) || (w.hours >= 12 && w.mlPerKgPerHour === 0)) return 3;
    if (w.hours >= 12 && w.mlPerKgPerHour < 0.5) stage = 2;
    else if (w.mlPerKgPerHour < 0.5 && stage < 1) stage = 1;
  }
  return stage;
}

export interface CreatinineHistory {
  /** Latest serum creatinine, mg/dL. */
  currentMgDl: number;
  /** Lowest value in the 48 h before the latest, mg/dL (absolute-rise criterion). */
  lowest48hMgDl?: number | undefined;
  /** Lowest value in the 7 days before the latest, mg/dL (baseline for the ratio). */
  lowest7dMgDl?: number | undefined;
}

/**
 * KDIGO 2012 stage from serum creatinine: AKI when the rise is ≥ 0.3 mg/dL (26.5 µmol/L) within 48 h or
 * the ratio to the baseline (here the lowest value in 7 days) is ≥ 1.5. Stage 1: 1.5–1.9× or ≥ 0.3 rise;
 * stage 2: 2.0–2.9×; stage 3: ≥ 3.0× or a rise to ≥ 4.0 mg/dL. (Renal replacement therapy, also stage 3,
 * is not a creatinine criterion and is not judged here.)
 */
export function kdigoStageFromCreatinine(h: CreatinineHistory): KdigoStage {
  const rise48 = h.lowest48hMgDl !== undefined ? h.currentMgDl - h.lowest48hMgDl : undefined;
  const ratio = h.lowest7dMgDl !== undefined && h.lowest7dMgDl > 0 ? h.currentMgDl / h.lowest7dMgDl : undefined;
  // Rounding guard: 1.3 − 1.0 is 0.30000000000000004 in binary floating point; a hair under 0.3 is not a rise.
  const aki = (rise48 !== undefined && rise48 >= 0.3 - 1e-9) || (ratio !== undefined && ratio >= 1.5 - 1e-9);
  if (!aki) return 0;
  if ((ratio !== undefined && ratio >= 3 - 1e-9) || h.currentMgDl >= 4.0) return 3;
  if (ratio !== undefined && ratio >= 2 - 1e-9) return 2;
  return 1;
}
