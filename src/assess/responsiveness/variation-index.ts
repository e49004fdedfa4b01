/**
 * Shared logic of the PPV and SVV rules: the newest fresh value, gated by the heart–lung validity conditions,
 * read against a threshold with a grey zone below it. Boundaries: value ≥ threshold → for; value < grey-zone
 * low → against; grey-zone low ≤ value < threshold → neutral (inconclusive).
 */
import type { Finding } from '../types.js';
import type { RuleContext } from './context.js';
import { assessed, fmt, notAssessed, unusableFinding } from './finding.js';
import { ppvSvvConditions, summarizeValidity } from './heart-lung-validity.js';
import { evidenceOfMeasurement, latestMeasurement } from './select.js';

export interface VariationIndexSpec {
  ruleId: string;
  kind: 'ppv' | 'svv';
  label: string;
  thresholdPercent: number;
  greyZoneLowPercent: number;
  source: string;
}

export function assessVariationIndex(ctx: RuleContext, spec: VariationIndexSpec): Finding {
  const sel = latestMeasurement(ctx.snapshot, spec.kind, ctx.now, ctx.t.ppvSvvMaxAgeMin);
  if (sel.state !== 'fresh') {
    return unusableFinding(sel, { ruleId: spec.ruleId, label: spec.label, source: spec.source, evidenceOf: (m) => evidenceOfMeasurement(m, ctx.now) });
  }

  const value = sel.item.value;
  const valueKey = `${spec.kind}Percent`;
  const validity = summarizeValidity(ppvSvvConditions(ctx));
  const evidence = [evidenceOfMeasurement(sel.item, ctx.now), ...validity.evidence];
  const values = { [valueKey]: value, ...validity.values };
  if (validity.state !== 'met') {
    const short = validity.state === 'failed'
      ? `outside validity (${validity.failed.map((c) => c.detail).join('; ')})`
      : `validity could not be checked (${validity.unknown.map((c) => c.label).join('; ')})`;
    return notAssessed({
      ruleId: spec.ruleId,
      text: `${spec.label} ${fmt(value)} % shown but not used: ${short}`,
      reason: validity.reason,
      evidence, source: spec.source, values: { ...values, freshness: 'fresh', validity: validity.state },
    });
  }
  const thr = spec.thresholdPercent;
  const low = Math.min(spec.greyZoneLowPercent, thr);
  if (value >= thr) {
    return assessed({
      ruleId: spec.ruleId, direction: 'for', weight: 'dynamic',
      text: `${spec.label} ${fmt(value)} % (≥ ${fmt(thr)} %), validity conditions met: points to fluid responsiveness`,
      evidence, source: spec.source, values: { ...values, validity: 'met' },
    });
  }
  if (value < low) {
    return assessed({
      ruleId: spec.ruleId, direction: 'against', weight: 'dynamic',
      text: `${spec.label} ${fmt(value)} % (< ${fmt(low)} %), validity conditions met: points against fluid responsiveness`,
      evidence, source: spec.source, values: { ...values, validity: 'met' },
    });
  }
  return assessed({
    ruleId: spec.ruleId, direction: 'neutral', weight: 'dynamic',
    text: `${spec.label} ${fmt(value)} % in the grey zone (${fmt(low)}–${fmt(thr)} %): inconclusive`,
    evidence, source: spec.source, values: { ...values, validity: 'met', greyZone: true },
  });
}
