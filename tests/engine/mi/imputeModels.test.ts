import { describe, expect, it } from 'vitest';
import {
  drawChiSquare,
  drawLinear,
  drawLogistic,
  imputeCategorical,
} from '../../../src/engine/imputation/imputeModels';
import { newtonLogistic } from '../../../src/engine/fitting/newton';
import { createRng } from '../../../src/engine/numerics/rng';

function design(cols: Float64Array[]) {
  const n = cols[0].length;
  const X = new Float64Array(n * (cols.length + 1));
  X.fill(1, 0, n);
  cols.forEach((c, j) => X.set(c, (j + 1) * n));
  return { X, n, q: cols.length + 1 };
}
const all = (n: number) => Int32Array.from({ length: n }, (_, i) => i);

describe('drawChiSquare', () => {
  it('has mean df and variance 2·df (chi-square moments), also for df < 2', () => {
    const rng = createRng(11);
    for (const df of [1, 3.5, 40]) {
      const N = 40_000;
      let s = 0,
        s2 = 0;
      for (let i = 0; i < N; i++) {
        const x = drawChiSquare(rng, df);
        s += x;
        s2 += x * x;
      }
      const mean = s / N,
        v = s2 / N - mean * mean;
      expect(Math.abs(mean - df) / df).toBeLessThan(0.03);
      expect(Math.abs(v - 2 * df) / (2 * df)).toBeLessThan(0.08);
    }
  });
});

describe('drawLinear', () => {
  // y = 1 + 2x + e on 30 rows; posterior of β is multivariate t: mean β̂, covariance RSS/(df−2)·(X'X)⁻¹ (Rubin 1987
  // p.167).
  const rng0 = createRng(3);
  const n = 30;
  const x = Float64Array.from({ length: n }, () => rng0.normal());
  const y = Float64Array.from(x, (v) => 1 + 2 * v + 0.5 * rng0.normal());
  const d = design([x]);

  it('returns the least-squares coefficients and draws centred on them with the posterior spread', () => {
    let sx = 0,
      sy = 0,
      sxx = 0,
      sxy = 0;
    for (let i = 0; i < n; i++) {
      sx += x[i];
      sy += y[i];
      sxx += x[i] * x[i];
      sxy += x[i] * y[i];
    }
    const slope = (sxy - (sx * sy) / n) / (sxx - (sx * sx) / n);
    const icpt = sy / n - slope * (sx / n);
    const rng = createRng(5);
    const first = drawLinear(d, y, all(n), rng);
    expect(first.coef[0]).toBeCloseTo(icpt, 10);
    expect(first.coef[1]).toBeCloseTo(slope, 10);
    let rss = 0;
    for (let i = 0; i < n; i++) rss += (y[i] - icpt - slope * x[i]) ** 2;
    const varSlope = rss / (n - 2 - 2) / (sxx - (sx * sx) / n);
    const N = 20_000;
    let s = 0,
      s2 = 0;
    for (let k = 0; k < N; k++) {
      const b = drawLinear(d, y, all(n), rng).beta[1];
      s += b;
      s2 += b * b;
    }
    expect(Math.abs(s / N - slope)).toBeLessThan(4 * Math.sqrt(varSlope / N));
    expect(Math.abs((s2 / N - (s / N) ** 2) / varSlope - 1)).toBeLessThan(0.06);
  });

  it('gives an aliased (duplicated) predictor coefficient 0 and reports it', () => {
    const r = drawLinear(design([x, Float64Array.from(x)]), y, all(n), createRng(1));
    expect(r.aliased).toBe(1);
    expect(r.coef[2]).toBe(0);
    expect(r.beta[2]).toBe(0);
  });
});

describe('drawLogistic', () => {
  it('draws centred near the maximum-likelihood fit with spread of the inverse information, on 2000 rows', () => {
    const rng0 = createRng(8);
    const n = 2000;
    const x = Float64Array.from({ length: n }, () => rng0.normal());
    const y = Float64Array.from(x, (v) => (rng0.next() < 1 / (1 + Math.exp(-(-0.5 + v))) ? 1 : 0));
    const d = design([x]);
    const ml = newtonLogistic({ X: d.X, n, p: 2, y });
    const seSlope = Math.sqrt(ml.information[0] / (ml.information[0] * ml.information[3] - ml.information[1] ** 2));
    const rng = createRng(9);
    const N = 600;
    let s = 0,
      s2 = 0;
    for (let k = 0; k < N; k++) {
      const b = drawLogistic(d, y, all(n), rng).beta[1];
      s += b;
      s2 += b * b;
    }
    // The 4 augmentation rows (total weight 2) shrink β̂ a little; allow 2% of the slope.
    expect(Math.abs(s / N - ml.beta[1])).toBeLessThan(0.02 * Math.abs(ml.beta[1]));
    expect(Math.abs(Math.sqrt(s2 / N - (s / N) ** 2) / seSlope - 1)).toBeLessThan(0.1);
  });

  it('stays finite and converges under perfect separation thanks to the augmented rows', () => {
    const x = Float64Array.from({ length: 40 }, (_, i) => i);
    const y = Float64Array.from(x, (v) => (v >= 20 ? 1 : 0));
    const r = drawLogistic(design([x]), y, all(40), createRng(2));
    expect(r.converged).toBe(true);
    expect(Array.from(r.beta).every(Number.isFinite)).toBe(true);
  });
});

describe('imputeCategorical', () => {
  it('reproduces the level shares given a predictor for a three-level column (baseline-category logits)', () => {
    const rng = createRng(21);
    const n = 6000;
    const x = Float64Array.from({ length: n }, () => (rng.next() < 0.5 ? 1 : 0));
    // P(level | x): x = 0 → (0.6, 0.3, 0.1); x = 1 → (0.2, 0.3, 0.5)
    const codes = Int32Array.from(x, (v) => {
      const u = rng.next();
      const p = v === 0 ? [0.6, 0.3] : [0.2, 0.3];
      return u < p[0] ? 0 : u < p[0] + p[1] ? 1 : 2;
    });
    const obs = Int32Array.from({ length: n / 2 }, (_, i) => i);
    const mis = Int32Array.from({ length: n / 2 }, (_, i) => i + n / 2);
    // Averaged over 20 imputations, the imputed shares given x match the observed shares given x (the fitted model).
    const imp = [
        [0, 0, 0],
        [0, 0, 0],
      ],
      seen = [
        [0, 0, 0],
        [0, 0, 0],
      ];
    for (const i of obs) seen[x[i]][codes[i]]++;
    for (let k = 0; k < 20; k++) {
      const r = imputeCategorical(design([x]), codes, 3, obs, mis, rng);
      mis.forEach((i, r2) => imp[x[i]][r.codes[r2]]++);
    }
    for (const xv of [0, 1]) {
      const share = (t: number[]) => t.map((c) => c / (t[0] + t[1] + t[2]));
      const a = share(imp[xv]),
        b = share(seen[xv]);
      a.forEach((s, l) => expect(Math.abs(s - b[l])).toBeLessThan(0.02));
    }
  });

  it('imputes the only observed level when just one is present', () => {
    const codes = Int32Array.from([2, 2, -1, 2]);
    const r = imputeCategorical(
      design([Float64Array.from([1, 2, 3, 4])]),
      codes,
      3,
      Int32Array.from([0, 1, 3]),
      Int32Array.from([2]),
      createRng(1),
    );
    expect(Array.from(r.codes)).toEqual([2]);
  });
});
