import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import {
  funnelRatioLimits,
  garwoodCount,
  observedExpectedRatio,
  poissonLimitCount,
  qpois,
} from '../../../src/engine/monitoring';

const ref = JSON.parse(readFileSync('tests/fixtures/reference/monitoring-poisson.json', 'utf8')) as {
  limits: { expected: number[]; p: number[]; r: number[]; limit: number[] };
  garwood95: { observed: number[]; lower: number[]; upper: number[] };
};

describe('exact Poisson limits', () => {
  // Reference: R 4.2.2 stats qpois / ppois / dpois (tests/fixtures/reference/monitoring-poisson.R).
  it('gives the quantile of R qpois at every expected count and tail', () => {
    ref.limits.expected.forEach((e, i) => expect(qpois(ref.limits.p[i], e) === ref.limits.r[i]).toBe(true));
  });

  // Reference: R 4.2.2 qpois/ppois/dpois with Spiegelhalter's (2005, Stat Med 24:1185, appendix A.1) interpolation.
  it('gives the interpolated funnel limit of the R computation to 1e-9 (relative)', () => {
    ref.limits.expected.forEach((e, i) => {
      const want = ref.limits.limit[i];
      expect(Math.abs(poissonLimitCount(ref.limits.p[i], e) - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, want));
    });
  });

  it('puts the O/E limits around 1 and narrows them as E grows (common practice)', () => {
    const small = funnelRatioLimits(0.998, 5),
      large = funnelRatioLimits(0.998, 500);
    expect(small.lower).toBeLessThan(large.lower);
    expect(small.upper).toBeGreaterThan(large.upper);
    expect(large.lower).toBeLessThan(1);
    expect(large.upper).toBeGreaterThan(1);
  });

  // Reference: R 4.2.2 stats qchisq (Garwood 1936 interval), same fixture.
  it('gives the Garwood 95 % interval of R qchisq to 1e-10 (relative)', () => {
    ref.garwood95.observed.forEach((o, i) => {
      const g = garwoodCount(o, 0.95);
      expect(Math.abs(g.lower - ref.garwood95.lower[i])).toBeLessThanOrEqual(1e-10 * Math.max(1, g.lower));
      expect(Math.abs(g.upper - ref.garwood95.upper[i])).toBeLessThanOrEqual(1e-10 * g.upper);
    });
  });

  it('divides the count interval by E for O/E, and gives nulls when E is 0', () => {
    const r = observedExpectedRatio(17, 12.5, 0.95);
    const g = garwoodCount(17, 0.95);
    expect(r.estimate).toBeCloseTo(17 / 12.5, 14);
    expect(r.lower).toBeCloseTo(g.lower / 12.5, 14);
    expect(observedExpectedRatio(0, 0, 0.95)).toEqual({ estimate: null, lower: null, upper: null });
  });
});
