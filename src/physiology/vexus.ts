/**
 * Venous excess ultrasound (VExUS) grading: Beaubien-Souligny W et al., Ultrasound J 2020;12:16.
 * Grade 0: IVC < 2 cm; 1: IVC ≥ 2 cm with normal or mildly abnormal Doppler patterns; 2: IVC ≥ 2 cm with
 * one severely abnormal pattern; 3: IVC ≥ 2 cm with two or more severely abnormal patterns.
 */

export type DopplerSeverity = 'normal' | 'mild' | 'severe';
export type VexusGrade = 0 | 1 | 2 | 3;

/** Portal pulsatility fraction PF = (Vmax − Vmin) / Vmax × 100, velocities in cm/s. */
export function portalPulsatilityFractionPercent(vmaxCmPerS: number, vminCmPerS: number): number {
  if (!(vmaxCmPerS > 0)) throw new RangeError('vmaxCmPerS must be > 0');
  return ((vmaxCmPerS - vminCmPerS) / vmaxCmPerS) * 100;
}

/** Portal pattern: normal PF < 30 %, mild 30–49 %, severe ≥ 50 % (Beaubien-Souligny 2020). */
export function portalSeverity(pfPercent: number, mildPercent = 30, severePercent = 50): DopplerSeverity {
  if (pfPercent >= severePercent) return 'severe';
  if (pfPercent >= mildPercent) return 'mild';
  return 'normal';
}

/** Hepatic vein: normal S > D; mild S < D; severe S-wave reversal (Beaubien-Souligny 2020). */
export function hepaticSeverity(pattern: 'normal' | 'mild' | 'severe'): DopplerSeverity {
  return pattern;
}

/** Intrarenal vein: continuous normal; discontinuous biphasic mild; discontinuous monophasic severe. */
export function renalSeverity(pattern: 'continuous' | 'biphasic' | 'monophasic'): DopplerSeverity {
  const severity = { continuous: 'normal', biphasic: 'mild', monophasic: 'severe' } as const;
  return severity[pattern];
}

export interface VexusParts {
  ivcMaxCm: number;
  hepatic?: DopplerSeverity | undefined;
  portal?: DopplerSeverity | undefined;
  renal?: DopplerSeverity | undefined;
}

export interface VexusResult {
  /** Lowest grade the known parts allow. */
  min: VexusGrade;
  /** Highest grade the known parts allow (equal to min when nothing missing could change it). */
  max: VexusGrade;
  severeCount: number;
  /** Doppler parts not given. */
  missing: Array<'hepatic' | 'portal' | 'renal'>;
}

function gradeOf(ivcWide: boolean, severe: number): VexusGrade {
  if (!ivcWide) return 0;
  if (severe >= 2) return 3;
  return severe === 1 ? 2 : 1;
}

/**
 * VExUS grade from its parts. Missing Doppler parts leave a range: the grade is definite when
 * min === max (e.g. IVC < 2 cm, or two severe patterns already known).
 */
export function vexusGrade(parts: VexusParts, ivcThresholdCm = 2): VexusResult {
  const ivcWide = parts.ivcMaxCm >= ivcThresholdCm;
  const known = { hepatic: parts.hepatic, portal: parts.portal, renal: parts.renal };
  const missing = (Object.keys(known) as Array<keyof typeof known>).filter((k) => known[k] === undefined);
  const severeCount = Object.values(known).filter((s) => s === 'severe').length;
  return {
    min: gradeOf(ivcWide, severeCount),
    max: gradeOf(ivcWide, severeCount + missing.length),
    severeCount,
    missing,
  };
}
