import { FulcraError } from './data';
import { cholesky, choleskyFactorInverse, choleskyLogDet, choleskySolve } from './linalg';
import { caseLoss, crossProductWeighted, linearPredictor, sigmoid } from './loss';

export interface LogisticProblem {
  /** Column-major n×p design; the caller includes an intercept column if wanted. */
  X: Float64Array;
  n: number;
  p: number;
  /** Outcome, 0/1 (values in [0, 1] are accepted). */
  y: Float64Array;
  /** Case weights (bootstrap counts etc.), default 1. */
  weights?: Float64Array;
  /** Added to the linear predictor (e.g. calibration-in-the-large). */
  offset?: Float64Array;
  /** Length p ridge penalty per column: objective −(1/N)·loglik + ½·Σ penalty_j β_j², N = Σ weights. */
  penalty?: Float64Array;
  /** Firth/Jeffreys-prior penalty: adds ½·log det(X'WX) to the log-likelihood. */
  firth?: boolean;
  start?: Float64Array;
  /** 1 = hold this coefficient at its start value (profile likelihood, term tests); Firth keeps the full information. */
  fixed?: Uint8Array;
}

export interface NewtonOptions {
  /**
   * Converged when |ΔD|/(|D| + 0.1) < tol, D = 2·N·objective (R glm's rule on the penalised deviance),
   * and max |Δβ_j|/(1 + |β_j|) < √tol (< 100·tol for Firth). Diverging coefficients (separation) never converge.
   */
  tol: number;
  maxIter: number;
  recordPath?: boolean;
  /** Recompute X'WX at the final beta (default true); false saves one pass when only the optimum is needed. */
  information?: boolean;
}

export interface NewtonResult {
  beta: Float64Array;
  converged: boolean;
  iterations: number;
  /** Unpenalised log-likelihood at beta. */
  logLik: number;
  /** The minimised objective: (−loglik [− ½·log det I for Firth])/N + ½·Σ penalty_j β_j². */
  objective: number;
  /** Row-major p×p X'WX + N·diag(penalty) at beta (at the last iterate before it when options.information is false). */
  information: Float64Array;
  /** beta after each iteration (the start is not included) when recordPath. */
  path?: Float64Array[];
  /** Fitted probabilities. */
  fitted: Float64Array;
  /** 1 for columns the solver held at their start because they were linear combinations of earlier ones at the start. */
  dropped: Uint8Array;
  /** Gradient of the penalised log-likelihood at beta (= −N·∂objective/∂β), including fixed coordinates. */
  score: Float64Array;
  /** Hat values (leverages) at beta: wᵢ·xᵢ'(X'WX)⁻¹xᵢ; only for Firth fits. */
  hat?: Float64Array;
}

export const defaultNewtonOptions: NewtonOptions = { tol: 1e-10, maxIter: 50, recordPath: false };

function validate(pr: LogisticProblem): void {
  const { X, n, p, y } = pr;
  if (!Number.isInteger(n) || n < 1) throw new FulcraError('bad-argument', `n must be a positive integer, got ${n}.`);
  if (!Number.isInteger(p) || p < 1) throw new FulcraError('bad-argument', `p must be a positive integer, got ${p}.`);
  if (X.length !== n * p) throw new FulcraError('bad-argument', `X has length ${X.length}, expected n·p = ${n * p}.`);
  if (y.length !== n) throw new FulcraError('bad-argument', `y has length ${y.length}, expected n = ${n}.`);
  for (const [name, a, len] of [['weights', pr.weights, n], ['offset', pr.offset, n], ['penalty', pr.penalty, p], ['start', pr.start, p], ['fixed', pr.fixed, p]] as const) {
    if (a && a.length !== len) throw new FulcraError('bad-argument', `${name} has length ${a.length}, expected ${len}.`);
    if (a) for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i])) throw new FulcraError('bad-argument', `${name}[${i}] is ${a[i]}; it must be finite.`);
  }
  for (let i = 0; i < n; i++) {
    if (!(y[i] >= 0 && y[i] <= 1)) throw new FulcraError('bad-argument', `y[${i}] is ${y[i]}; the outcome must be 0 or 1.`);
    if (pr.weights && pr.weights[i] < 0) throw new FulcraError('bad-argument', `weights[${i}] is ${pr.weights[i]}; weights must be ≥ 0.`);
  }
  if (pr.penalty) for (let j = 0; j < p; j++) if (pr.penalty[j] < 0) throw new FulcraError('bad-argument', `penalty[${j}] is ${pr.penalty[j]}; it must be ≥ 0.`);
  for (let k = 0; k < n * p; k++) {
    if (!Number.isFinite(X[k])) throw new FulcraError('bad-argument', `X has a non-finite value (${X[k]}) in row ${k % n}, column ${Math.floor(k / n)}.`);
  }
}

