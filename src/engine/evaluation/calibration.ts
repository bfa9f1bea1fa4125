import { FulcraError } from '../core/data';
import { checkLevel, checkOutcomeAndPredictor, valueNumber, type WeightsAndLevel } from '../core/vectors';
import { qnorm } from '../numerics/distributions';
import { logit, RISK_CLIP, sigmoid } from '../numerics/loss';
import { cholesky, choleskyInverse } from '../numerics/linalg';
import { newtonLogistic } from '../fitting/newton';
import { allocDesign, allocF64, POOL_MIN_ROWS, rowPoolThreads } from '../numerics/rowPool';
import { warning, type EngineWarning } from '../core/warnings';

/** An estimate with its Wald standard error and interval. */
export interface IntervalEstimate {
  estimate: number;
  se: number;
  lower: number;
  upper: number;
}

export interface CalibrationRegression {
  /** Calibration-in-the-large: α in logit P(y) = α + offset(LP); 0 when calibrated in the large. */
  interceptInTheLarge: IntervalEstimate | null;
  /** Calibration slope: β in logit P(y) = a + β·LP; 1 when calibrated, < 1 when predictions are too extreme. */
  slope: IntervalEstimate | null;
  /** a in the slope model. */
  slopeModelIntercept: number | null;
  observedRate: number | null;
  meanPredicted: number | null;
  /** Observed / expected number of events, Σy / Σp. */
  observedOverExpected: number | null;
  level: number;
  ciMethod: 'wald';
  warnings: EngineWarning[];
}

/** LP = logit(p), with risks of exactly 0 or 1 clipped to [1e−12, 1 − 1e−12] and a warning saying how many. */
export function riskToLinearPredictor(p: Float64Array): {
  eta: Float64Array;
  clipped: number;
  warnings: EngineWarning[];
} {
  const eta = new Float64Array(p.length);
  let clipped = 0;
  for (let i = 0; i < p.length; i++) {
    const v = p[i];
    if (!(v >= 0 && v <= 1))
      throw new FulcraError('bad-score', `Predicted risks must lie in [0, 1]; ${valueNumber(i)} is ${v}.`);
    if (v < RISK_CLIP || v > 1 - RISK_CLIP) clipped++;
    eta[i] = logit(v);
  }
  const warnings =
    clipped > 0
      ? [
          warning(
            'risk-clipped',
            `${clipped} predicted risk(s) were exactly 0 or 1 (or closer than 1e-12); they were set to 1e-12 or ` +
              `1 − 1e-12 for calibration on the logit scale.`,
            'Risks of exactly 0 or 1 are rarely credible; check how the predictions were made.',
          ),
        ]
      : [];
  return { eta, clipped, warnings };
}

/**
 * A copy in the row pool's shared memory when a pool with helpers is installed and the rows are enough for it to
 * share the passes (POOL_MIN_ROWS); else the array itself. The pool sums in fixed chunks: the same numbers either way.
 */
function forPool(a: Float64Array, n: number): Float64Array;
function forPool(a: Float64Array | undefined, n: number): Float64Array | undefined;
function forPool(a: Float64Array | undefined, n: number): Float64Array | undefined {
  if (!a || n < POOL_MIN_ROWS || rowPoolThreads() < 2 || a.buffer instanceof SharedArrayBuffer) return a;
  const s = allocF64(a.length);
  s.set(a);
  return s;
}

/**
 * Fits a small logistic model and returns beta with its covariance (inverse information), or null on failure.
 * On the row pool from POOL_MIN_ROWS rows (the calibration fits of a 10⁶-row evaluation share its threads).
 */
export function fitSmallLogistic(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array,
  weights?: Float64Array,
  offset?: Float64Array,
  start?: Float64Array,
) {
  const fit = newtonLogistic(
    { X: forPool(X, n), n, p, y: forPool(y, n), weights: forPool(weights, n), offset: forPool(offset, n), start },
    { tol: 1e-12, maxIter: 100 },
  );
  const ch = cholesky(fit.information, p);
  const cov = ch.rank === p ? choleskyInverse(ch) : null;
  return { beta: fit.beta, cov, converged: fit.converged, fitted: fit.fitted, logLik: fit.logLik };
}

function interval(est: number, variance: number, z: number): IntervalEstimate {
  const se = Math.sqrt(variance);
  return { estimate: est, se, lower: est - z * se, upper: est + z * se };
}

/**
 * Calibration-in-the-large and calibration slope of a linear predictor `eta` on outcome y (Cox 1958,
 * Biometrika 45:562; Steyerberg 2019, Clinical Prediction Models, ch. 15): glm(y ~ 1, offset = eta) and
 * glm(y ~ eta), maximum likelihood, Wald intervals (as R's confint.default). Optional case weights.
 */
export function calibrationRegression(
  y: Float64Array,
  eta: Float64Array,
  options: WeightsAndLevel = {},
): CalibrationRegression {
  const level = checkLevel(options.level);
  const n = y.length;
  checkOutcomeAndPredictor(y, eta);
  const w = options.weights;
  let sw = 0;
  let sy = 0;
  let sp = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    sy += wi * y[i];
    sp += wi * sigmoid(eta[i]);
  }
  const base = { level, ciMethod: 'wald' as const };
  if (!(sw > 0) || sy === 0 || sy === sw) {
    return {
      interceptInTheLarge: null,
      slope: null,
      slopeModelIntercept: null,
      observedRate: sw > 0 ? sy / sw : null,
      meanPredicted: sw > 0 ? sp / sw : null,
      observedOverExpected: sp > 0 ? sy / sp : null,
      ...base,
      warnings: [
        warning(
          'one-class-only',
          'Calibration intercept and slope need both events and non-events.',
          'Evaluate on data that contain both.',
        ),
      ],
    };
  }
  const warnings: EngineWarning[] = [];
  const z = qnorm(1 - (1 - level) / 2);
  // written straight into shared memory when a row pool is installed (forPool then has nothing to copy)
  const ones = allocF64(n).fill(1);
  const citl = fitSmallLogistic(ones, n, 1, y, w, eta);
  const X = allocDesign(n, 2);
  X.set(ones);
  X.set(eta, n);
  const sl = fitSmallLogistic(X, n, 2, y, w, undefined, new Float64Array([0, 1]));
  if (!citl.converged || !sl.converged) {
    warnings.push(
      warning(
        'calibration-not-converged',
        `The ${!citl.converged ? 'calibration-in-the-large' : 'calibration slope'} fit did not converge, ` +
          `usually because the linear predictor separates events from non-events perfectly; ` +
          `${!citl.converged ? 'neither estimate is' : 'the slope is not'} reported.`,
        'Check for perfect separation (e.g. a predictor that leaks the outcome) or evaluate on more data.',
      ),
    );
  }
  const slopeOk = sl.converged && citl.converged && sl.cov !== null;
  let slope: IntervalEstimate | null = null;
  if (slopeOk) slope = interval(sl.beta[1], sl.cov![3], z);
  else if (!sl.cov)
    warnings.push(
      warning(
        'calibration-slope-undefined',
        'The linear predictor has (almost) no spread, so the calibration slope cannot be estimated.',
        'Check that the model has predictors.',
      ),
    );
  return {
    interceptInTheLarge: citl.converged && citl.cov ? interval(citl.beta[0], citl.cov[0], z) : null,
    slope,
    slopeModelIntercept: slopeOk ? sl.beta[0] : null,
    observedRate: sy / sw,
    meanPredicted: sp / sw,
    observedOverExpected: sy / sp,
    ...base,
    warnings,
  };
}
