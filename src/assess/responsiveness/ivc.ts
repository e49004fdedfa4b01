/**
 * Rule 'responsiveness.ivc': IVC respiratory variation from a Dmax/Dmin pair measured at the same time.
 * Which index applies follows the recorded ventilation state at the time of the measurement:
 * - spontaneous breathing: collapsibility (Dmax − Dmin)/Dmax. > 40 % points for (Muller 2012); ≤ 40 % does
 *   not exclude (neutral), except a wide IVC (> 2.1 cm, Rudski 2010) collapsing < 10 %, which points against
 *   (common practice).
 * - controlled ventilation without effort: distensibility, Barbier (Dmax − Dmin)/Dmin > 18 % or Feissel
 *   (Dmax − Dmin)/mean > 12 % → for, otherwise against (static; the method is a threshold setting).
 * - controlled ventilation with effort, or state unknown or changed since the measurement: not assessed.
 * IVC indices are static markers that only corroborate (docs/clinical-logic, evidence tiers): their accuracy depends on tidal volume
 * and abdominal pressure, and later studies found them weaker than the original reports.
 */
import {
  ivcCollapsibilityIndexPercent,
  ivcDistensibilityIndexBarbierPercent,
  ivcDistensibilityIndexFeisselPercent,
} from '../../physiology/ivc-indices.js';
import { estimateRightAtrialPressureFromIvc } from '../../physiology/right-atrial-pressure.js';
import type { Measurement } from '../../snapshot/types.js';
import type { ResponsivenessFinding } from '../common/finding.js';
import { ageMinutes, codedOf, evidenceOfCoded, evidenceOfMeasurement, readings, timeMs } from '../common/select.js';
import { fmt, staleText } from '../common/text.js';
import type { ResponsivenessRule, RuleContext } from './context.js';
import { assessed, notAssessed, ruleErrorFinding } from './finding.js';

export const IVC_RULE_ID = 'responsiveness.ivc';
const SOURCE_SPONT =
  'IVC collapsibility > 40 %: Muller L et al., Crit Care 2012;16:R188; extremes: common practice, cut-offs 2.1 cm / 50 % of Rudski LG et al., J Am Soc Echocardiogr 2010;23:685';
const SOURCE_VENT =
  'IVC distensibility > 18 %: Barbier C et al., Intensive Care Med 2004;30:1740; variant > 12 %: Feissel M et al., Intensive Care Med 2004;30:1834';
const SOURCE = `${SOURCE_SPONT}; ${SOURCE_VENT}`;

interface Pair {
  dMax: Measurement;
  dMin: Measurement;
}

function pairIn(maxes: readonly Measurement[], mins: readonly Measurement[], tolMs: number): Pair | undefined {
  for (const dMax of maxes) {
    const t = timeMs(dMax.effective);
    let best: Measurement | undefined;
    let bestGap = Infinity;
    for (const m of mins) {
      const gap = Math.abs(timeMs(m.effective) - t);
      if (gap <= tolMs && gap < bestGap) {
        best = m;
        bestGap = gap;
      }
    }
    if (best) return { dMax, dMin: best };
  }
  return undefined;
}

/**
 * The newest Dmax with a Dmin within the pairing tolerance (closest in time, ties by the total order). Fresh
 * readings are paired among themselves first, so that a stale reading never displaces a fresh pair; only when no
 * fresh pair exists is the newest pair of any age returned (to report it as stale).
 */
export function newestIvcPair(ctx: RuleContext): Pair | undefined {
  const tolMs = ctx.t.ivcPairToleranceMin * 60_000;
  const fresh = (m: Measurement) => ageMinutes(m.effective, ctx.now) <= ctx.w.ivcMin;
  const maxes = readings(ctx.snapshot, 'ivcDiameterMax', ctx.now).items;
  const mins = readings(ctx.snapshot, 'ivcDiameterMin', ctx.now).items;
  return pairIn(maxes.filter(fresh), mins.filter(fresh), tolMs) ?? pairIn(maxes, mins, tolMs);
}

