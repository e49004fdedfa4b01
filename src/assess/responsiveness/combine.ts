/**
 * Combination of the responsiveness findings into one verdict with its confidence, by evidence tier
 * (docs/clinical-logic/index.md, "Evidence tiers"):
 *   dynamic — a test with a flow read-out (PLR, EEO, mini fluid challenge, tidal volume challenge, a bolus with dense
 *             flow data) or a valid PPV/SVV: decides. Agreeing votes → likely/unlikely, confidence 'high' when a flow
 *             test decides, 'moderate' when only PPV/SVV do; disagreeing votes → indeterminate (conflict named).
 *   static  — CVP extremes, IVC, PLR/EEO by pulse pressure, the hourly pressure change after a bolus: corroborate
 *             only. Without a dynamic vote, at least `staticAgreementMinCount` (2) agreeing statics and none against
 *             give a verdict of LOW confidence; a conflict gives indeterminate; a single static never decides.
 *   context — never votes.
 * Stale, missing, set-aside and invalid data never reach a vote (not-assessed findings).
 */
import type { Marker, ResponsivenessFinding } from '../common/finding.js';
import type { Confidence, NextTestKind, Responsiveness, Verdict } from '../types.js';
import type { ResponsivenessThresholds } from './thresholds.js';

/** Short names of the markers for rationales. */
export const MARKER_NAME: Record<Marker, string> = {
  ppv: 'PPV',
  svv: 'SVV',
  plr: 'PLR',
  'mini-fluid-challenge': 'mini fluid challenge',
  'end-expiratory-occlusion': 'end-expiratory occlusion',
  'tidal-volume-challenge': 'tidal volume challenge',
  ivc: 'IVC',
  cvp: 'CVP',
  'last-bolus': 'last-bolus response',
  'lv-function': 'LV function',
};
const INDEX_MARKERS: ReadonlySet<Marker> = new Set(['ppv', 'svv']);
const nameOf = (f: ResponsivenessFinding) => MARKER_NAME[f.marker];
const list = (fs: readonly ResponsivenessFinding[]) => fs.map(nameOf).join(', ');

interface Vote {
  finding: ResponsivenessFinding;
  tier: 'dynamic' | 'static';
  dir: 'for' | 'against';
}

export function votesOf(findings: readonly ResponsivenessFinding[]): Vote[] {
  const out: Vote[] = [];
  for (const f of findings) {
    if (f.status !== 'assessed' || (f.direction !== 'for' && f.direction !== 'against')) continue;
    if (f.tier === 'dynamic' || f.tier === 'static') out.push({ finding: f, tier: f.tier, dir: f.direction });
  }
  return out;
}

export function combineResponsiveness(
  findings: readonly ResponsivenessFinding[],
  t: Pick<ResponsivenessThresholds, 'staticAgreementMinCount'>,
  nextTest: NextTestKind,
): Verdict<Responsiveness> {
  const votes = votesOf(findings);
  const assumptions = [...new Set(findings.filter((f) => f.status === 'assessed').flatMap((f) => f.assumptions ?? []))];
  const extra = { nextTest, ...(assumptions.length ? { assumptions } : {}) };
  const indeterminate = (rationale: string, decidingRules: string[]): Verdict<Responsiveness> => ({
    value: 'indeterminate',
    rationale,
    decidingRules,
    ...extra,
  });

  const dynamic = votes.filter((v) => v.tier === 'dynamic');
  const statics = votes.filter((v) => v.tier === 'static');
  const split = (vs: Vote[]) => ({
    fors: vs.filter((v) => v.dir === 'for').map((v) => v.finding),
    againsts: vs.filter((v) => v.dir === 'against').map((v) => v.finding),
  });

  if (dynamic.length) {
    const { fors, againsts } = split(dynamic);
    if (fors.length && againsts.length) {
      return indeterminate(
        `Conflicting dynamic evidence: ${list(fors)} for, ${list(againsts)} against fluid responsiveness.`,
        dynamic.map((v) => v.finding.ruleId),
      );
    }
    const agreeing = fors.length ? fors : againsts;
    const value: Responsiveness = fors.length ? 'likely' : 'unlikely';
    const confidence: Confidence = agreeing.some((f) => !INDEX_MARKERS.has(f.marker)) ? 'high' : 'moderate';
    const outranked = statics.length
      ? `; static markers only corroborate: ${statics.map((v) => `${nameOf(v.finding)} (${v.dir})`).join(', ')}`
      : '';
    return {
      value,
      confidence,
      ...extra,
      rationale: `Dynamic evidence points ${value === 'likely' ? 'to' : 'against'} fluid responsiveness: ${list(agreeing)}${outranked}.`,
      decidingRules: agreeing.map((f) => f.ruleId),
    };
  }
  if (statics.length) {
    const { fors, againsts } = split(statics);
    if (fors.length && againsts.length) {
      return indeterminate(
        `Conflicting static markers (${list(fors)} for, ${list(againsts)} against) and no dynamic test.`,
        statics.map((v) => v.finding.ruleId),
      );
    }
    const agreeing = fors.length ? fors : againsts;
    if (agreeing.length < t.staticAgreementMinCount) {
      return indeterminate(
        `Only ${agreeing.length} static marker (${list(agreeing)}, ${fors.length ? 'for' : 'against'}) and no dynamic test: a static marker only corroborates.`,
        agreeing.map((f) => f.ruleId),
      );
    }
    const value: Responsiveness = fors.length ? 'likely' : 'unlikely';
    return {
      value,
      confidence: 'low',
      ...extra,
      rationale: `${agreeing.length} static markers agree (${list(agreeing)}) and no dynamic test: ${value === 'likely' ? 'probably responsive' : 'response probably absent'}, low confidence.`,
      decidingRules: agreeing.map((f) => f.ruleId),
    };
  }
  const neutral = findings.filter((f) => f.status === 'assessed' && f.direction === 'neutral' && f.tier !== 'context');
  return indeterminate(
    neutral.length ? `No marker points either way: ${list(neutral)} inconclusive.` : 'No usable marker of fluid responsiveness.',
    [],
  );
}
