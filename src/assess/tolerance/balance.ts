/**
 * Rules tolerance.balance-cumulative and tolerance.balance-24h: the net fluid balance since admission and
 * over the last 24 h, with the sources named. Context for the prescriber: the balance in mL limits nothing
 * by itself; its share of body weight is judged by tolerance.fluid-overload.
 */
import type { PatientSnapshot } from '../../snapshot/types.js';
import type { ToleranceFinding } from '../common/finding.js';
import { balanceOver, cumulativeStartMs, type BalanceWindowResult } from './balance-data.js';
import { assessed, notAssessed } from './finding.js';
import type { ToleranceThresholds } from './thresholds.js';
import { fmt, round, signedMl } from '../common/text.js';

export const BALANCE_CUMULATIVE = 'tolerance.balance-cumulative';
export const BALANCE_24H = 'tolerance.balance-24h';
const SOURCE =
  'Net balance = intake − output (common practice); cumulative balance and outcome: Boyd JH et al., Crit Care Med 2011; FACTT, N Engl J Med 2006';

function values(r: BalanceWindowResult): Record<string, number | string | boolean> {
  return {
    balanceMl: round(r.balanceMl, 0),
    ...(r.intakeMl !== undefined ? { intakeMl: round(r.intakeMl, 0) } : {}),
    ...(r.outputMl !== undefined ? { outputMl: round(r.outputMl, 0) } : {}),
    hoursCovered: round((r.toMs - r.fromMs) / 3_600_000, 1),
    source: r.source,
    urineOnly: r.urineOnly,
    droppedOverlapping: r.droppedOverlapping,
  };
}

function caveat(r: BalanceWindowResult): string {
  const parts: string[] = [];
  if (r.urineOnly) parts.push('output is urine only, other losses not counted');
  if (r.droppedOverlapping > 0) parts.push(`${r.droppedOverlapping} overlapping record(s) counted once`);
  return parts.length ? `; ${parts.join('; ')}` : '';
}

export function cumulativeBalanceRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const start = cumulativeStartMs(snapshot, now, t.balanceFallbackLookbackHours);
  if (!start) {
    return [
      notAssessed(
        BALANCE_CUMULATIVE,
        'balance',
        'Cumulative fluid balance not assessed',
        'no admission time and no intake/output records',
        SOURCE,
      ),
    ];
  }
  const out = balanceOver(snapshot, now, start.ms, now.getTime(), t.balanceRecencyMinutes);
  if (!out.ok)
    return [
      notAssessed(BALANCE_CUMULATIVE, 'balance', 'Cumulative fluid balance not assessed', out.reason, SOURCE, out.staleEvidence ?? []),
    ];
  const r = out.result;
  const since =
    start.basis === 'admission'
      ? 'since admission'
      : `since the earliest record (${fmt((r.toMs - r.fromMs) / 3_600_000)} h; no admission time)`;
  return [
    assessed({
      ruleId: BALANCE_CUMULATIVE,
      domain: 'balance',
      limit: 'none',
      context: true,
      text: `Cumulative balance ${since}: ${signedMl(r.balanceMl)} (${r.source}${caveat(r)})`,
      values: { ...values(r), startBasis: start.basis },
      quantity: { kind: 'balance-ml', value: round(r.balanceMl, 0) },
      evidence: r.evidence,
      source: SOURCE,
    }),
  ];
}

export function balance24hRule(snapshot: PatientSnapshot, now: Date, t: ToleranceThresholds): ToleranceFinding[] {
  const start = cumulativeStartMs(snapshot, now, t.balanceFallbackLookbackHours);
  const dayAgo = now.getTime() - 24 * 3_600_000;
  // A stay shorter than a day: the window begins at admission.
  const fromMs = start && start.basis === 'admission' ? Math.max(start.ms, dayAgo) : dayAgo;
  const out = balanceOver(snapshot, now, fromMs, now.getTime(), t.balanceRecencyMinutes);
  if (!out.ok) return [notAssessed(BALANCE_24H, 'balance', '24-h fluid balance not assessed', out.reason, SOURCE, out.staleEvidence ?? [])];
  const r = out.result;
  const hours = (r.toMs - r.fromMs) / 3_600_000;
  const label = hours < 23.9 ? `over the ${fmt(hours)} h since admission` : 'over the last 24 h';
  return [
    assessed({
      ruleId: BALANCE_24H,
      domain: 'balance',
      limit: 'none',
      context: true,
      text: `Balance ${label}: ${signedMl(r.balanceMl)} (${r.source}${caveat(r)})`,
      values: values(r),
      evidence: r.evidence,
      source: SOURCE,
    }),
  ];
}
