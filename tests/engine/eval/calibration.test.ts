import { describe, expect, it } from 'vitest';
import { brierScore } from '../../../src/engine/evaluation/brier';
import { calibrationRegression, riskToLinearPredictor } from '../../../src/engine/evaluation/calibration';
import { calibrationCurve } from '../../../src/engine/evaluation/calibrationCurve';
import { hosmerLemeshow } from '../../../src/engine/evaluation/hosmerLemeshow';
import { clopperPearsonCi, wilsonCi } from '../../../src/engine/evaluation/proportionCi';
import { readJson, readNumericCsv } from './readCsv';

// Reference: R 4.2.2 stats glm(binomial) (offset, weights), confint.default, vcov, quantile(type = 7), cut, pchisq,
// prop.test(correct = FALSE), binom.test, on MASS::Pima.te predictions of a glm fitted on MASS::Pima.tr
// (script: tests/fixtures/reference/eval-calibration.R; the spline basis is written out by hand there).
const ref = readJson('reference/eval-calibration.json');
const d = readNumericCsv('data/eval-pima-te-predictions.csv');
const maxAbs = (a: number[], b: number[]) => Math.max(...a.map((v, i) => Math.abs(v - b[i])));

describe('Brier score on the Pima external test set', () => {
  it('matches R to 1e-14, unweighted and weighted', () => {
    for (const [res, r] of [
      [brierScore(d.y, d.p), ref.brier],
      [brierScore(d.y, d.p, d.w), ref.brierWeighted],
    ] as const) {
      expect(Math.abs(res.brier! - r.brier)).toBeLessThan(1e-14);
      expect(Math.abs(res.brierNull! - r.brierNull)).toBeLessThan(1e-14);
      expect(Math.abs(res.scaledBrier! - r.scaledBrier)).toBeLessThan(1e-13);
    }
  });
  it('leaves the scaled Brier undefined with a warning when every outcome is the same', () => {
    const res = brierScore(new Float64Array([1, 1]), new Float64Array([0.2, 0.9]));
    expect(res.scaledBrier).toBeNull();
    expect(res.warnings.map((w) => w.code)).toEqual(['one-class-only']);
  });
});

describe('calibration intercept and slope on the Pima external test set', () => {
  for (const [label, w, r] of [
    ['unweighted', undefined, ref.calibration],
    ['weighted', d.w, ref.calibrationWeighted],
  ] as const) {
    it(`matches glm(y ~ 1, offset = lp) and glm(y ~ lp) with confint.default, ${label}, to 1e-8`, () => {
      const res = calibrationRegression(d.y, d.lp, { weights: w });
      const c = res.interceptInTheLarge!;
      const s = res.slope!;
      expect(maxAbs([c.estimate, c.se, c.lower, c.upper], [r.citl, r.citlSe, r.citlLower, r.citlUpper])).toBeLessThan(
        1e-8,
      );
      expect(
        maxAbs([s.estimate, s.se, s.lower, s.upper], [r.slope, r.slopeSe, r.slopeLower, r.slopeUpper]),
      ).toBeLessThan(1e-8);
      expect(Math.abs(res.slopeModelIntercept! - r.slopeModelIntercept)).toBeLessThan(1e-8);
      expect(Math.abs(res.observedOverExpected! - r.oe)).toBeLessThan(1e-12);
      expect(res.warnings).toEqual([]);
    });
  }
  it('clips risks of exactly 0 or 1 with a warning that counts them', () => {
    const r = riskToLinearPredictor(new Float64Array([0, 0.5, 1]));
    expect(r.clipped).toBe(2);
    expect(r.eta[1]).toBe(0);
    expect(Number.isFinite(r.eta[0]) && Number.isFinite(r.eta[2])).toBe(true);
    expect(r.warnings.map((w) => w.code)).toEqual(['risk-clipped']);
  });
  it(
    'reports no slope (rather than a diverging estimate) with a warning when the predictions separate the ' +
      'outcome perfectly',
    () => {
      const res = calibrationRegression(
        new Float64Array([0, 0, 0, 1, 1, 1]),
        new Float64Array([-2, -1, -0.5, 0.5, 1, 2]),
      );
      expect(res.slope).toBeNull();
      expect(res.warnings.map((w) => w.code)).toContain('calibration-not-converged');
      const curve = calibrationCurve(
        new Float64Array([0, 0, 0, 1, 1, 1]),
        new Float64Array([-2, -1, -0.5, 0.5, 1, 2]),
        {
          knots: 3,
        },
      );
      expect(curve.ici).toBeNull();
      expect(curve.warnings.map((w) => w.code)).toContain('calibration-curve-not-converged');
    },
  );
  it('gives no slope and a warning when the linear predictor is constant', () => {
    const res = calibrationRegression(new Float64Array([0, 1, 0, 1]), new Float64Array(4).fill(0.2));
    expect(res.slope).toBeNull();
    expect(res.interceptInTheLarge!.estimate).toBeCloseTo(-0.2, 8);
    expect(res.warnings.map((w) => w.code)).toContain('calibration-slope-undefined');
  });
});

