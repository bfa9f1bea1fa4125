import { FulcraError } from '../core/data';
import { valueNumber } from '../core/vectors';
import { sigmoid, sumCrossEntropy } from '../numerics/loss';
import { columnMoments } from '../numerics/standardise';

/**
 * Penalised logistic regression by proximal Newton (IRLS outer loop) with cyclic coordinate descent on the
 * quadratic approximation (Friedman, Hastie & Tibshirani 2010, J Stat Softw 33(1), "glmnet").
 *
 * Conventions (the glmnet ones): predictors are standardised internally with case-weighted means and 1/W
 * variances (W = Σ weights); the objective on that scale is
 *   −(1/W)·Σ wᵢ·loglikᵢ + λ·[(1−α)/2·‖b‖² + α·‖b‖₁],
 * intercept unpenalised; coefficients are reported back on the original scale, intercept first.
 */
export interface PenalisedProblem {
  /** Column-major n×p predictors, WITHOUT an intercept column. */
  X: Float64Array;
  n: number;
  p: number;
  /** 0/1 outcome. */
  y: Float64Array;
  /** Case weights ≥ 0 (bootstrap counts; 0 leaves a row out, as in a cross-validation fold). Default 1. */
  weights?: Float64Array;
}

export interface CdOptions {
  /** Convergence: largest change of a standardised coefficient (incl. intercept) between Newton steps. */
  tol: number;
  maxIter: number;
}

export const defaultCdOptions: CdOptions = { tol: 1e-10, maxIter: 200 };

/** Weighted standardisation of the predictors, shared by every λ of a path. */
export interface Standardised {
  X: Float64Array;
  n: number;
  p: number;
  y: Float64Array;
  /** Weights normalised to sum 1. */
  w: Float64Array;
  mean: Float64Array;
  sd: Float64Array;
  /** Columns with zero spread among the weighted rows: kept at 0. */
  constant: boolean[];
  /** Weighted event proportion. */
  ybar: number;
}

/** The case-weighted standardisation of numerics/standardise.ts's columnMoments, with checked weights and outcome. */
export function standardise(problem: PenalisedProblem): Standardised {
  const { X, n, p, y } = problem;
  if (X.length !== n * p) throw new FulcraError('bad-dimensions', `X has ${X.length} cells, expected n·p = ${n * p}.`);
  if (y.length !== n) throw new FulcraError('bad-dimensions', `y has length ${y.length}, expected ${n}.`);
  const w = new Float64Array(n);
  let W = 0;
  for (let i = 0; i < n; i++) {
    const wi = problem.weights ? problem.weights[i] : 1;
    if (!(wi >= 0) || !Number.isFinite(wi))
      throw new FulcraError('bad-weight', `Weight ${wi} (${valueNumber(i)}) is not a finite number ≥ 0.`);
    if (y[i] !== 0 && y[i] !== 1 && wi > 0)
      throw new FulcraError('bad-outcome', `Outcome ${y[i]} (${valueNumber(i)}) is not 0 or 1.`);
    w[i] = wi;
    W += wi;
  }
  if (!(W > 0)) throw new FulcraError('no-rows', 'All case weights are zero: there are no rows to fit.');
  let ybar = 0;
  for (let i = 0; i < n; i++) {
    w[i] /= W;
    ybar += w[i] * y[i];
  }
  const mean = new Float64Array(p),
    sd = new Float64Array(p),
    constant: boolean[] = [];
  for (let j = 0; j < p; j++) {
    const c = columnMoments(X, j * n, n, w);
    mean[j] = c.mean * c.M;
    sd[j] = c.sd * c.M;
    constant.push(!c.varying);
  }
  return { X, n, p, y, w, mean, sd, constant, ybar };
}

/** Solution at one λ on the standardised scale (b0, b) plus its fit statistics. */
export interface CdSolution {
  b0: number;
  b: Float64Array;
  converged: boolean;
  iterations: number;
  objective: number;
  /** Unpenalised −2·Σ wᵢ·loglikᵢ with weights normalised to sum 1 (multiply by W for the deviance). */
  meanDeviance: number;
}

function linearPredictor(s: Standardised, b0: number, b: Float64Array, eta: Float64Array): void {
  const { X, n, p, mean, sd } = s;
  eta.fill(b0);
  for (let j = 0; j < p; j++) {
    if (b[j] === 0) continue;
    const o = j * n,
      c = b[j] / sd[j],
      m = mean[j];
    for (let i = 0; i < n; i++) eta[i] += c * (X[o + i] - m);
  }
}

