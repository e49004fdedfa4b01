/**
 * Combination of the responsiveness findings into one verdict. Deterministic, in tiers:
 *
 *   1. dynamic        — valid PPV/SVV, PLR/EEO/mini fluid challenge by flow, tidal volume challenge
 *   2. static-extreme — CVP ≤ 3 or ≥ 12 mmHg, IVC extremes
 *   3. static         — IVC indices, last-bolus response, PLR/EEO judged by pulse pressure
 *
 * Only assessed findings of topic 'responsiveness' with direction 'for' or 'against' vote; 'neutral' (grey zone,
 * mid-range CVP, partial response) and 'context' never vote. The highest tier with any vote decides:
 *   - all its votes agree → likely / unlikely (votes of lower tiers are outranked and named);
 *   - its votes disagree → indeterminate, the conflict named (lower tiers are not consulted);
 *   - in the static tier, at least `staticAgreementMinCount` (default 2) agreeing votes are needed: a single static
 *     marker never decides.
 * No vote in any tier → indeterminate. Stale, missing and invalid data never reach a vote (not-assessed findings).
 */
import type { Finding, Responsiveness, Verdict } from '../types.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export const TIERS = ['dynamic', 'static-extreme', 'static'] as const;
export type Tier = (typeof TIERS)[number];

const TIER_TEXT: Record<Tier, string> = { dynamic: 'dynamic', 'static-extreme': 'static-extreme', static: 'static' };

/** Short names of the markers for rationales. */
export const MARKER_NAME: Record<string, string> = {
  'responsiveness.ppv': 'PPV', 'responsiveness.svv': 'SVV', 'responsiveness.plr': 'PLR',
  'responsiveness.mini-fluid-challenge': 'mini fluid challenge', 'responsiveness.end-expiratory-occlusion': 'end-expiratory occlusion',
  'responsiveness.tidal-volume-challenge': 'tidal volume challenge', 'responsiveness.ivc': 'IVC', 'responsiveness.cvp': 'CVP',
  'responsiveness.last-bolus': 'last-bolus response',
};
const nameOf = (f: Finding) => MARKER_NAME[f.ruleId] ?? f.ruleId;
const list = (fs: readonly Finding[]) => fs.map(nameOf).join(', ');

interface Vote { finding: Finding; tier: Tier; dir: 'for' | 'against' }

export function votesOf(findings: readonly Finding[]): Vote[] {
  const out: Vote[] = [];
  for (const f of findings) {
    if (f.topic !== 'responsiveness' || f.status !== 'assessed') continue;
    if (f.direction !== 'for' && f.direction !== 'against') continue;
    const tier = TIERS.find((x) => x === f.weight);
    if (tier) out.push({ finding: f, tier, dir: f.direction });
  }
  return out;
}

export function combineResponsiveness(
  findings: readonly Finding[],
  t: Pick<ResponsivenessThresholds, 'staticAgreementMinCount'>,
  nextTest: string,
): Verdict<Responsiveness> {
  const votes = votesOf(findings);
  const indeterminate = (rationale: string, decidingRules: string[]): Verdict<Responsiveness> =>
    ({ value: 'indeterminate', rationale, decidingRules, nextTest });

  for (const [i, tier] of TIERS.entries()) {
    const here = votes.filter((v) => v.tier === tier);
    if (here.length === 0) continue;
    const fors = here.filter((v) => v.dir === 'for').map((v) => v.finding);
    const againsts = here.filter((v) => v.dir === 'against').map((v) => v.finding);
    const ids = here.map((v) => v.finding.ruleId);
    if (fors.length && againsts.length) {
      return indeterminate(`Conflicting ${TIER_TEXT[tier]} evidence: ${list(fors)} for, ${list(againsts)} against fluid responsiveness.`, ids);
    }
    const agreeing = fors.length ? fors : againsts;
    if (tier === 'static' && agreeing.length < t.staticAgreementMinCount) {
      return indeterminate(
        `Only ${agreeing.length} static marker (${list(agreeing)}, ${fors.length ? 'for' : 'against'}) and no dynamic or extreme marker: `
        + `a single static marker does not decide.`, ids);
    }
    const value: Responsiveness = fors.length ? 'likely' : 'unlikely';
    const lower = votes.filter((v) => TIERS.indexOf(v.tier) > i);
    const outranked = lower.length
      ? `; outranked: ${lower.map((v) => `${nameOf(v.finding)} (${v.tier}, ${v.dir})`).join(', ')}`
      : '';
    return {
      value,
      rationale: `${TIER_TEXT[tier][0]?.toUpperCase()}${TIER_TEXT[tier].slice(1)} evidence points ${value === 'likely' ? 'to' : 'against'} fluid responsiveness: ${list(agreeing)}${outranked}.`,
      decidingRules: agreeing.map((f) => f.ruleId),
    };
  }
  const neutral = findings.filter((f) => f.topic === 'responsiveness' && f.status === 'assessed' && f.direction === 'neutral' && f.weight !== 'context');
  return indeterminate(
    neutral.length
      ? `No marker points either way: ${list(neutral)} inconclusive.`
      : 'No usable marker of fluid responsiveness.',
    [],
  );
}
