/** Truth tables: reading of the ordered bolus and the sepsis context. */
import { describe, expect, it } from 'vitest';
import { describeOrder } from '../../src/assess/order/describe-order.js';
import { fluidGivenWithin, sepsisContext } from '../../src/assess/order/sepsis-context.js';
import { DEFAULT_ORDER_THRESHOLDS as OT, orderThresholdsSchema } from '../../src/assess/order/thresholds.js';
import { fluid, m, NOW, one, order, snapshot } from '../helpers/tolerance-fixtures.js';

const kg70 = () => m('bodyWeight', 70, 600);

describe('describeOrder', () => {
  it('500 mL balanced crystalloid over 30 min, 70 kg', () => {
    const fs = describeOrder(order(), snapshot({ measurements: [kg70()] }), NOW, OT);
    expect(fs.map((f) => f.ruleId)).toEqual([
      'order.volume',
      'order.volume-per-kg',
      'order.intravascular-estimate',
      'order.sepsis-context',
    ]);
    expect(fs.every((f) => f.topic === 'order')).toBe(true);
    expect(one(fs, 'order.volume').values).toMatchObject({
      volumeMl: 500,
      durationMin: 30,
      rateMlPerHour: 1000,
      fluidClass: 'balanced-crystalloid',
    });
    expect(one(fs, 'order.volume-per-kg').values).toMatchObject({ volumeMlPerKg: 7.14, weightKg: 70, weightBasis: 'latest' });
    const est = one(fs, 'order.intravascular-estimate');
    expect(est.values).toMatchObject({
      intravascularAfterDistributionMl: 130,
      ruleOfThumbMl: 170,
      duringInfusionLowMl: 250,
      duringInfusionHighMl: 300,
      thirtyMinutesAfterHighMl: 100,
    });
    expect(est.text).toContain('About 130 mL of 500 mL');
    expect(est.text).toContain('4–6 h');
    expect(est.evidence[0]).toMatchObject({ ref: 'draftOrders#MedicationRequest/tm-bolus-1', value: 500, unit: 'mL' });
  });
  it('saline carries the slower-leaving note', () => {
    const est = one(describeOrder(order({ fluidClass: 'saline' }), snapshot(), NOW, OT), 'order.intravascular-estimate');
    expect(est.text).toContain('Saline');
  });
  it('albumin 5 %: about the volume; albumin 20 %: about twice the volume', () => {
    expect(
      one(describeOrder(order({ fluidClass: 'albumin-iso', volumeMl: 250 }), snapshot(), NOW, OT), 'order.intravascular-estimate').values,
    ).toMatchObject({ plasmaExpansionMl: 250 });
    expect(
      one(describeOrder(order({ fluidClass: 'albumin-hyper', volumeMl: 100 }), snapshot(), NOW, OT), 'order.intravascular-estimate').values,
    ).toMatchObject({ plasmaExpansionMl: 200, drawnFromInterstitiumMl: 100 });
  });
  it('no estimate for other colloids or an unknown class', () => {
    expect(one(describeOrder(order({ fluidClass: 'other-colloid' }), snapshot(), NOW, OT), 'order.intravascular-estimate').status).toBe(
      'not-assessed',
    );
    const noClass = order();
    delete noClass.fluidClass;
    expect(one(describeOrder(noClass, snapshot(), NOW, OT), 'order.intravascular-estimate').reason).toContain('not known');
  });
  it("absent volume: the edge's reason is passed on, and nothing per kg is made up", () => {
    const o = order({ volumeProblem: 'a rate with no duration: a continuous infusion, not a bolus volume' });
    delete o.volumeMl;
    const fs = describeOrder(o, snapshot({ measurements: [kg70()] }), NOW, OT);
    expect(one(fs, 'order.volume')).toMatchObject({ status: 'not-assessed', reason: o.volumeProblem });
    expect(one(fs, 'order.volume-per-kg').status).toBe('not-assessed');
    expect(one(fs, 'order.intravascular-estimate').status).toBe('not-assessed');
    expect(one(fs, 'order.sepsis-context').values!['withOrderMl']).toBeUndefined();
  });
  it('a non-fluid order gives one not-assessed finding', () => {
    const fs = describeOrder(order({ isFluid: false }), snapshot(), NOW, OT);
    expect(fs).toHaveLength(1);
    expect(fs[0]).toMatchObject({ ruleId: 'order.volume', status: 'not-assessed' });
  });
  it('weight: latest within 7 days, else the admission weight, else none', () => {
    const old = snapshot({ admittedMinutesAgo: 10 * 1440, measurements: [m('bodyWeight', 82, 10 * 1440 - 60)] });
    expect(one(describeOrder(order(), old, NOW, OT), 'order.volume-per-kg').values).toMatchObject({
      weightKg: 82,
      weightBasis: 'admission',
    });
    expect(one(describeOrder(order(), snapshot(), NOW, OT), 'order.volume-per-kg').reason).toBe('no body weight recorded');
  });
  it('wrong unit: a weight in [lb_av] is not used', () => {
    const s = snapshot({ measurements: [m('bodyWeight', 154, 60, { unit: '[lb_av]' })] });
    expect(one(describeOrder(order(), s, NOW, OT), 'order.volume-per-kg').status).toBe('not-assessed');
  });
});

describe('order.sepsis-context', () => {
  it('70 kg → 2,100 mL reference; fluid of the last 3 h spread over its period; with the order', () => {
    const s = snapshot({
      measurements: [kg70()],
      fluids: [fluid('balanced-crystalloid', 1000, 240, 120), fluid('albumin-iso', 250, 60, 45), fluid('saline', 500, 400, 300)],
    });
    const f = sepsisContext(s, NOW, OT, 500);
    // 1000 mL over 4 h → 2 h ago: half (500 mL) in the last 3 h; albumin 250 all in; the saline 5–6.7 h ago none.
    expect(f.values).toMatchObject({
      referenceMl: 2100,
      givenWindowMl: 750,
      crystalloidWindowMl: 500,
      withOrderMl: 1250,
      withOrderMlPerKg: 17.9,
    });
    expect(f).toMatchObject({ status: 'assessed', topic: 'order', part: 'sepsis-context' });
    expect(f.text).toContain('2,100 mL');
    expect(f.text).toContain('weak recommendation, low-quality evidence');
  });
  it('no administrations recorded → 0 mL, said as "recorded"', () => {
    const f = sepsisContext(snapshot({ measurements: [kg70()] }), NOW, OT);
    expect(f.values!['givenWindowMl']).toBe(0);
    expect(f.text).toContain('Recorded IV fluid');
  });
  it('absent weight → not assessed', () => {
    expect(sepsisContext(snapshot(), NOW, OT).status).toBe('not-assessed');
  });
  it('fluidGivenWithin ignores administrations that start in the future', () => {
    expect(fluidGivenWithin(snapshot({ fluids: [fluid('saline', 500, -30, -60)] }), NOW, 3).totalMl).toBe(0);
  });
  it('the figures are thresholds with defaults', () => {
    expect(orderThresholdsSchema.parse({})).toMatchObject({ sepsisMlPerKg: 30, sepsisWindowHours: 3, albuminHyperOncoticFactor: 2 });
    expect(orderThresholdsSchema.parse({}).crystalloidRetainedFraction).toBe(0.25);
    expect(orderThresholdsSchema.parse({}).crystalloidRuleOfThumbFraction).toBeCloseTo(1 / 3, 10);
    expect(orderThresholdsSchema.safeParse({ sepsisMlPerkg: 20 }).success).toBe(false);
  });
});
