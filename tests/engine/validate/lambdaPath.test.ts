import { describe, expect, it } from 'vitest';
import { penalisedLogistic, type PenalisedProblem } from '../../../src/engine/penalised/coordinateDescent';
import { lambdaPath } from '../../../src/engine/penalised/lambdaPath';
import { readFixture, readPima } from './pimaData';

interface GlmnetFixture {
  fixed: { alpha: number; lambda: number; coef: number[] }[];
  paths: { alpha: number; lambda: number[]; df: number[]; coef: number[][] }[];
}
// Reference: R 4.2.2, glmnet 4.1.6, glmnet(family='binomial', thresh=1e-16) on MASS::Pima.tr (glmnet-pima.R).
const ref = readFixture<GlmnetFixture>('glmnet-pima.json');
const pima = readPima('tr');
const problem: PenalisedProblem = { X: pima.X, n: pima.n, p: pima.p, y: pima.y };

/** Largest violation of the elastic-net KKT conditions on the standardised (1/n variance) scale. */
function kktViolation(prob: PenalisedProblem, coef: ArrayLike<number>, alpha: number, lambda: number): number {
  const { X, n, p, y } = prob;
  const eta = new Float64Array(n).fill(coef[0]);
  for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) eta[i] += coef[j + 1] * X[j * n + i];
  const res = Array.from(eta, (e, i) => y[i] - 1 / (1 + Math.exp(-e)));
  let worst = Math.abs(res.reduce((a, b) => a + b, 0) / n);
  for (let j = 0; j < p; j++) {
    let m = 0;
    for (let i = 0; i < n; i++) m += X[j * n + i] / n;
    let v = 0;
    for (let i = 0; i < n; i++) v += (X[j * n + i] - m) ** 2 / n;
    const sd = Math.sqrt(v),
      b = coef[j + 1] * sd;
    let g = 0;
    for (let i = 0; i < n; i++) g += (((X[j * n + i] - m) / sd) * res[i]) / n;
    const viol =
      b !== 0
        ? Math.abs(g - lambda * (1 - alpha) * b - lambda * alpha * Math.sign(b))
        : Math.max(0, Math.abs(g) - lambda * alpha);
    worst = Math.max(worst, viol);
  }
  return worst;
}

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let d = 0;
  for (let k = 0; k < a.length; k++) d = Math.max(d, Math.abs(a[k] - b[k]));
  return d;
}

describe('penalisedLogistic at a fixed λ', () => {
  for (const f of ref.fixed) {
    it(
      `matches glmnet 4.1.6 on MASS::Pima.tr (alpha=${f.alpha}, lambda=${f.lambda}) to 1e-6 and satisfies KKT ` +
        `to 1e-10`,
      () => {
        const fit = penalisedLogistic(problem, f.alpha, f.lambda);
        expect(fit.converged).toBe(true);
        expect(kktViolation(problem, fit.coefficients, f.alpha, f.lambda)).toBeLessThan(1e-10);
        // relative on the standardised scale is what glmnet controls; compare coefficients absolutely
        // scaled by max(1, |glmnet value|).
        for (let k = 0; k < f.coef.length; k++) {
          expect(Math.abs(fit.coefficients[k] - f.coef[k]) / Math.max(1, Math.abs(f.coef[k]))).toBeLessThan(1e-6);
          expect(fit.coefficients[k] === 0).toBe(f.coef[k] === 0);
        }
      },
    );
  }
});

describe('lambdaPath', () => {
  for (const r of ref.paths) {
    it(`reproduces glmnet 4.1.6's default λ sequence, path length and coefficients (alpha=${r.alpha})`, () => {
      const path = lambdaPath(problem, r.alpha);
      expect(path.lambda.length).toBe(r.lambda.length);
      expect(maxAbsDiff(path.lambda, r.lambda) / r.lambda[0]).toBeLessThan(1e-12);
      // glmnet counts a ridge's 1e-38 coefficients at its first (null-model) point as non-zero.
      expect(path.nonzero.slice(1)).toEqual(r.df.slice(1));
      expect(path.nonzero[0]).toBe(0);
      for (let k = 0; k < r.lambda.length; k++) {
        const d = maxAbsDiff(path.coefficients[k], r.coef[k]) / Math.max(1, ...r.coef[k].map(Math.abs));
        expect(d).toBeLessThan(1e-6);
      }
    });
  }
});

describe('penalised fits: arguments and degenerate data', () => {
  it('throws for alpha outside [0, 1] or a negative λ, naming the value', () => {
    expect(() => penalisedLogistic(problem, 1.5, 0.1)).toThrow(/got 1.5/);
    expect(() => penalisedLogistic(problem, 1, -2)).toThrow(/got -2/);
    expect(() => lambdaPath(problem, 1, { lambda: [0.1, 0.2] })).toThrow(/decreasing/);
  });

  it('keeps a constant predictor at 0 with a warning, and leaves the others as without it', () => {
    const n = problem.n,
      X = new Float64Array(n * 8);
    X.set(problem.X);
    X.fill(3, 7 * n);
    const withConst = lambdaPath({ X, n, p: 8, y: problem.y }, 1);
    const without = lambdaPath(problem, 1);
    expect(withConst.warnings.map((w) => w.code)).toContain('constant-column');
    const k = 20;
    expect(withConst.coefficients[k][8]).toBe(0);
    expect(maxAbsDiff(withConst.coefficients[k].slice(0, 8), without.coefficients[k])).toBeLessThan(1e-9);
  });

  it('treats case weights as repeated rows (weight 2 = row twice)', () => {
    const w = new Float64Array(problem.n).map((_, i) => 1 + (i % 3 === 0 ? 1 : 0));
    const idx: number[] = [];
    w.forEach((c, i) => {
      for (let k = 0; k < c; k++) idx.push(i);
    });
    const m = idx.length,
      Xr = new Float64Array(m * problem.p);
    for (let j = 0; j < problem.p; j++) idx.forEach((i, r) => (Xr[j * m + r] = problem.X[j * problem.n + i]));
    const a = penalisedLogistic({ ...problem, weights: w }, 0.5, 0.02);
    const b = penalisedLogistic(
      { X: Xr, n: m, p: problem.p, y: Float64Array.from(idx, (i) => problem.y[i]) },
      0.5,
      0.02,
    );
    expect(maxAbsDiff(a.coefficients, b.coefficients)).toBeLessThan(1e-9);
  });

  it('throws one-outcome-class when every row has the same outcome', () => {
    expect(() => lambdaPath({ ...problem, y: new Float64Array(problem.n) }, 1)).toThrow(/same outcome/);
  });
});
