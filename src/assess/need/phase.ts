/**
 * Phase of fluid therapy (docs/clinical-logic/index.md; Malbrain MLNG et al., Ann Intensive Care 2018;8:66 [M]): early
 * resuscitation of shock versus the later phases. Early resuscitation holds when
 *   - shock is present now: MAP below target (vitals window) or lactate ≥ `earlyLactateMmolL` (lactate window), and
 *   - it began at most `earlyPhaseHours` ago: the admission time, else the earliest such sign in `onsetLookbackHours`, and
 *   - less than `earlyMlPerKg` (SSC 2021: 30 mL/kg) IV fluid has been given since, per kg ADMISSION weight (not
 *     today's fluid-laden weight); with no weight recorded the volume cannot be judged and the phase stays early.
 * In early resuscitation the advice never recommends withdrawing the bolus; later it asks for a test before giving.
 */
import { mapSeries } from '../common/blood-pressure.js';
import type { Evidence, PhaseFinding } from '../common/finding.js';
import { ageMinutes, evidenceOfFluid, evidenceOfMeasurement, latestReading, readings, timeMs, usableTime } from '../common/select.js';
import { ageText, fmt, sentenceStart } from '../common/text.js';
import type { PhaseValue, Verdict } from '../types.js';
import { admissionWeight, encounterStartMs } from '../tolerance/weights.js';
import type { NeedContext } from './context.js';

export const PHASE_RULE = 'phase.fluid-therapy';
const SOURCE =
  'Phases of fluid therapy: Malbrain MLNG et al., Ann Intensive Care 2018;8:66 (from memory); ≥ 30 mL/kg in the first 3 h, MAP 65, lactate ≥ 4: Surviving Sepsis Campaign 2021, Evans L et al., Intensive Care Med 2021;47:1181';

export function assessPhase(ctx: NeedContext): { verdict: Verdict<PhaseValue>; finding: PhaseFinding } {
  const { snapshot: s, now, t, w } = ctx;
  const evidence: Evidence[] = [];
  const map = mapSeries(s, now)[0];
  const hypotension = map !== undefined && ageMinutes(map.effective, now) <= w.vitalsMin && map.mapMmHg < t.mapTargetMmHg;
  const lac = latestReading(s, 'lactate', now, w.lactateMin);
  const highLactate = lac.state === 'fresh' && lac.item.value >= t.earlyLactateMmolL;
  if (hypotension && map) evidence.push(...map.sources.map((m) => evidenceOfMeasurement(m, now)));
  if (highLactate && lac.state === 'fresh') evidence.push(evidenceOfMeasurement(lac.item, now));

  const later = (why: string): { verdict: Verdict<PhaseValue>; finding: PhaseFinding } => ({
    verdict: { value: 'later', rationale: `${sentenceStart(why)}.`, decidingRules: [PHASE_RULE] },
    finding: {
      ruleId: PHASE_RULE,
      topic: 'phase',
      status: 'assessed',
      text: `Phase: after early resuscitation (${why})`,
      evidence,
      source: SOURCE,
    },
  });
  if (!hypotension && !highLactate) {
    const seen = (map !== undefined && ageMinutes(map.effective, now) <= w.vitalsMin) || lac.state === 'fresh';
    const out = later(
      seen
        ? `no current hypotension (MAP < ${fmt(t.mapTargetMmHg)}) or lactate ≥ ${fmt(t.earlyLactateMmolL)} mmol/L`
        : 'no current MAP or lactate on the chart',
    );
    if (!seen)
      return {
        verdict: out.verdict,
        finding: { ...out.finding, status: 'not-assessed', gap: 'missing', reason: 'no current MAP or lactate recorded' },
      };
    if (map) out.finding.evidence.push(...map.sources.map((m) => evidenceOfMeasurement(m, now)));
    if (lac.state === 'fresh') out.finding.evidence.push(evidenceOfMeasurement(lac.item, now));
    return out;
  }

  let onsetMs = encounterStartMs(s, now);
  let onsetBasis = 'admission';
  if (onsetMs === undefined) {
    const fromMs = now.getTime() - t.onsetLookbackHours * 3_600_000;
    const shockTimes = [
      ...mapSeries(s, now)
        .filter((p) => p.mapMmHg < t.mapTargetMmHg && p.effectiveMs >= fromMs)
        .map((p) => p.effectiveMs),
      ...readings(s, 'lactate', now)
        .items.filter((m) => m.value >= t.earlyLactateMmolL && timeMs(m.effective) >= fromMs)
        .map((m) => timeMs(m.effective)),
    ];
    onsetMs = Math.min(...shockTimes);
    onsetBasis = 'first recorded sign of shock';
  }
  const hours = (now.getTime() - onsetMs) / 3_600_000;
  if (hours > t.earlyPhaseHours)
    return later(`shock began ${ageText(hours * 60)} ago (${onsetBasis}), beyond the first ${fmt(t.earlyPhaseHours)} h`);

  const given = s.fluids.filter(
    (f) => usableTime(f.start, now) && timeMs(f.start) >= onsetMs - 60_000 && (f.status === 'completed' || f.status === 'in-progress'),
  );
  const givenMl = given.reduce((a, f) => a + f.volumeMl, 0);
  evidence.push(...given.map((f) => evidenceOfFluid(f, now)));
  const weight = admissionWeight(s, now, {
    admissionWeightWindowHours: ctx.t.admissionWeightWindowHours,
    balanceFallbackLookbackHours: ctx.t.balanceFallbackLookbackHours,
  });
  if (weight) {
    evidence.push(evidenceOfMeasurement(weight.m, now));
    const perKg = givenMl / weight.m.value;
    if (perKg >= t.earlyMlPerKg)
      return later(
        `${fmt(givenMl)} mL given since onset = ${fmt(perKg, 1)} mL/kg (${weight.basis} weight ${fmt(weight.m.value, 1)} kg), at least ${fmt(t.earlyMlPerKg)} mL/kg`,
      );
  }
  const shock = [
    hypotension ? `MAP ${fmt(map?.mapMmHg ?? 0)} mmHg` : '',
    highLactate && lac.state === 'fresh' ? `lactate ${fmt(lac.item.value, 1)} mmol/L` : '',
  ]
    .filter(Boolean)
    .join(', ');
  const volume = weight
    ? `${fmt(givenMl)} mL given since = ${fmt(givenMl / weight.m.value, 1)} mL/kg of ${fmt(weight.m.value, 1)} kg ${weight.basis} weight (below ${fmt(t.earlyMlPerKg)} mL/kg)`
    : `${fmt(givenMl)} mL given since; no admission weight to judge it per kg`;
  const why = `shock (${shock}) began ${ageText(hours * 60)} ago (${onsetBasis}); ${volume}`;
  return {
    verdict: { value: 'early-resuscitation', rationale: `${sentenceStart(why)}.`, decidingRules: [PHASE_RULE] },
    finding: {
      ruleId: PHASE_RULE,
      topic: 'phase',
      status: 'assessed',
      text: `Phase: early resuscitation (${why})`,
      evidence,
      source: SOURCE,
      values: { givenMl, hoursSinceOnset: Math.round(hours * 10) / 10 },
    },
  };
}
