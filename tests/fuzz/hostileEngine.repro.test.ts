import { describe, expect, it } from 'vitest';
import { calibrationCurve } from '../../src/engine/evaluation/calibrationCurve';
import { FulcraError, type Dataset, type NumericColumn } from '../../src/engine/core/data';
import { fit } from '../../src/engine/fitting/fit';
import { predict, predictOne } from '../../src/engine/fitting/predict';
import type { TermSpec } from '../../src/engine/core/model';
import { createRng } from '../../src/engine/numerics/rng';
import { nonFinitePaths } from './walk';

/**
 * Minimal reproductions of engine bugs found by engine.fuzz.test.ts. An open bug is an `it.fails` naming the file and
 * the cause (when it is fixed vitest reports the `it.fails` as failed: turn it into a plain `it`). Fixed bugs stay
 * here as plain regression tests, their comment saying what used to go wrong.
 */

const N = 40;
const rng = createRng(20261202);
const y = Float64Array.from({ length: N }, (_, i) => (i % 3 === 0 ? 1 : 0));
const z = Float64Array.from({ length: N }, () => rng.normal());
const u = Float64Array.from({ length: N }, () => rng.normal());
const num = (name: string, values: Float64Array): NumericColumn => ({ kind: 'numeric', name, values });
const data = (x: Float64Array): Dataset => ({ nRows: N, columns: [num('y', y), num('z', z), num('x', x)] });
const main = (column: string): TermSpec => ({ type: 'main', column });
const fitX = (x: Float64Array, terms: TermSpec[] = [main('z'), main('x')]) =>
  fit(data(x), { outcome: 'y', terms }, { profile: false });

