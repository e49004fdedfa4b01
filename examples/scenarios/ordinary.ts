/**
 * Charting the ordinary way (docs/clinical-logic): nurse-validated vitals hourly, each validated about 20 min
 * after the hour; CVP hourly when there is a line; ventilator settings with the vitals; labs every 4–12 h; urine
 * hourly; intake and output per 12-h shift. No cardiac-output monitor unless a scenario adds one.
 */
import type { Chart } from './chart.js';

export interface OrdinaryChart {
  /** Hours of charting back from now (default 12). */
  hours?: number;
  map: number;
  hr: number;
  rr?: number;
  spo2?: number;
  /** mmHg, charted hourly; omitted: no central line. */
  cvp?: number;
  /** Ventilation state charted with the vitals. */
  ventilation?: 'controlled-no-effort' | 'controlled-with-effort' | 'spontaneous';
  rhythm?: 'sinus' | 'atrial-fibrillation';
  /** Set tidal volume, mL, and PEEP, cmH2O, charted every 4 h (ventilated patients). */
  tidalVolumeMl?: number;
  peep?: number;
  /** FiO2 %, charted when set (carried forward). */
  fio2?: number;
  /** Urine, mL per hour, for every hour charted. */
  urineMlPerHour?: number;
}

/** Writes hourly vitals (and CVP, ventilation, rhythm, urine) for `o.hours` hours ending 20 min ago. */
export function chartOrdinary(c: Chart, o: OrdinaryChart): Chart {
  const hours = o.hours ?? 12;
  for (let h = 0; h < hours; h++) {
    const at = 20 + h * 60;
    c.vitals([{ at, hr: o.hr, sbp: o.map + 36, dbp: o.map - 18, map: o.map, rr: o.rr ?? 18, spo2: o.spo2 ?? 96 }]);
    if (o.cvp !== undefined) c.num('cvp', o.cvp, at);
    if (o.ventilation) c.coded('ventilationMode', o.ventilation, at);
    if (h % 4 === 0) c.coded('heartRhythm', o.rhythm ?? 'sinus', at);
    if (o.tidalVolumeMl !== undefined && h % 4 === 0) c.num('tidalVolume', o.tidalVolumeMl, at);
    if (o.peep !== undefined && h % 4 === 0) c.num('peep', o.peep, at);
    if (o.urineMlPerHour !== undefined) c.period('urineOutput', o.urineMlPerHour, at + 60, at);
  }
  if (o.fio2 !== undefined) c.num('fio2', o.fio2, 20 + (hours - 1) * 60);
  return c;
}
