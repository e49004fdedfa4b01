/**
 * Signs of hypoperfusion, each fresh by its own window (docs/clinical-logic/index.md, "Responsiveness is not an
 * indication"): MAP below target (SSC 2021), lactate > 2 mmol/L (Sepsis-3), capillary refill > 3 s
 * (ANDROMEDA-SHOCK), urine output < 0.5 mL/kg/h over 6 h (KDIGO 2012), rising vasoactive support (common practice).
 * The shock index is shown as context and never counts as a sign.
 */
import { urineOutputMlPerKgPerHour } from '../../physiology/kdigo.js';
import { coveredMs, volumeInWindowMl } from '../../physiology/fluid-balance.js';
import { shockIndex } from '../../physiology/shock-index.js';
import { mapPointEvidence, mapSeries } from '../common/blood-pressure.js';
import { ageMinutes, evidenceOfMeasurement, evidenceOfVasoactive, latestReading } from '../common/select.js';
import { ageText, fmt, staleText } from '../common/text.js';
import { vasoactiveChangesBetween } from '../common/vasoactive-changes.js';
import { urineIntervals } from '../tolerance/kidney-urine.js';
import { weightForPerKg } from '../tolerance/weights.js';
import type { NeedContext, NeedRule } from './context.js';
import { errorSign, notAssessedParts, sign, unusableSign } from './finding.js';

export const MAP_SIGN = 'perfusion.map';
export const LACTATE_SIGN = 'perfusion.lactate';
export const CAPILLARY_REFILL_SIGN = 'perfusion.capillary-refill';
export const URINE_SIGN = 'perfusion.urine-output';
export const VASOPRESSOR_SIGN = 'perfusion.vasopressor';
export const SHOCK_INDEX = 'perfusion.shock-index';

const MAP_SOURCE =
  'MAP target 65 mmHg: Surviving Sepsis Campaign 2021, Evans L et al., Intensive Care Med 2021;47:1181; MAP ≈ DBP + (SBP − DBP)/3: common practice';
const LACTATE_SOURCE = 'Lactate > 2 mmol/L: Sepsis-3, Singer M et al., JAMA 2016;315:801–810';
const CRT_SOURCE = 'Capillary refill > 3 s abnormal: ANDROMEDA-SHOCK, Hernández G et al., JAMA 2019;321:654–664';
const URINE_SOURCE = 'Urine output < 0.5 mL/kg/h for 6 h: KDIGO AKI guideline, Kidney Int Suppl 2012;2:1–138';
const VASO_SOURCE = 'Rising vasoactive support as a sign of ongoing shock: common practice';
const SI_SOURCE = 'Shock index HR/SBP (Allgöwer & Burri 1967, from memory); > 1.0: Koch E et al., Open Access Emerg Med 2019;11:179';

export const mapSign: NeedRule = {
  id: MAP_SIGN,
  onError: errorSign(MAP_SIGN, 'map'),
  run: (ctx) => {
    const newest = mapSeries(ctx.snapshot, ctx.now)[0];
    const w = ctx.w.vitalsMin;
    if (!newest)
      return notAssessedParts(
        MAP_SIGN,
        'map',
        'MAP: not assessed (none recorded)',
        'no MAP and no systolic/diastolic pair recorded',
        'missing',
        MAP_SOURCE,
      );
    const ev = mapPointEvidence(newest, ctx.now);
    const age = ageMinutes(newest.effective, ctx.now);
    if (age > w)
      return notAssessedParts(
        MAP_SIGN,
        'map',
        `MAP: not assessed, latest ${staleText(age, w)}`,
        `MAP ${staleText(age, w)}`,
        'stale',
        MAP_SOURCE,
        ev,
      );
    const below = newest.mapMmHg < ctx.t.mapTargetMmHg;
    return sign({
      ruleId: MAP_SIGN,
      sign: 'map',
      hypoperfusion: below,
      evidence: ev,
      source: MAP_SOURCE,
      text: `MAP ${fmt(newest.mapMmHg)} mmHg${newest.measured ? '' : ' (from SBP/DBP)'}, ${below ? 'below' : 'at or above'} the target of ${fmt(ctx.t.mapTargetMmHg)} mmHg`,
      values: { mapMmHg: Math.round(newest.mapMmHg * 10) / 10, measured: newest.measured },
    });
  },
};

/** A sign read from the latest reading of one kind against an upper limit (strictly above = hypoperfusion). */
interface AboveLimitSpec {
  id: string;
  sign: 'lactate' | 'capillary-refill';
  kind: 'lactate' | 'capillaryRefill';
  label: string;
  unit: string;
  window: (w: NeedContext['w']) => number;
  limit: (t: NeedContext['t']) => number;
  words: [above: string, within: string];
  source: string;
}

