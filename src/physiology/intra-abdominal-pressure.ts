/**
 * Intra-abdominal hypertension (World Society of the Abdominal Compartment Syndrome consensus,
 * Kirkpatrick AW et al., Intensive Care Med 2013;39:1190–1206). Pressures in mmHg.
 */

export type IahGrade = 0 | 1 | 2 | 3 | 4;

/**
 * WSACS 2013 grade: IAH is IAP ≥ 12 mmHg; grade I 12–15, II 16–20, III 21–25, IV > 25.
 * Between the integer bands (e.g. 15.5) the higher grade applies, so that grade IV is "> 25" exactly.
 */
export function iahGrade(iapMmHg: number, iahThresholdMmHg = 12): IahGrade {
  if (iapMmHg < iahThresholdMmHg) return 0;
  if (iapMmHg <= 15) return 1;
  if (iapMmHg <= 20) return 2;
  if (iapMmHg <= 25) return 3;
  return 4;
}

/** Abdominal perfusion pressure APP = MAP − IAP (WSACS 2013). */
export function abdominalPerfusionPressure(mapMmHg: number, iapMmHg: number): number {
  return mapMmHg - iapMmHg;
}

/** Renal filtration gradient FG = MAP − 2 × IAP (WSACS 2013). */
export function filtrationGradient(mapMmHg: number, iapMmHg: number): number {
  return mapMmHg - 2 * iapMmHg;
}

/** Roman numeral of a grade, for text ("grade II"). */
export function iahGradeLabel(grade: IahGrade): string {
  return ['none', 'I', 'II', 'III', 'IV'][grade] ?? String(grade);
}