/**
 * Newton–Raphson (IRLS) for logistic regression with optional case weights, offset, ridge penalty and
 * Firth's modified score (Heinze & Schemper 2002, Stat Med 21:2409): step (X'WX + N·P)⁻¹U with
 * U = X'(c∘(y − μ) + h∘(½ − μ)) − N·Pβ (h only for Firth), halving the step while the objective
 * gets worse. Columns found to be linear combinations of earlier ones are held at their start value.
 */
export function newtonLogistic(problem: LogisticProblem, options: Partial<NewtonOptions> = {}): NewtonResult {
  validate(problem);
  const opt = { ...defaultNewtonOptions, ...options };
  if (!(opt.tol > 0)) throw new FulcraError('bad-argument', `tol must be > 0, got ${opt.tol}.`);
  if (!Number.isInteger(opt.maxIter) || opt.maxIter < 0) throw new FulcraError('bad-argument', `maxIter must be a non-negative integer, got ${opt.maxIter}.`);
  const { X, n, p, y, weights: c, offset, penalty, firth = false, fixed } = problem;

  let N = n;
  if (c) { N = 0; for (let i = 0; i < n; i++) N += c[i]; }
  if (!(N > 0)) throw new FulcraError('bad-argument', 'The case weights sum to 0; there is nothing to fit.');

  const eta = new Float64Array(n), mu = new Float64Array(n), muc = new Float64Array(n), w = new Float64Array(n);
  const wx = new Float64Array(1024), hat = new Float64Array(n), buf = new Float64Array(1024), resid = new Float64Array(n);
  const info = new Float64Array(p * p), H = new Float64Array(p * p), Linv = new Float64Array(p * p);
  const Lwork = new Float64Array(p * p), dropWork = new Uint8Array(p);
  const Hfac = new Float64Array(p * p), Hdrop = new Uint8Array(p), initialDrop = new Uint8Array(p);
  const U = new Float64Array(p), step = new Float64Array(p), trial = new Float64Array(p);
  const beta = problem.start ? Float64Array.from(problem.start) : new Float64Array(p);
  let logLik = 0;

  const penaltyTerm = (b: Float64Array): number => {
    if (!penalty) return 0;
    let s = 0;
    for (let j = 0; j < p; j++) s += penalty[j] * b[j] * b[j];
    return 0.5 * s;
  };

  /** Sets eta, mu, w, logLik at b; with `full`, also info, its factor and (Firth) hat values. Returns the objective. */
  const evaluate = (b: Float64Array, full: boolean): number => {
    linearPredictor(X, n, p, b, offset, eta);
    let ll = 0;
    for (let i = 0; i < n; i++) {
      const ci = c ? c[i] : 1;
      const e = eta[i];
      const m = sigmoid(e), mc = sigmoid(-e);
      mu[i] = m;
      muc[i] = mc;
      w[i] = ci * m * mc;
      if (ci !== 0) ll -= ci * caseLoss(e, y[i]);
    }
    logLik = ll;
    let obj = -ll / N + penaltyTerm(b);
    if (full || firth) {
      crossProductWeighted(X, n, p, w, info, wx);
      const infoChol = cholesky(info, p, 1e-12, Lwork, dropWork);
      if (firth) {
        obj -= 0.5 * choleskyLogDet(infoChol) / N;
        choleskyFactorInverse(infoChol, Linv);
        // hᵢ = wᵢ·‖L⁻¹xᵢ‖², by blocks of rows so that the columns stay in cache
        hat.fill(0);
        for (let i0 = 0; i0 < n; i0 += 1024) {
          const i1 = Math.min(n, i0 + 1024);
          for (let k = 0; k < p; k++) {
            if (infoChol.dropped[k]) continue;
            buf.fill(0, 0, i1 - i0);
            let j = 0;
            for (; j + 3 <= k; j += 4) {
              const a0 = Linv[k * p + j], a1 = Linv[k * p + j + 1], a2 = Linv[k * p + j + 2], a3 = Linv[k * p + j + 3];
              const o0 = j * n, o1 = o0 + n, o2 = o1 + n, o3 = o2 + n;
              for (let i = i0; i < i1; i++) buf[i - i0] += a0 * X[o0 + i] + a1 * X[o1 + i] + a2 * X[o2 + i] + a3 * X[o3 + i];
            }
            for (; j <= k; j++) {
              const a = Linv[k * p + j], oj = j * n;
              for (let i = i0; i < i1; i++) buf[i - i0] += a * X[oj + i];
            }
            for (let i = i0; i < i1; i++) hat[i] += buf[i - i0] * buf[i - i0];
          }
        }
        for (let i = 0; i < n; i++) hat[i] *= w[i];
      }
    }
    return obj;
  };

  /** U = X'(c∘(y − μ) [+ h∘(½ − μ)]) − N·Pβ at the current evaluation state. */
  const computeScore = (b: Float64Array, out: Float64Array): void => {
    for (let i = 0; i < n; i++) {
      const ci = c ? c[i] : 1;
      let r = ci * (y[i] === 1 ? muc[i] : y[i] - mu[i]);
      if (firth) r += hat[i] * (0.5 - mu[i]);
      resid[i] = r;
    }
    for (let j = 0; j < p; j++) {
      const oj = j * n;
      let s = 0;
      for (let i = 0; i < n; i++) s += X[oj + i] * resid[i];
      out[j] = penalty ? s - N * penalty[j] * b[j] : s;
    }
  };

  let obj = evaluate(beta, true);
  // Firth's step uses the expected information, not the penalised Hessian: linear convergence, tighter step rule.
  const stepTol = firth ? opt.tol * 100 : Math.sqrt(opt.tol);
  let converged = false;
  let iterations = 0;
  const path: Float64Array[] | undefined = opt.recordPath ? [] : undefined;

  for (let iter = 0; iter < opt.maxIter; iter++) {
    if (iter > 0 && !firth) obj = evaluate(beta, true);
    computeScore(beta, U);
    H.set(info);
    if (penalty) for (let j = 0; j < p; j++) H[j * p + j] += N * penalty[j];
    if (fixed) {
      for (let j = 0; j < p; j++) {
        if (!fixed[j]) continue;
        U[j] = 0;
        for (let k = 0; k < p; k++) { H[j * p + k] = 0; H[k * p + j] = 0; }
      }
    }
    const hChol = cholesky(H, p, 1e-12, Hfac, Hdrop);
    if (iter === 0) for (let j = 0; j < p; j++) initialDrop[j] = fixed?.[j] ? 0 : Hdrop[j];
    choleskySolve(hChol, U, step);
    let degenerate = false;
    for (let j = 0; j < p; j++) if (Hdrop[j] && !initialDrop[j] && !fixed?.[j]) degenerate = true;
    if (degenerate) break; // a column lost all information during the iterations: diverging coefficients

    const D = 2 * N * obj;
    let accepted = false;
    let newObj = obj;
    let t = 1;
    for (let half = 0; half < 40; half++) {
      for (let j = 0; j < p; j++) trial[j] = beta[j] + t * step[j];
      newObj = evaluate(trial, false);
      if (newObj <= obj + 1e-13 * Math.abs(obj) + 1e-300) { accepted = true; break; }
      t *= 0.5;
    }
    let maxFull = 0, dec = 0;
    for (let j = 0; j < p; j++) {
      maxFull = Math.max(maxFull, Math.abs(step[j]) / (1 + Math.abs(beta[j])));
      dec += U[j] * step[j];
    }
    if (!accepted || t < 1e-6) {
      // No real decrease possible: at the optimum up to rounding, or stuck with a large Newton step (separation).
      converged = dec / (Math.abs(D) + 0.1) < Math.sqrt(opt.tol) && maxFull < Math.sqrt(stepTol);
      break;
    }
    beta.set(trial);
    iterations++;
    if (path) path.push(Float64Array.from(beta));
    const Dnew = 2 * N * newObj;
    obj = newObj;
    if (Math.abs(Dnew - D) / (Math.abs(Dnew) + 0.1) < opt.tol && maxFull < stepTol) {
      converged = true;
      break;
    }
  }
  obj = evaluate(beta, opt.information !== false);

  const information = Float64Array.from(info);
  if (penalty) for (let j = 0; j < p; j++) information[j * p + j] += N * penalty[j];
  const dropped = Uint8Array.from(initialDrop);
  const score = new Float64Array(p);
  computeScore(beta, score);
  const result: NewtonResult = {
    beta, converged, iterations, logLik, objective: obj, information, fitted: Float64Array.from(mu), dropped, score,
  };
  if (path) result.path = path;
  if (firth) result.hat = Float64Array.from(hat);
  return result;
}
