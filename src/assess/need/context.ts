/** What the need rules receive: their thresholds with the weight and urine charting settings of tolerance. */
import type { PerfusionFinding } from '../common/finding.js';
import type { Rule, RuleContext } from '../common/rule.js';
import type { ToleranceThresholds } from '../tolerance/thresholds.js';
import type { NeedThresholds } from './thresholds.js';

export type NeedSettings = NeedThresholds &
  Pick<
    ToleranceThresholds,
    | 'weightMaxAgeHours'
    | 'admissionWeightWindowHours'
    | 'balanceFallbackLookbackHours'
    | 'urinePointMaxGapMinutes'
    | 'urineRecencyMinutes'
    | 'urineCoverageFraction'
  >;
export type NeedContext = RuleContext<NeedSettings>;
export type NeedRule = Rule<NeedSettings, PerfusionFinding>;
