import { addXtrBlock } from './kernels';

/**
 * Logistic (binary cross-entropy) loss in numerically stable forms, apart from any solver.
 * Per case with linear predictor η and outcome y ∈ [0, 1]:
 *   loss = log(1 + e^η) − y·η   (= −[y·log μ + (1−y)·log(1−μ)],  μ = 1/(1 + e^−η))
 * computed as (1−y)·softplus(η) + y·softplus(−η), softplus(t) = max(t, 0) + log1p(e^−|t|): finite for every
 * finite η and without cancellation when the prediction is right.
 *
 * Every loss, deviance and log-likelihood in the engine is computed here from η. Where only a risk p is known it
 * enters through `logit`, under the one clipping rule `clampRisk`: p is held within [floor, 1 − floor]
 * (RISK_CLIP = 1e-12 unless a caller states another floor, as cross-validation does for cv.glmnet's 1e-5).
 */

/** log(1 + e^η) without overflow or cancellation. */
export function softplus(eta: number): number {
  return Math.max(eta, 0) + Math.log1p(Math.exp(-Math.abs(eta)));
}

/** Logistic function 1/(1 + e^−η), evaluated on the side that cannot overflow. */
export function sigmoid(eta: number): number {
  if (eta >= 0) return 1 / (1 + Math.exp(-eta));
  const e = Math.exp(eta);
  return e / (1 + e);
}

/** Smallest risk used on the logit scale: risks of exactly 0 or 1 are moved to RISK_CLIP or 1 − RISK_CLIP. */
export const RISK_CLIP = 1e-12;

/** The one clipping rule for risks: p held within [floor, 1 − floor]. */
export function clampRisk(p: number, floor = RISK_CLIP): number {
  return Math.min(1 - floor, Math.max(floor, p));
}

/** log(p / (1 − p)) of the risk held within [floor, 1 − floor]. */
export function logit(p: number, floor = RISK_CLIP): number {
  const q = clampRisk(p, floor);
  return Math.log(q / (1 - q));
}

/** η = offset + Xβ for a column-major n×p X, written into `out` (length n). */
export function linearPredictor(
  X: Float64Array,
  n: number,
  p: number,
  beta: ArrayLike<number>,
  offset: Float64Array | undefined,
  out: Float64Array,
): Float64Array {
  if (offset) out.set(offset);
  else out.fill(0);
  for (let j = 0; j < p; j++) {
    const b = beta[j];
    if (b === 0) continue;
    const off = j * n;
    for (let i = 0; i < n; i++) out[i] += b * X[off + i];
  }
  return out;
}

/** One case's loss −[y·log μ + (1−y)·log(1−μ)] from η. */
export function caseLoss(eta: number, y: number): number {
  return y === 1 ? softplus(-eta) : y === 0 ? softplus(eta) : (1 - y) * softplus(eta) + y * softplus(-eta);
}

/**
 * One case's deviance −2·loglik = 2·caseLoss(η, y). With `riskFloor` the risk is first held within
 * [riskFloor, 1 − riskFloor] (clampRisk), i.e. η within ±logit(1 − riskFloor).
 */
export function caseDeviance(eta: number, y: number, riskFloor?: number): number {
  if (riskFloor === undefined) return 2 * caseLoss(eta, y);
  const cap = Math.log((1 - riskFloor) / riskFloor);
  return 2 * caseLoss(Math.min(cap, Math.max(-cap, eta)), y);
}

/** Weighted sum of case losses Σ wᵢ·(softplus(ηᵢ) − yᵢηᵢ), i.e. −loglik; rows of weight 0 are skipped. */
export function sumCrossEntropy(eta: Float64Array, y: ArrayLike<number>, weights?: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < eta.length; i++) {
    if (weights && weights[i] === 0) continue;
    const l = caseLoss(eta[i], y[i]);
    s += weights ? weights[i] * l : l;
  }
  return s;
}

/**
 * −2·loglik of the intercept-only model with `events` of `total` (weighted) cases:
 * −2·[e·log(e/t) + (t − e)·log(1 − e/t)], a term with no cases counting 0.
 */
