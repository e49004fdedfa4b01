/**
 * Rule tolerance.vexus: venous excess ultrasound grade from its parts (Beaubien-Souligny W et al.,
 * Ultrasound J 2020;12:16). IVC ≥ 2 cm opens the grading; hepatic vein (coded normal/mild/severe), portal
 * pulsatility fraction (mild 30–49 %, severe ≥ 50 %) and intrarenal vein (biphasic mild, monophasic
 * severe). Grade 3 (≥ 2 severe patterns): severe limit and a sign of severe congestion; grade 2: moderate.
 * Missing Doppler parts leave a range; the finding uses the lowest grade the known parts allow.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import { hepaticSeverity, portalSeverity, renalSeverity, vexusGrade, type DopplerSeverity } from '../../physiology/vexus.js';
import type { Evidence, ToleranceFinding } from '../common/finding.js';
import { assessed, limitFrom, notAssessed, unusableTolerance } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { DEFAULT_WINDOWS, type Windows } from '../common/windows.js';
import { evidenceOfCoded, evidenceOfMeasurement, latestCoded, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';

export const VEXUS = 'tolerance.vexus';
const SOURCE = 'VExUS: Beaubien-Souligny W et al., Ultrasound J 2020;12:16 (doi 10.1186/s13089-020-00163-w)';

const PART_LABEL = { hepatic: 'hepatic vein', portal: 'portal vein', renal: 'intrarenal vein' } as const;

export function vexusRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds, w: Windows = DEFAULT_WINDOWS): ToleranceFinding[] {
  const win = t.ultrasoundFreshMinutes;
  const ivc = latestReading(snapshot, 'ivcDiameterMax', now, w.ivcMin);
  if (ivc.state !== 'fresh') {
    return [unusableTolerance(ivc, { ruleId: VEXUS, domain: 'venous', label: 'VExUS', source: SOURCE, now })];
  }
  const evidence: Evidence[] = [evidenceOfMeasurement(ivc.item, now)];
  const hv = latestCoded(snapshot, 'hepaticVeinPattern', now, win);
  const pv = latestReading(snapshot, 'portalPulsatility', now, win);
  const rv = latestCoded(snapshot, 'renalVeinPattern', now, win);

  let hepatic: DopplerSeverity | undefined;
  if (hv.state === 'fresh' && (hv.item.answer === 'normal' || hv.item.answer === 'mild' || hv.item.answer === 'severe')) {
    hepatic = hepaticSeverity(hv.item.answer);
    evidence.push(evidenceOfCoded(hv.item, now));
  }
  let portal: DopplerSeverity | undefined;
  if (pv.state === 'fresh') {
    portal = portalSeverity(pv.item.value, t.portalMildPercent, t.portalSeverePercent);
    evidence.push(evidenceOfMeasurement(pv.item, now));
  }
  let renal: DopplerSeverity | undefined;
  if (rv.state === 'fresh' && (rv.item.answer === 'continuous' || rv.item.answer === 'biphasic' || rv.item.answer === 'monophasic')) {
    renal = renalSeverity(rv.item.answer);
    evidence.push(evidenceOfCoded(rv.item, now));
  }

  const g = vexusGrade({ ivcMaxCm: ivc.item.value, hepatic, portal, renal }, t.vexusIvcCm);
  const ivcText = `IVC ${fmt(ivc.item.value, 1)} cm`;
  const partsText = [
    hepatic && `hepatic ${hepatic}`,
    portal && `portal ${portal} (PF ${fmt(pv.state === 'fresh' ? pv.item.value : 0)} %)`,
    renal && `intrarenal ${renal}`,
  ]
    .filter(Boolean)
    .join(', ');
  const values = {
    vexusGradeMin: g.min,
    vexusGradeMax: g.max,
    severePatterns: g.severeCount,
    ivcMaxCm: ivc.item.value,
    ...(hepatic ? { hepatic } : {}),
    ...(portal ? { portal } : {}),
    ...(renal ? { renal } : {}),
    missingParts: g.missing.join(','),
  };
  if (g.min > 0 && g.missing.length === 3) {
    return [
      notAssessed(
        VEXUS,
        'venous',
        'VExUS not assessed',
        `${ivcText} (≥ ${t.vexusIvcCm} cm) but no recent hepatic, portal or intrarenal Doppler pattern`,
        SOURCE,
        evidence,
        values,
      ),
    ];
  }
  const definite = g.min === g.max;
  const limit = limitFrom(g.min, 3, 2); // grades are whole numbers 0–3
  const missingText = definite || g.missing.length === 0 ? '' : `; not recorded: ${g.missing.map((p) => PART_LABEL[p]).join(', ')}`;
  return [
    assessed({
      ruleId: VEXUS,
      domain: 'venous',
      limit,
      congestionSign: g.min >= 3,
      text: `VExUS ${definite ? 'grade' : 'at least grade'} ${g.min}${g.min >= 3 ? ' (severe venous congestion)' : ''}: ${ivcText}${partsText ? `, ${partsText}` : ''}${missingText}`,
      values: { ...values, vexusGrade: g.min, definite },
      evidence,
      source: SOURCE,
    }),
  ];
}
