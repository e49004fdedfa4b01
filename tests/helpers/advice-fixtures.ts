/**
 * Invented patients that land in each cell of the advice matrix, as prefetch maps for real HTTP calls.
 * Thresholds behind each choice: PLR by cardiac output ≥ 10 % (Monnet 2016), mini fluid challenge ΔVTI ≥ 10 %
 * (Muller 2011), albumin < 30 g/L limits tolerance (ALBIOS target), EVLWI ≥ 10 mL/kg is pulmonary oedema
 * (Tagami 2010), SpO2/FiO2 from SpO2 and FiO2.
 */
import type { FhirResource } from 'fhir/r4.js';
import * as b from '../../examples/lib/fhir-builders.js';
import { basicResources, NOW, PID } from './hook-fixtures.js';

const t = (m: number) => b.minutesAgo(NOW, m);

function withExtra(extra: Partial<Record<string, FhirResource[]>>): Record<string, FhirResource[]> {
  const base = basicResources();
  for (const [k, v] of Object.entries(extra)) base[k] = [...(base[k] ?? []), ...(v ?? [])];
  return base;
}

const plrPositive = b.dynamicTest('plr-pos', PID, 'plr', 'cardiacOutput', 4.0, 4.6, t(12)); // +15 %
const plrNegative = b.dynamicTest('plr-neg', PID, 'plr', 'cardiacOutput', 4.0, 4.1, t(12)); // +2.5 %
const mfcNegative = b.dynamicTest('mfc-neg', PID, 'miniFluidChallenge', 'vti', 18, 18.5, t(20)); // +2.8 %
const goodLungs = [b.numeric('spo2-1', PID, 'spo2', 96, t(10)), b.numeric('fio2-1', PID, 'fio2', 30, t(10))];
const poorOxygenation = [b.numeric('spo2-2', PID, 'spo2', 92, t(10)), b.numeric('fio2-2', PID, 'fio2', 60, t(10))]; // 153 < 235 (Rice 2007)
/** Enough tolerance markers for "adequate" (≥ 3, one of lungs/venous/balance): CVP 8 mmHg, creatinine steady. */
const normalVenousAndKidneys = [
  b.numeric('cvp-ok', PID, 'cvp', 8, t(30)),
  b.numeric('crea-0', PID, 'creatinine', 0.9, t(20 * 60)),
  b.numeric('crea-1', PID, 'creatinine', 0.9, t(4 * 60)),
];
const albumin = (gPerL: number, id: string) => b.numeric(id, PID, 'albumin', gPerL, t(300));

export const ADVICE_CASES = {
  /** No dynamic marker, nothing on tolerance: test first. */
  'test-first': basicResources(),
  /** Positive PLR by cardiac output, MAP 61 (a sign of hypoperfusion), no tolerance limit in 4 markers: proceed and reassess. */
  proceed: withExtra({
    hemodynamics: [plrPositive, ...normalVenousAndKidneys],
    labs: [albumin(38, 'alb-ok')],
    vitals: [goodLungs[0] as FhirResource],
    ventilation: [goodLungs[1] as FhirResource],
  }),
  /** Positive PLR, SpO2/FiO2 153: tolerance limited → smaller aliquot (albumin 22 g/L is context only, docs/clinical-logic). */
  'smaller-aliquot': withExtra({
    hemodynamics: [plrPositive],
    labs: [albumin(22, 'alb-low')],
    vitals: [poorOxygenation[0] as FhirResource],
    ventilation: [poorOxygenation[1] as FhirResource],
  }),
  /** Positive PLR, EVLWI 14 mL/kg: poor tolerance with lung water → critical. */
  critical: withExtra({ hemodynamics: [plrPositive, b.numeric('evlwi-1', PID, 'evlwi', 14, t(60))], labs: [albumin(24, 'alb-low2')] }),
  /** Negative PLR and negative mini fluid challenge: unlikely → question the bolus. */
  question: withExtra({ hemodynamics: [plrNegative, mfcNegative], labs: [albumin(36, 'alb-ok2')] }),
} as const;
export type AdviceCase = keyof typeof ADVICE_CASES;