export function interceptDeviance(events: number, total: number): number {
  const m = events / total;
  const t = (k: number, q: number) => (k > 0 ? k * Math.log(q) : 0);
  return -2 * (t(events, m) + t(total - events, 1 - m));
}

/** Mean cross-entropy (1/Σw)·Σ wᵢ·lossᵢ; NaN for no cases. */
export function meanCrossEntropy(eta: Float64Array, y: Float64Array, weights?: Float64Array): number {
  let sw = eta.length;
  if (weights) {
    sw = 0;
    for (let i = 0; i < weights.length; i++) sw += weights[i];
  }
  return sw > 0 ? sumCrossEntropy(eta, y, weights) / sw : NaN;
}

/**
 * X'WX for column-major X into the row-major p×p `out`: only the upper triangle is accumulated (then mirrored),
 * in blocks of rows so the columns stay in cache: per block and column j, wx = w∘x_j and row j of the triangle
 * gains X[·, j…p)'wx (kernels.ts addXtrBlock, four columns per pass). `wx` is a work buffer (length ≥ 1024).
 * Cost n·p(p+1)/2 multiply-adds.
 */
export function crossProductWeighted(
  X: Float64Array,
  n: number,
  p: number,
  w: Float64Array,
  out: Float64Array,
  wx: Float64Array,
): Float64Array {
  out.fill(0);
  const B = 1024;
  for (let i0 = 0; i0 < n; i0 += B) {
    const i1 = Math.min(n, i0 + B);
    for (let j = 0; j < p; j++) {
      const oj = j * n;
      for (let i = i0; i < i1; i++) wx[i - i0] = w[i] * X[oj + i];
      addXtrBlock(X.subarray(oj), n, p - j, wx, i0, i1, out.subarray(j * p + j), i0);
    }
  }
  for (let j = 0; j < p; j++) for (let k = j + 1; k < p; k++) out[k * p + j] = out[j * p + k];
  return out;
}

export interface LossEvaluation {
  /** (1/Σw)·Σ wᵢ·lossᵢ + ½·Σ penalty_j β_j² */
  loss: number;
  /** gradient of `loss` (length p) */
  gradient: Float64Array;
  /** Hessian of `loss`, row-major p×p: X'WX/Σw + diag(penalty) */
  hessian: Float64Array;
}

/**
 * Mean (weighted) cross-entropy of a logistic model with optional ridge penalty, its gradient and Hessian.
 * X column-major n×p; weights are case weights (default 1); penalty length p (default 0).
 */
export function logisticLoss(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array,
  beta: ArrayLike<number>,
  opts: { weights?: Float64Array; offset?: Float64Array; penalty?: Float64Array } = {},
): LossEvaluation {
  const eta = linearPredictor(X, n, p, beta, opts.offset, new Float64Array(n));
  const w = new Float64Array(n);
  const r = new Float64Array(n);
  let sw = 0;
  for (let i = 0; i < n; i++) {
    const ci = opts.weights ? opts.weights[i] : 1;
    const mu = sigmoid(eta[i]),
      muc = sigmoid(-eta[i]);
    sw += ci;
    w[i] = ci * mu * muc;
    r[i] = ci * (y[i] === 1 ? -muc : mu - y[i]);
  }
  let loss = sumCrossEntropy(eta, y, opts.weights) / sw;
  const gradient = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += X[j * n + i] * r[i];
    gradient[j] = s / sw;
  }
  const hessian = crossProductWeighted(X, n, p, w, new Float64Array(p * p), new Float64Array(1024));
  for (let k = 0; k < p * p; k++) hessian[k] /= sw;
  if (opts.penalty) {
    for (let j = 0; j < p; j++) {
      const pj = opts.penalty[j];
      loss += 0.5 * pj * beta[j] * beta[j];
      gradient[j] += pj * beta[j];
      hessian[j * p + j] += pj;
    }
  }
  return { loss, gradient, hessian };
}
