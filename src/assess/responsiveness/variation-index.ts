/**
 * Shared logic of the PPV and SVV rules: the newest value within its window and not set aside by a later fluid or
 * vasoactive change, read by the direction of the error of each validity condition (heart-lung-validity.ts):
 * value ≥ threshold → for, unless a false-positive condition holds; value < grey-zone low → against, unless a
 * false-negative condition holds; in between → neutral (grey zone). Spontaneous effort or arrhythmia void it.
 */
import type { ResponsivenessFinding } from '../common/finding.js';
import { evidenceOfMeasurement, latestReading } from '../common/select.js';
import { fmt } from '../common/text.js';
import type { RuleContext } from './context.js';
import { assessed, notAssessed, unusableFinding } from './finding.js';
import { conditionText, ppvSvvConditions, summarizeValidity } from './heart-lung-validity.js';

export interface VariationIndexSpec {
  ruleId: string;
  kind: 'ppv' | 'svv';
  label: string;
  thresholdPercent: number;
  greyZoneLowPercent: number;
  source: string;
}

export function assessVariationIndex(ctx: RuleContext, spec: VariationIndexSpec): ResponsivenessFinding {
  const sel = latestReading(ctx.snapshot, spec.kind, ctx.now, ctx.w.ppvSvvMin, { events: ctx.events });
  const marker = spec.kind;
  if (sel.state !== 'fresh') {
    return unusableFinding(sel, {
      ruleId: spec.ruleId,
      marker,
      label: spec.label,
      source: spec.source,
      evidenceOf: (m) => evidenceOfMeasurement(m, ctx.now),
    });
  }
  const value = sel.item.value;
  const v = summarizeValidity(ppvSvvConditions(ctx));
  const evidence = [evidenceOfMeasurement(sel.item, ctx.now), ...v.evidence];
  const values = { [`${spec.kind}Percent`]: value, ...v.values };
  const assumptions = v.assumed.map((c) => c.detail);
  const shown = (why: string, reason: string) =>
    notAssessed({
      ruleId: spec.ruleId,
      marker,
      text: `${spec.label} ${fmt(value, 1)} % shown but not used: ${why}`,
      reason,
      gap: 'outside-validity',
      evidence,
      source: spec.source,
      values,
    });
  if (v.voiding.length) {
    return shown(
      `not valid (${conditionText(v.voiding)})`,
      `outside validity either way: ${v.voiding.map((c) => `${c.label} not met (${c.detail})`).join('; ')}`,
    );
  }
  const thr = spec.thresholdPercent;
  const low = Math.min(spec.greyZoneLowPercent, thr);
  if (value >= thr) {
    if (v.falsePositive.length) {
      return shown(
        `a high value is doubtful with ${conditionText(v.falsePositive)}`,
        `false positives likely (${v.falsePositive.map((c) => c.label).join('; ')} not met)`,
      );
    }
    const note = v.falseNegative.length ? `; usable although ${conditionText(v.falseNegative)} (that error only lowers the value)` : '';
    return assessed({
      ruleId: spec.ruleId,
      marker,
      direction: 'for',
      tier: 'dynamic',
      assumptions,
      text: `${spec.label} ${fmt(value, 1)} % (≥ ${fmt(thr, 1)} %): points to fluid responsiveness${note}`,
      evidence,
      source: spec.source,
      values,
    });
  }
  if (value < low) {
    if (v.falseNegative.length) {
      return shown(
        `a low value cannot be read with ${conditionText(v.falseNegative)}`,
        `false negatives likely (${v.falseNegative.map((c) => c.label).join('; ')} not met)`,
      );
    }
    return assessed({
      ruleId: spec.ruleId,
      marker,
      direction: 'against',
      tier: 'dynamic',
      assumptions,
      text: `${spec.label} ${fmt(value, 1)} % (< ${fmt(low, 1)} %), validity conditions met: points against fluid responsiveness`,
      evidence,
      source: spec.source,
      values,
    });
  }
  return assessed({
    ruleId: spec.ruleId,
    marker,
    direction: 'neutral',
    tier: 'dynamic',
    assumptions,
    text: `${spec.label} ${fmt(value, 1)} % in the grey zone (${fmt(low, 1)}–${fmt(thr, 1)} %): inconclusive`,
    evidence,
    source: spec.source,
    values: { ...values, greyZone: true },
  });
}