describe('flexible calibration curve on the Pima external test set', () => {
  for (const k of [3, 4, 5] as const) {
    it(
      `matches a hand-written rcs basis with ${k} knots fitted by glm(): curve, band, ICI, E50, E90, Emax to ` + `1e-8`,
      () => {
        const r = ref[`curve${k}`];
        const res = calibrationCurve(d.y, d.lp, { knots: k });
        expect(maxAbs(res.knots, r.knots)).toBeLessThan(1e-13);
        expect(maxAbs(res.predicted, r.predicted)).toBeLessThan(1e-13);
        expect(maxAbs(res.observed, r.observed)).toBeLessThan(1e-8);
        expect(maxAbs(res.lower, r.lower)).toBeLessThan(1e-8);
        expect(maxAbs(res.upper, r.upper)).toBeLessThan(1e-8);
        expect(maxAbs([res.ici!, res.e50!, res.e90!, res.emax!], [r.ici, r.e50, r.e90, r.emax])).toBeLessThan(1e-8);
      },
    );
  }
  it('matches the weighted glm() fit with 4 knots (ICI, Emax, curve) to 1e-8', () => {
    const r = ref.curve4Weighted;
    const res = calibrationCurve(d.y, d.lp, { knots: 4, weights: d.w });
    expect(maxAbs(res.observed, r.observed)).toBeLessThan(1e-8);
    expect(maxAbs([res.ici!, res.emax!], [r.ici, r.emax])).toBeLessThan(1e-8);
  });
  it('falls back to a straight line with a warning when predictions take only two values', () => {
    const y = new Float64Array([0, 1, 0, 0, 1, 1, 0, 1]);
    const eta = new Float64Array([-1, -1, -1, -1, 1, 1, 1, 1]);
    const res = calibrationCurve(y, eta);
    expect(res.knots).toEqual([]);
    expect(res.warnings.map((w) => w.code)).toContain('calibration-knots-reduced');
    expect(res.observed.every(Number.isFinite)).toBe(true);
  });
});

describe('Hosmer–Lemeshow (deciles of risk)', () => {
  it(
    'matches the hand-written R computation with cut(p, unique(quantile(p, 0:10/10)), include.lowest = TRUE) ' +
      'to 1e-10',
    () => {
      const r = ref.hosmerLemeshow;
      const res = hosmerLemeshow(d.y, d.p);
      expect(res.secondary).toBe(true);
      expect(res.df).toBe(r.df);
      expect(Math.abs(res.statistic! - r.statistic)).toBeLessThan(1e-10);
      expect(Math.abs(res.p! - r.p)).toBeLessThan(1e-10);
      expect(res.groups.map((g) => g.n)).toEqual(r.n);
      expect(res.groups.map((g) => g.observedEvents)).toEqual(r.observed);
      expect(
        maxAbs(
          res.groups.map((g) => g.expectedEvents),
          r.expected,
        ),
      ).toBeLessThan(1e-12);
    },
  );
  it('declines with a warning when the risks take only two values', () => {
    const res = hosmerLemeshow(new Float64Array([0, 1, 0, 1]), new Float64Array([0.2, 0.2, 0.7, 0.7]));
    expect(res.statistic).toBeNull();
    expect(res.warnings.map((w) => w.code)).toEqual(['hl-too-few-groups']);
  });
});

describe('proportion intervals', () => {
  for (const r of ref.proportions) {
    it(`matches prop.test(correct = FALSE) and binom.test for ${r.x}/${r.n} to 1e-10`, () => {
      const w = wilsonCi(r.x, r.n);
      const c = clopperPearsonCi(r.x, r.n);
      expect(maxAbs([w.lower!, w.upper!], [r.wilsonLower, r.wilsonUpper])).toBeLessThan(1e-10);
      expect(maxAbs([c.lower!, c.upper!], [r.cpLower, r.cpUpper])).toBeLessThan(1e-10);
    });
  }
  it('returns null bounds for n = 0 and throws for x > n', () => {
    expect(wilsonCi(0, 0).estimate).toBeNull();
    expect(() => clopperPearsonCi(3, 2)).toThrow(/between 0 and n/);
  });
});
