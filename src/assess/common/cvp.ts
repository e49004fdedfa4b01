/**
 * Central venous pressure: one reading, one window (windows.cvpMin, docs/clinical-logic) for both questions, and the two findings
 * made from it. A number counts once (docs/clinical-logic): when the responsiveness verdict rests on the CVP, the tolerance finding
 * from the same CVP is turned into context (tolerance/verdict.ts, countOnce).
 *   responsiveness.cvp — extremes only, static (corroborates, never decides alone): ≤ 3 mmHg for, ≥ 12 mmHg against
 *                        (common practice; no CVP value predicts response well: Eskesen TG et al., Intensive Care
 *                        Med 2016;42:324; Marik PE et al., Chest 2008;134:172). Measured RA pressure stands in.
 *   tolerance.cvp      — CVP ≥ 12 mmHg a moderate venous limit (common practice; Boyd JH et al., Crit Care Med
 *                        2011;39:259: CVP > 12 mmHg at 12 h with the highest mortality).
 */
import type { Measurement, PatientSnapshot } from '../../snapshot/types.js';
import type { Evidence } from './finding.js';
import { evidenceOfMeasurement, latestReading, type Selection } from './select.js';
import type { Windows } from './windows.js';

export const CVP_RESPONSIVENESS_SOURCE =
  'CVP extremes: common practice; no CVP value predicts fluid response well: Eskesen TG et al., Intensive Care Med 2016;42:324; Marik PE et al., Chest 2008;134:172; Marik PE, Cavallazzi R, Crit Care Med 2013;41:1774';
export const CVP_TOLERANCE_SOURCE =
  'High CVP ≥ 12 mmHg (common practice; Boyd JH et al., Crit Care Med 2011;39:259); limits of CVP: Marik PE et al., Chest 2008;134:172';

export interface CvpReading {
  sel: Selection<Measurement>;
  /** "CVP", or "Right atrial pressure" when a measured RA pressure stands in. */
  label: string;
}

/** The CVP for both questions: the newest CVP in the window, else a measured right atrial pressure in it. */
export function latestCvp(s: PatientSnapshot, now: Date, w: Windows): CvpReading {
  const cvp = latestReading(s, 'cvp', now, w.cvpMin);
  const rap = latestReading(s, 'rightAtrialPressure', now, w.cvpMin);
  if (cvp.state !== 'fresh' && rap.state === 'fresh') return { sel: rap, label: 'Right atrial pressure' };
  if (cvp.state === 'missing' && rap.state !== 'missing') return { sel: rap, label: 'Right atrial pressure' };
  return { sel: cvp, label: 'CVP' };
}

export function cvpEvidence(m: Measurement, now: Date): Evidence {
  return evidenceOfMeasurement(m, now);
}