export const ivcRule: ResponsivenessRule = {
  id: IVC_RULE_ID,
  onError: ruleErrorFinding(IVC_RULE_ID, 'ivc'),
  run: (ctx): ResponsivenessFinding => {
    const { t, now } = ctx;
    const pair = newestIvcPair(ctx);
    if (!pair) {
      const anyMax = readings(ctx.snapshot, 'ivcDiameterMax', now).items[0];
      const anyMin = readings(ctx.snapshot, 'ivcDiameterMin', now).items[0];
      if (!anyMax && !anyMin) {
        return notAssessed({
          ruleId: IVC_RULE_ID,
          marker: 'ivc',
          text: 'IVC: not assessed (none recorded)',
          reason: 'no IVC diameters recorded',
          gap: 'missing',
          source: SOURCE,
          values: { freshness: 'missing' },
        });
      }
      const seen = [anyMax, anyMin].filter((m): m is Measurement => m !== undefined).map((m) => evidenceOfMeasurement(m, now));
      return notAssessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        text: 'IVC: not assessed (no maximum and minimum diameter measured at the same time)',
        reason: `IVC needs Dmax and Dmin within ${t.ivcPairToleranceMin} min of each other`,
        gap: 'missing',
        evidence: seen,
        source: SOURCE,
        values: { freshness: 'missing' },
      });
    }
    const { dMax, dMin } = pair;
    const evidence = [evidenceOfMeasurement(dMax, now), evidenceOfMeasurement(dMin, now)];
    const age = Math.max(ageMinutes(dMax.effective, now), ageMinutes(dMin.effective, now));
    if (age > ctx.w.ivcMin) {
      const why = staleText(age, ctx.w.ivcMin);
      return notAssessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        text: `IVC: not assessed, latest ${why}`,
        reason: `IVC ${why}`,
        gap: 'stale',
        evidence,
        source: SOURCE,
        values: { freshness: 'stale', ageMin: Math.round(age), windowMin: ctx.w.ivcMin },
      });
    }
    const maxCm = dMax.value;
    const minCm = dMin.value;
    const diam = { ivcDiameterMaxCm: maxCm, ivcDiameterMinCm: minCm };
    if (!(maxCm > 0) || minCm < 0 || minCm > maxCm) {
      return notAssessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        text: `IVC: not assessed, invalid pair (Dmax ${fmt(maxCm, 2)} cm, Dmin ${fmt(minCm, 2)} cm)`,
        reason: 'IVC invalid: Dmin must lie between 0 and Dmax',
        gap: 'invalid',
        evidence,
        source: SOURCE,
        values: { ...diam, freshness: 'invalid' },
      });
    }

    // Ventilation state at the time of the measurement: the newest fresh record at or before it, and every fresh record since, must agree.
    const modes = codedOf(ctx.snapshot, 'ventilationMode', now).filter((c) => ageMinutes(c.effective, now) <= ctx.w.ventilationStateMin);
    const pairMs = Math.max(timeMs(dMax.effective), timeMs(dMin.effective));
    const before = modes.find((c) => timeMs(c.effective) <= pairMs);
    const fromMs = before ? timeMs(before.effective) : pairMs;
    const relevant = modes.filter((c) => timeMs(c.effective) >= fromMs);
    const modeEvidence = relevant.map((c) => evidenceOfCoded(c, now));
    if (relevant.length === 0) {
      const stale = codedOf(ctx.snapshot, 'ventilationMode', now)[0];
      const why = stale
        ? `ventilation state ${staleText(ageMinutes(stale.effective, now), ctx.w.ventilationStateMin)}`
        : 'ventilation state not recorded';
      return notAssessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        text: `IVC: not assessed (${why}: collapsibility or distensibility cannot be chosen)`,
        reason: `IVC index depends on the ventilation state: ${why}`,
        gap: 'not-applicable',
        evidence: stale ? [...evidence, evidenceOfCoded(stale, now)] : evidence,
        source: SOURCE,
        values: { ...diam, freshness: 'fresh' },
      });
    }
    const answers = [...new Set(relevant.map((c) => c.answer))].sort();
    if (answers.length > 1) {
      return notAssessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        text: `IVC: not assessed (ventilation state changed around or since the measurement: ${answers.join(', ')})`,
        reason: 'IVC index depends on the ventilation state, which changed around or since the measurement',
        gap: 'not-applicable',
        evidence: [...evidence, ...modeEvidence],
        source: SOURCE,
        values: { ...diam, freshness: 'fresh' },
      });
    }
    const mode = answers[0] ?? '';
    const ev = [...evidence, ...modeEvidence];
    if (mode === 'spontaneous') {
      const c = ivcCollapsibilityIndexPercent(maxCm, minCm);
      const rap = estimateRightAtrialPressureFromIvc(maxCm, c);
      const values = {
        ...diam,
        ventilationMode: mode,
        ivcCollapsibilityPercent: Math.round(c * 10) / 10,
        aseRapEstimateMmHg: rap.estimateMmHg,
      };
      const head = `IVC ${fmt(maxCm, 2)}/${fmt(minCm, 2)} cm, collapsibility ${fmt(c, 1)} % (spontaneous breathing)`;
      if (maxCm > t.ivcDiameterCutCm && c < t.ivcNoVariationPercent) {
        return assessed({
          ruleId: IVC_RULE_ID,
          marker: 'ivc',
          direction: 'against',
          tier: 'static',
          text: `${head}: wide IVC with almost no respiratory variation, points against fluid responsiveness (static, corroborates only)`,
          evidence: ev,
          source: SOURCE_SPONT,
          values,
        });
      }
      if (c > t.ivcCollapsibilityPercent) {
        return assessed({
          ruleId: IVC_RULE_ID,
          marker: 'ivc',
          direction: 'for',
          tier: 'static',
          text: `${head}: above ${fmt(t.ivcCollapsibilityPercent, 1)} %, points to fluid responsiveness (static, corroborates only)`,
          evidence: ev,
          source: SOURCE_SPONT,
          values,
        });
      }
      return assessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        direction: 'neutral',
        tier: 'static',
        text: `${head}: ${fmt(t.ivcCollapsibilityPercent, 1)} % or less does not exclude fluid responsiveness`,
        evidence: ev,
        source: SOURCE_SPONT,
        values,
      });
    }
    if (mode === 'controlled-no-effort') {
      const feissel = ivcDistensibilityIndexFeisselPercent(maxCm, minCm);
      const barbier = minCm > 0 ? ivcDistensibilityIndexBarbierPercent(maxCm, minCm) : undefined;
      const values = {
        ...diam,
        ventilationMode: mode,
        ivcDistensibilityFeisselPercent: Math.round(feissel * 10) / 10,
        ...(barbier !== undefined ? { ivcDistensibilityBarbierPercent: Math.round(barbier * 10) / 10 } : {}),
      };
      const useBarbier = t.ivcDistensibilityMethod === 'barbier';
      if (useBarbier && barbier === undefined) {
        return notAssessed({
          ruleId: IVC_RULE_ID,
          marker: 'ivc',
          text: 'IVC: not assessed, Dmin 0 cm gives no Barbier distensibility',
          reason: 'IVC invalid: Dmin 0 with the Barbier index',
          gap: 'invalid',
          evidence: ev,
          source: SOURCE_VENT,
          values: { ...values, freshness: 'invalid' },
        });
      }
      const index = useBarbier ? (barbier as number) : feissel;
      const thr = useBarbier ? t.ivcDistensibilityBarbierPercent : t.ivcDistensibilityFeisselPercent;
      const name = useBarbier ? 'distensibility (Barbier)' : 'respiratory variation (Feissel)';
      const positive = index > thr;
      return assessed({
        ruleId: IVC_RULE_ID,
        marker: 'ivc',
        direction: positive ? 'for' : 'against',
        tier: 'static',
        text: `IVC ${fmt(maxCm, 2)}/${fmt(minCm, 2)} cm, ${name} ${fmt(index, 1)} % (threshold > ${fmt(thr, 1)} %, controlled ventilation): points ${positive ? 'to' : 'against'} fluid responsiveness (static)`,
        evidence: ev,
        source: SOURCE_VENT,
        values,
      });
    }
    return notAssessed({
      ruleId: IVC_RULE_ID,
      marker: 'ivc',
      text: 'IVC: not assessed (spontaneous effort on the ventilator: neither collapsibility nor distensibility is validated)',
      reason: 'IVC indices are not validated with spontaneous breathing effort on the ventilator',
      gap: 'outside-validity',
      evidence: ev,
      source: SOURCE,
      values: { ...diam, ventilationMode: mode, freshness: 'fresh' },
    });
  },
};