function aboveLimitSign(spec: AboveLimitSpec): NeedRule {
  return {
    id: spec.id,
    onError: errorSign(spec.id, spec.sign),
    run: (ctx) => {
      const sel = latestReading(ctx.snapshot, spec.kind, ctx.now, spec.window(ctx.w));
      if (sel.state !== 'fresh')
        return unusableSign(sel, {
          ruleId: spec.id,
          sign: spec.sign,
          label: spec.label,
          source: spec.source,
          evidenceOf: (m) => evidenceOfMeasurement(m, ctx.now),
        });
      const v = sel.item.value;
      const limit = spec.limit(ctx.t);
      const above = v > limit;
      return sign({
        ruleId: spec.id,
        sign: spec.sign,
        hypoperfusion: above,
        evidence: [evidenceOfMeasurement(sel.item, ctx.now)],
        source: spec.source,
        text: `${spec.label} ${fmt(v, 1)} ${spec.unit} (${above ? `> ${fmt(limit, 1)}: ${spec.words[0]}` : `≤ ${fmt(limit, 1)}: ${spec.words[1]}`}; ${ageText(sel.ageMinutes)} old)`,
        values: { value: v, ageMin: Math.round(sel.ageMinutes) },
      });
    },
  };
}

export const lactateSign = aboveLimitSign({
  id: LACTATE_SIGN,
  sign: 'lactate',
  kind: 'lactate',
  label: 'Lactate',
  unit: 'mmol/L',
  source: LACTATE_SOURCE,
  window: (w) => w.lactateMin,
  limit: (t) => t.lactateMaxNormalMmolL,
  words: ['raised', 'not raised'],
});

export const capillaryRefillSign = aboveLimitSign({
  id: CAPILLARY_REFILL_SIGN,
  sign: 'capillary-refill',
  kind: 'capillaryRefill',
  label: 'Capillary refill',
  unit: 's',
  source: CRT_SOURCE,
  window: (w) => w.capillaryRefillMin,
  limit: (t) => t.capillaryRefillMaxNormalS,
  words: ['prolonged', 'normal'],
});

export const urineSign: NeedRule = {
  id: URINE_SIGN,
  onError: errorSign(URINE_SIGN, 'urine-output'),
  run: (ctx) => {
    const { t, now, snapshot: s } = ctx;
    const { intervals } = urineIntervals(s, now, t.urinePointMaxGapMinutes);
    if (intervals.length === 0)
      return notAssessedParts(
        URINE_SIGN,
        'urine-output',
        'Urine output: not assessed (none recorded)',
        'no urine output recorded',
        'missing',
        URINE_SOURCE,
      );
    const endMs = Math.max(...intervals.map((r) => r.endMs));
    const sinceMin = (now.getTime() - endMs) / 60_000;
    if (sinceMin > t.urineRecencyMinutes) {
      return notAssessedParts(
        URINE_SIGN,
        'urine-output',
        `Urine output: not assessed, latest record ${ageText(sinceMin)} old`,
        `the latest urine record ended ${ageText(sinceMin)} ago (window ${ageText(t.urineRecencyMinutes)})`,
        'stale',
        URINE_SOURCE,
      );
    }
    const weight = weightForPerKg(s, now, t);
    if (!weight)
      return notAssessedParts(
        URINE_SIGN,
        'urine-output',
        'Urine output: not assessed (no weight for mL/kg/h)',
        'no body weight recorded for mL/kg/h',
        'missing',
        URINE_SOURCE,
      );
    const fromMs = endMs - t.urineHours * 3_600_000;
    const covered = coveredMs(intervals, fromMs, endMs) / 3_600_000;
    const used = intervals.filter((r) => r.endMs > fromMs);
    const evidence = [...used.map((r) => r.evidence), evidenceOfMeasurement(weight.m, now)];
    if (covered < t.urineCoverageFraction * t.urineHours) {
      return notAssessedParts(
        URINE_SIGN,
        'urine-output',
        `Urine output: not assessed (charted over ${fmt(covered, 1)} h of ${fmt(t.urineHours)} h)`,
        `urine charted over ${fmt(covered, 1)} h only; ${fmt(t.urineHours)} h needed`,
        'too-few-readings',
        URINE_SOURCE,
        evidence,
      );
    }
    const ml = volumeInWindowMl(intervals, fromMs, endMs);
    const rate = urineOutputMlPerKgPerHour(ml, weight.m.value, covered);
    const low = rate < t.urineLowMlPerKgPerHour;
    return sign({
      ruleId: URINE_SIGN,
      sign: 'urine-output',
      hypoperfusion: low,
      evidence,
      source: URINE_SOURCE,
      text: `Urine output ${fmt(rate, 2)} mL/kg/h over ${fmt(covered, 1)} h (${fmt(ml)} mL, ${fmt(weight.m.value, 1)} kg)${low ? `: below ${fmt(t.urineLowMlPerKgPerHour, 1)}` : ''}`,
      values: { urineMlPerKgPerHour: Math.round(rate * 1000) / 1000, hours: Math.round(covered * 10) / 10 },
    });
  },
};