describe('engine fuzz findings: reproductions and regression tests', () => {
  it('control: a predictor on an ordinary scale is estimated and the record is finite', () => {
    const r = fitX(u);
    expect(r.coefficients[2].aliased).toBe(false);
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // Fixed (regression test). Was: standardise.ts:19 sums the column before dividing by n: 40 × 1e307 overflows to
  // Infinity, the column is dropped as constant (right) but fit.ts:90 then computes 0 · Infinity = NaN for the
  // intercept. Fix: mean as Σ x/n (or skip aliased columns in originalScaleBeta).
  it('gives a finite intercept when a constant predictor is 1e307 in every row', () => {
    const r = fitX(new Float64Array(N).fill(1e307));
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // Fixed (regression test). Was: standardise.ts:22 squares deviations of ~1e300, which overflow to Infinity, so a
  // varying column is treated as having no spread and reported "the same value in every row" (it is not). Fix: scale
  // by max |x − m| before squaring (two-pass with rescaling).
  it('estimates a varying predictor measured in units of 1e300 (scale equivariance)', () => {
    const small = fitX(u),
      big = fitX(Float64Array.from(u, (v) => v * 1e300));
    expect(big.coefficients[2].aliased).toBe(false);
    expect(big.coefficients[2].estimate * 1e300).toBeCloseTo(small.coefficients[2].estimate, 6);
  });

  // Fixed (regression test). Was: standardise.ts:22: squared deviations of ~1e-170 underflow to 0, the scale falls
  // back to 1 and the column (values ~1e-170 next to standardised ones) is dropped as "a copy of" another predictor.
  // Same fix.
  it('estimates a varying predictor measured in units of 1e-170 (scale equivariance)', () => {
    const small = fitX(u),
      tiny = fitX(Float64Array.from(u, (v) => v * 1e-170));
    expect(tiny.coefficients[2].aliased).toBe(false);
    expect(tiny.coefficients[2].estimate * 1e-170).toBeCloseTo(small.coefficients[2].estimate, 6);
  });

  // Fixed (regression test). Was: splines.ts:49 cubes x − t before dividing by (t_k − t_1)²: for |x − t| > ~5.6e102
  // the cube is Infinity, the basis column is Infinity/NaN, it is dropped as aliased without saying why, and fit.ts:90
  // makes the intercept NaN. Fix: evaluate ((x − t)/s)³·s with s = t_k − t_1 (same value, no overflow), and reject
  // non-finite design columns with a FulcraError naming the column.
  it('fits a 3-knot spline of a predictor measured in units of 1e150', () => {
    const r = fitX(
      Float64Array.from(u, (v) => v * 1e150),
      [main('z'), { type: 'spline', column: 'x', knots: 3 }],
    );
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // Fixed (regression test). Was: splines.ts:47: (t_k − t_1)² underflows to 0 for a spread of ~1e-300, so the basis is
  // 0/0 = NaN. Same fix.
  it('fits a 3-knot spline of a predictor measured in units of 1e-300', () => {
    const r = fitX(
      Float64Array.from(u, (v) => v * 1e-300),
      [main('z'), { type: 'spline', column: 'x', knots: 3 }],
    );
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // Fixed (regression test). Was: design.ts:147 multiplies the parts of an interaction without checking the product:
  // 1e300 × 1e9 = Infinity, the product column is dropped as aliased and the intercept becomes NaN (fit.ts:90). Fix:
  // check every design column for non-finite values and throw FulcraError('design-overflow') naming the term, with the
  // suggestion to rescale.
  it('never returns a NaN intercept when an interaction product leaves the double range', () => {
    const big = Float64Array.from(u, (v) => 1e300 * (1 + Math.abs(v)));
    const d: Dataset = {
      nRows: N,
      columns: [
        num('y', y),
        num(
          'z',
          Float64Array.from(z, (v) => 1e9 * v),
        ),
        num('x', big),
      ],
    };
    let r: unknown;
    try {
      r = fit(
        d,
        { outcome: 'y', terms: [main('z'), main('x'), { type: 'interaction', columns: ['z', 'x'] }] },
        { profile: false },
      );
    } catch (e) {
      expect((e as Error).name).toBe('FulcraError');
      return;
    }
    expect(nonFinitePaths(r)).toEqual([]);
  });

  // calibrationCurve.ts:147: the grid runs to the risk at the 99th percentile of eta; for eta ≳ 36.7 that risk rounds
  // to exactly 1, log(1/0) = Infinity and the last grid point's observed risk and band are NaN. Fix: build the grid on
  // the eta scale, or clip pg to [RISK_CLIP, 1 − RISK_CLIP] before the logit. Data: a quasi-separated fit from the
  // fuzz run (fit: 28 rows, ML), outcome and linear predictor as returned.
  it('draws a finite calibration curve when the largest linear predictors exceed 37', () => {
    const yy = Float64Array.from([1, 1, 1, 0, 1, 1, 0, 1, 0, 1, 1, 0, 1, 0, 1, 1, 1, 1, 1, 1, 1, 0, 0, 1, 1, 1, 0, 1]);
    const eta = Float64Array.from([
      28.1606, 28.2041, 0.0422, -18.5344, 819.431, -0.1235, 0.537, 1.7761, 0.7343, 0.7756, 18.5021, 0.4806, 1.069,
      -3.8257, 0.4998, 1.5581, 0.3201, 1.5344, 0.8431, 22814.26, 28.1939, 0.4454, 0.0689, 4436.68, -0.1545, 28.1695,
      0.6279, 28.2136,
    ]);
    const c = calibrationCurve(yy, eta);
    expect(c.observed.length).toBeGreaterThan(0);
    expect(nonFinitePaths(c)).toEqual([]);
  });

  // Fixed (regression test). Was: predict.ts:35 sums β·x without a check: a new case with x = ±1.7e308 gives η =
  // ±Infinity, and line 49/50 then computes sigmoid(Infinity − Infinity) = NaN for one CI bound, with no warning. Fix:
  // throw FulcraError('value-out-of-range') naming the row and column when η is not finite (or warn and report null).
  it('scores a new case at the edge of the double range without an infinite η or a NaN interval', () => {
    const r = fitX(u);
    const newData: Dataset = {
      nRows: 2,
      columns: [
        num('z', Float64Array.of(0, 0)),
        num('x', Float64Array.of((1.7e308 / Math.abs(r.coefficients[2].estimate)) * 2, 1)),
      ],
    };
    let out: unknown;
    try {
      out = predict(r, newData);
    } catch (e) {
      expect(e).toBeInstanceOf(FulcraError);
      return;
    }
    expect(nonFinitePaths(out)).toEqual([]);
  });

  // Fixed (regression test). Was: predict.ts:71 reads a typed value with Number(): "   " becomes 0 and "0x10" becomes
  // 16, silently. A blank entry should be "no value" (FulcraError 'missing-value') and text should be read like an
  // imported cell (decimal numbers only; parseNumberText in src/io/cellText.ts), else FulcraError 'not-numeric'.
  it('does not read a blank or hexadecimal entry as a number when scoring one case', () => {
    const r = fitX(u);
    expect(() => predictOne(r, { z: 0, x: '   ' })).toThrow(FulcraError);
    expect(() => predictOne(r, { z: 0, x: '0x10' })).toThrow(FulcraError);
  });
});
