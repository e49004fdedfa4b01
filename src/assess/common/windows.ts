/**
 * Time windows shared by every question (docs/clinical-logic/index.md, "Windows that fit hourly charting": nurse-validated
 * vitals hourly with some lag, CVP hourly, labs every 4–12 h). One window per kind of reading, used by all rules
 * that read it, so that one reading is fresh for one question exactly when it is fresh for the other. Each is a
 * site-overridable threshold (`thresholds.windows`), minutes unless the name says otherwise.
 */
import { z } from 'zod';

const minutes = (max: number) => z.number().min(1).max(max);

export const windowsSchema = z.strictObject({
  /** Heart rate, blood pressure, respiratory rate: ~90 min (§12: hourly charting, validated with some lag). */
  vitalsMin: minutes(1440).default(90),
  /** CVP and measured right atrial pressure, one window for responsiveness and tolerance: ~120 min (§12). */
  cvpMin: minutes(1440).default(120),
  /** PPV and SVV: ~60 min, and set aside by a later fluid or vasoactive change (§12). */
  ppvSvvMin: minutes(1440).default(60),
  /** Dynamic tests (PLR, mini fluid challenge, EEO, tidal volume challenge): 60 min plus the event rule (common practice). */
  dynamicTestMin: minutes(1440).default(60),
  /** Set tidal volume: ~4 h (§12: ventilator settings change rarely between rounds). */
  tidalVolumeMin: minutes(2880).default(240),
  /** Heart rhythm: ~12 h, and void if any irregular record falls in that span (§12). */
  rhythmMin: minutes(2880).default(720),
  /** Capillary refill: ~2 h (§12; ANDROMEDA-SHOCK assessed it every 30 min during resuscitation). */
  capillaryRefillMin: minutes(1440).default(120),
  /** Lactate: up to ~12 h, shown with its age (§12: labs every 4–12 h). */
  lactateMin: minutes(2880).default(720),
  /** FiO2 carried forward until changed, at most ~12 h (§12: FiO2 is charted when it changes). */
  fio2CarryForwardMin: minutes(2880).default(720),
  /** Creatinine: ~36 h (§12: daily chemistry with some lag). */
  creatinineMin: minutes(10_080).default(2160),
  /** Albumin: ~72 h (§12: changes slowly). */
  albuminMin: minutes(20_160).default(4320),
  /** Ventilation state, coded (common practice: charted at least every 4 h). */
  ventilationStateMin: minutes(2880).default(240),
  /** IVC diameters (common practice: an echo finding is repeated when the state changes; 6 h). */
  ivcMin: minutes(2880).default(360),
  /** Intra-abdominal pressure (common practice: bladder pressure every 4–6 h when monitored). */
  intraAbdominalPressureMin: minutes(2880).default(360),
  /** Chest open or closed (common practice: changes only with surgery; 24 h). */
  chestStatusMin: minutes(10_080).default(1440),
  /** Body height for predicted body weight (common practice: recorded at admission; one year). */
  bodyHeightMin: minutes(5_256_000).default(525_600),
  /** Echo impression of LV function (common practice: one echo a day; 24 h). */
  echoImpressionMin: minutes(10_080).default(1440),
  /** Smallest fluid that makes earlier dynamic evidence old, mL (§12: the latest fluid of ≥ 100 mL). */
  fluidEventMinMl: z.number().min(1).max(5000).default(100),
});
export type Windows = z.infer<typeof windowsSchema>;
export const DEFAULT_WINDOWS: Windows = windowsSchema.parse({});