function meanDeviance(s: Standardised, eta: Float64Array): number {
  return 2 * sumCrossEntropy(eta, s.y, s.w);
}

function penalty(b: Float64Array, lambda: number, alpha: number): number {
  let l1 = 0,
    l2 = 0;
  for (let j = 0; j < b.length; j++) {
    l1 += Math.abs(b[j]);
    l2 += b[j] * b[j];
  }
  return lambda * (((1 - alpha) / 2) * l2 + alpha * l1);
}

/**
 * Minimises the elastic-net objective at one λ starting from (b0, b) (warm start). Each Newton step builds
 * the weighted Gram matrix of the standardised design once (O(n·p²)) and runs coordinate descent on the
 * quadratic model in O(p) per coordinate ("covariance updates", Friedman et al. 2010 §2.2), cycling over
 * the active set until a full sweep changes nothing. Steps that would raise the objective are halved.
 */
export function solveAtLambda(
  s: Standardised,
  lambda: number,
  alpha: number,
  start: { b0: number; b: Float64Array },
  options: CdOptions = defaultCdOptions,
): CdSolution {
  const { X, n, p, y, w, mean, sd, constant } = s;
  const q = p + 1; // index 0 is the intercept
  let b0 = start.b0;
  const b = Float64Array.from(start.b);
  const eta = new Float64Array(n),
    v = new Float64Array(n),
    col = new Float64Array(n);
  const G = new Float64Array(q * q),
    g = new Float64Array(q),
    move = new Float64Array(q);
  const l1 = lambda * alpha * (1 + 1e-10),
    l2 = lambda * (1 - alpha);
  const innerTol = Math.min(1e-24, options.tol * options.tol * 1e-4);
  linearPredictor(s, b0, b, eta);
  let dev = meanDeviance(s, eta);
  let obj = dev / 2 + penalty(b, lambda, alpha);
  let converged = false,
    iter = 0;
  const oldB = new Float64Array(p);
  const active = new Uint8Array(p);

  // Coordinate k (1-based predictor) of the quadratic model; returns G_kk·Δ².
  const update = (k: number): number => {
    const j = k - 1,
      Gkk = G[k * q + k];
    const target = g[k] - move[k] + Gkk * b[j];
    const a = Math.abs(target) - l1;
    const bj = a > 0 ? (Math.sign(target) * a) / (Gkk + l2) : 0;
    const d = bj - b[j];
    if (d === 0) return 0;
    b[j] = bj;
    for (let m = 0; m < q; m++) move[m] += G[m * q + k] * d;
    if (bj !== 0) active[j] = 1;
    return Gkk * d * d;
  };
  const intercept = (): number => {
    const d = (g[0] - move[0]) / G[0];
    b0 += d;
    for (let m = 0; m < q; m++) move[m] += G[m * q] * d;
    return G[0] * d * d;
  };

  while (iter < options.maxIter) {
    iter++;
    g.fill(0);
    G.fill(0);
    for (let i = 0; i < n; i++) {
      const pr = sigmoid(eta[i]);
      v[i] = Math.max(w[i] * pr * (1 - pr), w[i] * 1e-12);
      col[i] = w[i] * (y[i] - pr);
      g[0] += col[i];
      G[0] += v[i];
    }
    for (let k = 1; k < q; k++) {
      if (constant[k - 1]) continue;
      const o = (k - 1) * n,
        m = mean[k - 1],
        sk = sd[k - 1];
      let gk = 0;
      for (let i = 0; i < n; i++) gk += (X[o + i] - m) * col[i];
      g[k] = gk / sk;
    }
    for (let k = 1; k < q; k++) {
      if (constant[k - 1]) continue;
      const o = (k - 1) * n,
        m = mean[k - 1],
        sk = sd[k - 1];
      const t = col; // the gradient pass above is done with col, reuse it
      let g0 = 0;
      for (let i = 0; i < n; i++) {
        t[i] = (v[i] * (X[o + i] - m)) / sk;
        g0 += t[i];
      }
      G[k] = G[k * q] = g0;
      for (let l = 1; l <= k; l++) {
        if (constant[l - 1]) continue;
        const ol = (l - 1) * n,
          ml = mean[l - 1];
        let acc = 0;
        for (let i = 0; i < n; i++) acc += t[i] * (X[ol + i] - ml);
        G[k * q + l] = G[l * q + k] = acc / sd[l - 1];
      }
    }
    const oldB0 = b0;
    oldB.set(b);
    move.fill(0);
    for (let j = 0; j < p; j++) active[j] = b[j] !== 0 ? 1 : 0;
    for (let guard = 0; guard < 1000; guard++) {
      let dmax = intercept();
      for (let k = 1; k < q; k++) if (!constant[k - 1]) dmax = Math.max(dmax, update(k));
      if (dmax < innerTol) break;
      for (let sweep = 0; sweep < 100000; sweep++) {
        let da = intercept();
        for (let k = 1; k < q; k++) if (active[k - 1] && !constant[k - 1]) da = Math.max(da, update(k));
        if (da < innerTol) break;
      }
    }
    let newObj = NaN;
    for (let h = 0; h < 40; h++) {
      linearPredictor(s, b0, b, eta);
      dev = meanDeviance(s, eta);
      newObj = dev / 2 + penalty(b, lambda, alpha);
      if (newObj <= obj + 1e-13 * Math.abs(obj)) break;
      b0 = (b0 + oldB0) / 2;
      for (let j = 0; j < p; j++) b[j] = (b[j] + oldB[j]) / 2;
    }
    let change = Math.abs(b0 - oldB0);
    for (let j = 0; j < p; j++) change = Math.max(change, Math.abs(b[j] - oldB[j]));
    obj = newObj;
    if (change < options.tol) {
      converged = true;
      break;
    }
  }
  return { b0, b, converged, iterations: iter, objective: obj, meanDeviance: dev };
}

