/**
 * Rule tolerance.vexus: venous excess ultrasound grade from its parts (Beaubien-Souligny W et al.,
 * Ultrasound J 2020;12:16). IVC ≥ 2 cm opens the grading; hepatic vein (coded normal/mild/severe), portal
 * pulsatility fraction (mild 30–49 %, severe ≥ 50 %) and intrarenal vein (biphasic mild, monophasic
 * severe). Grade 3 (≥ 2 severe patterns): severe limit and a sign of severe congestion; grade 2: moderate.
 * Missing Doppler parts leave a range; the finding uses the lowest grade the known parts allow.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { hepaticSeverity, portalSeverity, renalSeverity, vexusGrade, type DopplerSeverity } from '../../physiology/vexus.js';
import type { Evidence, Finding } from '../types.js';
import { assessed, notAssessed } from './finding.js';
import { codedEvidenceOf, evidenceOf, fmt, latestCodedOf, latestOf, unusableReason } from './select.js';
import type { ToleranceThresholds } from './thresholds.js';

export const VEXUS = 'tolerance.vexus';
const SOURCE = 'VExUS: Beaubien-Souligny W et al., Ultrasound J 2020;12:16 (doi 10.1186/s13089-020-00163-w)';

const PART_LABEL = { hepatic: 'hepatic vein', portal: 'portal vein', renal: 'intrarenal vein' } as const;

export function vexusRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): Finding[] {
  const win = t.ultrasoundFreshMinutes;
  const ivc = latestOf(snapshot, 'ivcDiameterMax', now, win);
  if (ivc.state !== 'fresh') {
    return [notAssessed(VEXUS, 'venous', 'VExUS not assessed', unusableReason('IVC diameter', ivc, now, win), SOURCE,
      ivc.state === 'stale' ? [evidenceOf(ivc.item, now)] : [])];
  }
  const evidence: Evidence[] = [evidenceOf(ivc.item, now)];
  const hv = latestCodedOf(snapshot, 'hepaticVeinPattern', now, win);
  const pv = latestOf(snapshot, 'portalPulsatility', now, win);
  const rv = latestCodedOf(snapshot, 'renalVeinPattern', now, win);

  let hepatic: DopplerSeverity | undefined;
  if (hv.state === 'fresh' && (hv.item.answer === 'normal' || hv.item.answer === 'mild' || hv.item.answer === 'severe')) {
    hepatic = hepaticSeverity(hv.item.answer);
    evidence.push(codedEvidenceOf(hv.item, now));
  }
  let portal: DopplerSeverity | undefined;
  if (pv.state === 'fresh') {
    portal = portalSeverity(pv.item.value, t.portalMildPercent, t.portalSeverePercent);
    evidence.push(evidenceOf(pv.item, now));
  }
  let renal: DopplerSeverity | undefined;
  if (rv.state === 'fresh' && (rv.item.answer === 'continuous' || rv.item.answer === 'biphasic' || rv.item.answer === 'monophasic')) {
    renal = renalSeverity(rv.item.answer);
    evidence.push(codedEvidenceOf(rv.item, now));
  }

  const g = vexusGrade({ ivcMaxCm: ivc.item.value, hepatic, portal, renal }, t.vexusIvcCm);
  const ivcText = `IVC ${fmt(ivc.item.value, 1)} cm`;
  const partsText = [
    hepatic && `hepatic ${hepatic}`,
    portal && `portal ${portal} (PF ${fmt(pv.state === 'fresh' ? pv.item.value : 0)} %)`,
    renal && `intrarenal ${renal}`,
  ].filter(Boolean).join(', ');
  const values = {
    vexusGradeMin: g.min, vexusGradeMax: g.max, severePatterns: g.severeCount, ivcMaxCm: ivc.item.value,
    ...(hepatic ? { hepatic } : {}), ...(portal ? { portal } : {}), ...(renal ? { renal } : {}),
    missingParts: g.missing.join(','),
  };
  if (g.min > 0 && g.missing.length === 3) {
    return [notAssessed(VEXUS, 'venous', 'VExUS not assessed',
      `${ivcText} (≥ ${t.vexusIvcCm} cm) but no recent hepatic, portal or intrarenal Doppler pattern`, SOURCE, evidence, values)];
  }
  const definite = g.min === g.max;
  const limit = g.min >= 3 ? 'severe' : g.min === 2 ? 'moderate' : 'none';
  const missingText = definite || g.missing.length === 0 ? '' : `; not recorded: ${g.missing.map((p) => PART_LABEL[p]).join(', ')}`;
  return [assessed({
    ruleId: VEXUS, domain: 'venous', limit, congestionSign: g.min >= 3,
    text: `VExUS ${definite ? 'grade' : 'at least grade'} ${g.min}${g.min >= 3 ? ' (severe venous congestion)' : ''}: ${ivcText}${partsText ? `, ${partsText}` : ''}${missingText}`,
    values: { ...values, vexusGrade: g.min, definite }, evidence, source: SOURCE,
  })];
}
