import { describe, expect, it } from 'vitest';
import {
  FAST_PATH_MIN_COLUMNS,
  FAST_PATH_MIN_ROWS,
  newtonLogistic,
  type LogisticProblem,
  type NewtonResult,
} from '../../../src/engine/fitting/newton';
import { createRng } from '../../../src/engine/numerics/rng';

/** Seeded logistic data: intercept, p − 1 correlated normal and binary predictors, column-major. */
function simulate(n: number, p: number, seed: number): LogisticProblem {
  const rng = createRng(seed);
  const X = new Float64Array(n * p);
  X.fill(1, 0, n);
  const beta = Float64Array.from({ length: p }, (_, j) => (j === 0 ? -1 : 0.6 * Math.sin(j + 1)));
  const y = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const z = rng.normal();
    let eta = beta[0];
    for (let j = 1; j < p; j++) {
      const x = j % 3 === 0 ? +(rng.next() < 0.3) : 0.5 * z + rng.normal();
      X[j * n + i] = x;
      eta += beta[j] * x;
    }
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  return { X, n, p, y };
}

const relGap = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let g = 0;
  for (let k = 0; k < b.length; k++) g = Math.max(g, Math.abs(a[k] - b[k]) / Math.max(Math.abs(b[k]), 1e-300));
  return g;
};
/** Entry-wise gap relative to the largest entry of b (off-diagonal entries of X'WX can be near 0). */
const matGap = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let s = 0,
    g = 0;
  for (let k = 0; k < b.length; k++) s = Math.max(s, Math.abs(b[k]));
  for (let k = 0; k < b.length; k++) g = Math.max(g, Math.abs(a[k] - b[k]));
  return g / s;
};

function expectSameFit(fast: NewtonResult, exact: NewtonResult, p: number): void {
  expect(fast.converged).toBe(true);
  expect(exact.converged).toBe(true);
  expect(relGap(fast.beta, exact.beta)).toBeLessThan(1e-10);
  expect(matGap(fast.information, exact.information)).toBeLessThan(1e-10);
  // the diagonal (variances of the score) entry by entry
  expect(
    relGap(
      Array.from({ length: p }, (_, j) => fast.information[j * p + j]),
      Array.from({ length: p }, (_, j) => exact.information[j * p + j]),
    ),
  ).toBeLessThan(1e-10);
  expect(Math.abs(fast.logLik - exact.logLik) / Math.abs(exact.logLik)).toBeLessThan(1e-13);
  expect(Math.abs(fast.objective - exact.objective) / Math.abs(exact.objective)).toBeLessThan(1e-13);
  expect(relGap(fast.fitted, exact.fitted)).toBeLessThan(1e-10);
}

const n = 40_000,
  p = 10;
const base = simulate(n, p, 20261202);

describe('newtonLogistic subsampled-Hessian start for large n', () => {
  it('is used at 40 000 × 10 (n above max(20 000, 16·p²)) and takes a different route from exact Newton', () => {
    expect(n).toBeGreaterThan(Math.max(FAST_PATH_MIN_ROWS, 16 * p * p));
    const fast = newtonLogistic(base, { recordPath: true });
    const exact = newtonLogistic(base, { recordPath: true, exactHessian: true });
    // Exact Newton converges quadratically in a few steps; the subsampled phase takes more, cheaper ones.
    expect(fast.iterations).toBeGreaterThan(exact.iterations);
  });

  it('is not used below FAST_PATH_MIN_COLUMNS design columns: the route is exact Newton step for step', () => {
    const narrow = simulate(n, FAST_PATH_MIN_COLUMNS - 1, 5);
    const plain = newtonLogistic(narrow, { recordPath: true });
    const exact = newtonLogistic(narrow, { recordPath: true, exactHessian: true });
    expect(plain.iterations).toBe(exact.iterations);
    expect(plain.path!.map((b) => Array.from(b))).toEqual(exact.path!.map((b) => Array.from(b)));
  });

  it("gives the exact-Newton β, X'WX, log-likelihood and fitted risks to 1e-10 relative (unweighted)", () => {
    expectSameFit(newtonLogistic(base), newtonLogistic(base, { exactHessian: true }), p);
  });

  it('gives the exact-Newton fit with case weights and an offset to 1e-10 relative', () => {
    const rng = createRng(7);
    const weights = Float64Array.from({ length: n }, () => Math.floor(rng.next() * 4)); // 0–3, like bootstrap counts
    const offset = Float64Array.from({ length: n }, () => 0.3 * rng.normal());
    const pr = { ...base, weights, offset };
    expectSameFit(newtonLogistic(pr), newtonLogistic(pr, { exactHessian: true }), p);
  });

  it('gives the exact-Newton fit with a ridge penalty to 1e-10 relative, penalty included in the information', () => {
    const penalty = Float64Array.from({ length: p }, (_, j) => (j === 0 ? 0 : 0.01));
    const pr = { ...base, penalty };
    const fast = newtonLogistic(pr),
      exact = newtonLogistic(pr, { exactHessian: true });
    expectSameFit(fast, exact, p);
    expect(relGap(fast.beta, newtonLogistic(base).beta)).toBeGreaterThan(1e-4); // the penalty does act
  });

  it('gives the exact constrained fit with fixed coefficients and a warm start (term tests, profiles)', () => {
    const full = newtonLogistic(base);
    const fixed = new Uint8Array(p);
    fixed[2] = 1;
    fixed[5] = 1;
    const start = Float64Array.from(full.beta);
    start[2] = 0;
    start[5] = 0.1;
    const pr = { ...base, fixed, start };
    const fast = newtonLogistic(pr, { tol: 1e-12, maxIter: 100 }),
      exact = newtonLogistic(pr, { tol: 1e-12, maxIter: 100, exactHessian: true });
    expectSameFit(fast, exact, p);
    expect(fast.beta[2]).toBe(0);
    expect(fast.beta[5]).toBe(0.1);
    expect(fast.objective).toBeGreaterThan(full.objective);
  });

  it('records a path with one entry per iteration, ending at the estimate', () => {
    const r = newtonLogistic(base, { recordPath: true });
    expect(r.path!.length).toBe(r.iterations);
    expect(Array.from(r.path![r.path!.length - 1])).toEqual(Array.from(r.beta));
  });

  it('falls back to exact Newton for a collinear column: held at 0 and flagged as dropped, like the exact path', () => {
    const X = new Float64Array(n * (p + 1));
    X.set(base.X);
    X.set(base.X.subarray(n, 2 * n), p * n);
    const pr = { ...base, X, p: p + 1 };
    const fast = newtonLogistic(pr),
      exact = newtonLogistic(pr, { exactHessian: true });
    expect(Array.from(fast.dropped)).toEqual(Array.from(exact.dropped));
    expect(fast.dropped[p]).toBe(1);
    expect(fast.beta[p]).toBe(0);
    expect(relGap(fast.beta.subarray(0, p), exact.beta.subarray(0, p))).toBeLessThan(1e-10);
    expect(relGap(fast.beta.subarray(0, p), newtonLogistic(base).beta)).toBeLessThan(1e-10);
  });

  it('gives the exact fit at 40 000 × 30 (wide: the cheap phase runs on to steps of 1e-12)', () => {
    const wide = simulate(n, 30, 99);
    expectSameFit(newtonLogistic(wide), newtonLogistic(wide, { exactHessian: true }), 30);
  });
});