/** Back to the original scale: intercept first, then one coefficient per predictor. */
export function toOriginalScale(s: Standardised, b0: number, b: Float64Array): Float64Array {
  const out = new Float64Array(s.p + 1);
  let shift = 0;
  for (let j = 0; j < s.p; j++) {
    const c = s.constant[j] ? 0 : b[j] / s.sd[j];
    out[j + 1] = c;
    shift += c * s.mean[j];
  }
  out[0] = b0 - shift;
  return out;
}

export interface PenalisedFit {
  alpha: number;
  lambda: number;
  /** Original scale, intercept first (length p + 1). */
  coefficients: Float64Array;
  /** Standardised scale, without intercept. */
  standardised: Float64Array;
  converged: boolean;
  iterations: number;
  objective: number;
  /** Unpenalised −2·Σ wᵢ·loglikᵢ with the caller's weights. */
  deviance: number;
  nonzero: number;
}

function checkAlphaLambda(alpha: number, lambda: number): void {
  if (!(alpha >= 0 && alpha <= 1))
    throw new FulcraError('bad-alpha', `alpha must be between 0 (ridge) and 1 (lasso); got ${alpha}.`);
  if (!(lambda >= 0) || !Number.isFinite(lambda))
    throw new FulcraError('bad-lambda', `lambda must be a finite number ≥ 0; got ${lambda}.`);
}

/**
 * Elastic-net logistic regression at one λ (α = 1 lasso, α = 0 ridge), glmnet conventions (see the file
 * header). Coefficients are returned on the original scale, intercept first.
 */
export function penalisedLogistic(
  problem: PenalisedProblem,
  alpha: number,
  lambda: number,
  options: Partial<CdOptions> = {},
): PenalisedFit {
  checkAlphaLambda(alpha, lambda);
  const s = standardise(problem);
  const b0 = Math.log(Math.max(s.ybar, 1e-12) / Math.max(1 - s.ybar, 1e-12));
  const sol = solveAtLambda(s, lambda, alpha, { b0, b: new Float64Array(s.p) }, { ...defaultCdOptions, ...options });
  return assemble(s, problem, alpha, lambda, sol);
}

export function assemble(
  s: Standardised,
  problem: PenalisedProblem,
  alpha: number,
  lambda: number,
  sol: CdSolution,
): PenalisedFit {
  let W = 0;
  for (let i = 0; i < s.n; i++) W += problem.weights ? problem.weights[i] : 1;
  let nonzero = 0;
  for (let j = 0; j < s.p; j++) if (sol.b[j] !== 0) nonzero++;
  return {
    alpha,
    lambda,
    coefficients: toOriginalScale(s, sol.b0, sol.b),
    standardised: Float64Array.from(sol.b),
    converged: sol.converged,
    iterations: sol.iterations,
    objective: sol.objective,
    deviance: sol.meanDeviance * W,
    nonzero,
  };
}
