import { describe, expect, it } from 'vitest';
import { decisionCurve, netBenefitTreatAll } from '../../../src/engine/evaluation/netBenefit';
import { prepareThresholds, thresholdGrid } from '../../../src/engine/evaluation/threshold';

describe('decision curve', () => {
  it(
    'gives treat-all net benefit 0.125 at a 20% threshold and −0.400 at 50% when prevalence is 0.30 ' +
      '(Vickers–Elkin formula arithmetic)',
    () => {
      expect(netBenefitTreatAll(0.3, 0.2)).toBeCloseTo(0.125, 15);
      expect(netBenefitTreatAll(0.3, 0.5)).toBeCloseTo(-0.4, 15);
    },
  );
  it(
    'computes model net benefit and interventions avoided from the flagged counts (hand count, 10 cases, ' +
      'prevalence 0.3)',
    () => {
      const y = new Float64Array([1, 1, 1, 0, 0, 0, 0, 0, 0, 0]);
      const p = new Float64Array([0.8, 0.6, 0.1, 0.5, 0.3, 0.1, 0.1, 0.05, 0.05, 0.05]);
      const dc = decisionCurve(prepareThresholds(y, p), new Float64Array([0.2, 0.5]));
      expect(dc.prevalence).toBeCloseTo(0.3, 15);
      // at 0.2: flagged 0.8, 0.6, 0.5, 0.3 → TP 2, FP 2 → 0.2 − 0.2·0.25 = 0.15
      expect(dc.model[0]).toBeCloseTo(0.15, 15);
      expect(dc.treatAll[0]).toBeCloseTo(0.125, 15);
      expect(dc.interventionsAvoidedPer100[0]).toBeCloseTo(((0.15 - 0.125) / 0.25) * 100, 12);
      // at 0.5: flagged 0.8, 0.6, 0.5 → TP 2, FP 1 → 0.2 − 0.1·1 = 0.1
      expect(dc.model[1]).toBeCloseTo(0.1, 15);
      expect(dc.treatNone).toEqual([0, 0]);
    },
  );
  it('uses the default grid 0.01..0.99 and rejects thresholds of 0 or 1', () => {
    const prep = prepareThresholds(new Float64Array([0, 1]), new Float64Array([0.3, 0.7]));
    const dc = decisionCurve(prep);
    expect(dc.thresholds.length).toBe(99);
    expect(dc.thresholds[0]).toBe(0.01);
    expect(dc.thresholds[98]).toBe(0.99);
    expect(() => decisionCurve(prep, thresholdGrid(0, 1, 0.5))).toThrow(/strictly between 0 and 1/);
  });
});