/** Rising vasoactive support: a vasoactive started, or a rate raised (same unit), within the look-back. */
export const vasopressorSign: NeedRule = {
  id: VASOPRESSOR_SIGN,
  onError: errorSign(VASOPRESSOR_SIGN, 'vasopressor'),
  run: (ctx) => {
    const { now, t, snapshot: s } = ctx;
    const fromMs = now.getTime() - t.vasopressorRiseLookbackMin * 60_000;
    const running = s.vasoactives.filter((v) => v.status === 'in-progress' || v.end === undefined || Date.parse(v.end) >= fromMs);
    // Nothing recorded is not read as "no rising support": the record may simply not have been sent.
    if (s.vasoactives.length === 0) {
      return notAssessedParts(
        VASOPRESSOR_SIGN,
        'vasopressor',
        'Vasoactive support: not assessed (none recorded)',
        'no vasoactive drug recorded',
        'missing',
        VASO_SOURCE,
      );
    }
    const rises = vasoactiveChangesBetween(s.vasoactives, fromMs, now.getTime()).filter((c) => {
      if (c.kind === 'started') return true;
      if (c.kind !== 'rate changed' || !c.drug.rate) return false;
      const prev = s.vasoactives.find(
        (w) =>
          w !== c.drug &&
          w.drug.trim().toLowerCase() === c.drug.drug.trim().toLowerCase() &&
          w.end !== undefined &&
          Math.abs(Date.parse(w.end) - c.atMs) <= 60_000 &&
          w.rate?.unit === c.drug.rate?.unit,
      );
      return prev?.rate !== undefined && c.drug.rate.value > prev.rate.value;
    });
    const evidence = [...rises.map((c) => evidenceOfVasoactive(c.drug, now)), ...running.map((v) => evidenceOfVasoactive(v, now))];
    return sign({
      ruleId: VASOPRESSOR_SIGN,
      sign: 'vasopressor',
      hypoperfusion: rises.length > 0,
      evidence,
      source: VASO_SOURCE,
      text: rises.length
        ? `Vasoactive support rising: ${rises.map((c) => `${c.drug.drug} ${c.kind === 'started' ? 'started' : 'raised'} at ${c.at}`).join('; ')}`
        : `No vasoactive started or raised in the last ${ageText(t.vasopressorRiseLookbackMin)}`,
    });
  },
};

export const shockIndexContext: NeedRule = {
  id: SHOCK_INDEX,
  onError: errorSign(SHOCK_INDEX, 'shock-index', true),
  run: (ctx) => {
    const w = ctx.w.vitalsMin;
    const hr = latestReading(ctx.snapshot, 'heartRate', ctx.now, w);
    const sbp = latestReading(ctx.snapshot, 'systolicBp', ctx.now, w);
    const ev = (m: Parameters<typeof evidenceOfMeasurement>[0]) => evidenceOfMeasurement(m, ctx.now);
    const base = { ruleId: SHOCK_INDEX, sign: 'shock-index' as const, source: SI_SOURCE, evidenceOf: ev, contextOnly: true };
    if (hr.state !== 'fresh') return unusableSign(hr, { ...base, label: 'Shock index: heart rate' });
    if (sbp.state !== 'fresh') return unusableSign(sbp, { ...base, label: 'Shock index: systolic pressure' });
    if (!(sbp.item.value > 0))
      return notAssessedParts(
        SHOCK_INDEX,
        'shock-index',
        'Shock index: not assessed, systolic pressure 0',
        'systolic pressure must be positive',
        'invalid',
        SI_SOURCE,
        [ev(hr.item), ev(sbp.item)],
        true,
      );
    const si = shockIndex(hr.item.value, sbp.item.value);
    const raised = si > ctx.t.shockIndexHigh;
    return sign({
      ruleId: SHOCK_INDEX,
      sign: 'shock-index',
      hypoperfusion: raised,
      contextOnly: true,
      evidence: [ev(hr.item), ev(sbp.item)],
      source: SI_SOURCE,
      text: `Shock index ${fmt(si, 2)} (HR ${fmt(hr.item.value)} / SBP ${fmt(sbp.item.value)})${raised ? `, above ${fmt(ctx.t.shockIndexHigh, 2)}` : ''} (context)`,
      values: { shockIndex: Math.round(si * 100) / 100 },
    });
  },
};

export const NEED_RULES: readonly NeedRule[] = [mapSign, lactateSign, capillaryRefillSign, urineSign, vasopressorSign, shockIndexContext];
