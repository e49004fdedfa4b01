/** What every responsiveness rule receives (the common RuleContext with this group's thresholds) and the rule shape. */
import type { Rule, RuleContext as CommonRuleContext } from '../common/rule.js';
import type { ResponsivenessFinding } from '../common/finding.js';
import type { ResponsivenessThresholds } from './thresholds.js';

export type RuleContext = CommonRuleContext<ResponsivenessThresholds>;
export type ResponsivenessRule = Rule<ResponsivenessThresholds, ResponsivenessFinding>;
