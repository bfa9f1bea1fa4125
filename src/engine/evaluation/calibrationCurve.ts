import { FulcraError } from '../core/data';
import { checkLevel, checkOutcomeAndPredictor } from '../core/vectors';
import { harrellKnots, rcsBasis } from '../design/splines';
import { qnorm } from '../numerics/distributions';
import { clampRisk, logit, sigmoid } from '../numerics/loss';
import { quantileBySelection, quantileSorted, weightedQuantile } from '../numerics/quantile';
import { fitSmallLogistic } from './calibration';
import { allocDesign } from '../numerics/rowPool';
import { warning, type EngineWarning } from '../core/warnings';

export interface CalibrationCurve {
  /** Knots on the linear-predictor (logit) scale; empty when the curve fell back to a straight line. */
  knots: number[];
  /**
   * Grid of predicted risks (1st to 99th percentile of the risks) with the estimated observed risk and its
   * pointwise band.
   */
  predicted: number[];
  observed: number[];
  lower: number[];
  upper: number[];
  level: number;
  /** Integrated calibration index: mean |p − p_cal| over the cases (Austin & Steyerberg 2019, Stat Med 38:4051). */
  ici: number | null;
  /** Median, 90th percentile and maximum of |p − p_cal| over the cases. */
  e50: number | null;
  e90: number | null;
  emax: number | null;
  method: string;
  warnings: EngineWarning[];
}

export interface CalibrationCurveOptions {
  knots?: 3 | 4 | 5;
  gridSize?: number;
  level?: number;
  weights?: Float64Array;
}

/**
 * The linear predictor sorted, with each row repeated by its weight when the weights are whole numbers (frequency
 * weights) and add up to at most 5·10⁶ cases: knots and plotting range are then those of the cases.
 */
function casesSorted(eta: Float64Array, w: Float64Array | undefined): Float64Array {
  if (!w || !w.every((v) => Number.isInteger(v))) return eta.slice().sort();
  let total = 0;
  for (const v of w) total += v;
  if (total > 5e6) return eta.slice().sort();
  const out = new Float64Array(total);
  let k = 0;
  for (let i = 0; i < eta.length; i++) {
    out.fill(eta[i], k, k + w[i]);
    k += w[i];
  }
  return out.sort();
}

/**
 * Flexible calibration curve: logistic regression of y on a restricted cubic spline of the linear predictor eta
 * (knots at Harrell's default placement, harrellKnots, as Hmisc rcspline.eval), maximum likelihood. The band is a
 * pointwise Wald interval on the logit scale, transformed back. ICI/E50/E90/Emax compare each case's risk with its
 * recalibrated risk (Austin & Steyerberg 2019, with the spline instead of loess).
 */
export function calibrationCurve(
  y: Float64Array,
  eta: Float64Array,
  options: CalibrationCurveOptions = {},
): CalibrationCurve {
  const nk = options.knots ?? 4;
  if (![3, 4, 5].includes(nk))
    throw new FulcraError('bad-knots', `The calibration curve takes 3, 4 or 5 knots, got ${nk}.`);
  const gridSize = options.gridSize ?? 100;
  if (!(Number.isInteger(gridSize) && gridSize >= 2))
    throw new FulcraError('bad-grid', `The grid size must be an integer ≥ 2, got ${gridSize}.`);
  const level = checkLevel(options.level);
  const n = y.length;
  checkOutcomeAndPredictor(y, eta);
  let events = 0;
  for (let i = 0; i < n; i++) events += y[i];
  const warnings: EngineWarning[] = [];
  const empty: CalibrationCurve = {
    knots: [],
    predicted: [],
    observed: [],
    lower: [],
    upper: [],
    level,
    ici: null,
    e50: null,
    e90: null,
    emax: null,
    method: '',
    warnings,
  };
  if (events === 0 || events === n) {
    warnings.push(
      warning(
        'one-class-only',
        'A calibration curve needs both events and non-events.',
        'Evaluate on data that contain both.',
      ),
    );
    return empty;
  }
  const sorted = casesSorted(eta, options.weights);
  if (sorted[0] === sorted[sorted.length - 1]) {
    warnings.push(
      warning(
        'calibration-curve-undefined',
        'Every case has the same predicted risk, so no calibration curve can be drawn.',
        'Compare the single predicted risk with the observed outcome rate instead.',
      ),
    );
    return empty;
  }
  let knots = Array.from(new Set(harrellKnots(sorted, nk)));
  if (knots.length < nk) {
    warnings.push(
      warning(
        'calibration-knots-reduced',
        `The linear predictor has too many tied values for ${nk} distinct knots; ` +
          (knots.length >= 3
            ? `${knots.length} knots were used.`
            : 'a straight line (calibration slope model) was used instead.'),
        'This is expected when the model has few distinct predictions.',
      ),
    );
    if (knots.length < 3) knots = [];
  }
  const p = knots.length > 0 ? knots.length : 2;
  const X = allocDesign(n, p); // shared when a row pool is installed, as the fit reads it there
  const terms = new Float64Array(Math.max(0, p - 2));
  for (let i = 0; i < n; i++) {
    X[i] = 1;
    X[n + i] = eta[i];
    if (p > 2) {
      rcsBasis(eta[i], knots, terms);
      for (let j = 0; j < p - 2; j++) X[(j + 2) * n + i] = terms[j];
    }
  }
  const start = new Float64Array(p);
  start[1] = 1;
  const fit = fitSmallLogistic(X, n, p, y, options.weights, undefined, start);
  if (!fit.converged) {
    warnings.push(
      warning(
        'calibration-curve-not-converged',
        'The calibration curve fit did not converge (usually perfect separation of events from non-events), so ' +
          'no curve or ICI is reported.',
        'Use fewer knots, check for perfect separation, or evaluate on more data.',
      ),
    );
    return empty;
  }
  if (!fit.cov) {
    warnings.push(
      warning(
        'calibration-curve-singular',
        'The calibration curve could not be estimated (the spline terms are collinear).',
        'Use fewer knots.',
      ),
    );
    return empty;
  }
  const w = options.weights;
  const absErr = new Float64Array(n);
  let sw = 0;
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const pi = sigmoid(eta[i]);
    absErr[i] = Math.abs(pi - fit.fitted[i]);
    const wi = w ? w[i] : 1;
    sw += wi;
    sum += wi * absErr[i];
  }
  // E50, E90 and Emax without sorting the n errors: two selections and a maximum give the same numbers
  let emax = -Infinity,
    nan = false;
  for (let i = 0; i < n; i++) {
    if (absErr[i] > emax) emax = absErr[i];
    if (absErr[i] !== absErr[i]) nan = true;
  }
  const errSorted = nan ? absErr.slice().sort() : null;
  const scratch = w || nan ? null : absErr.slice();
  const errQuantile = (q: number) =>
    w
      ? weightedQuantile(absErr, w, q)
      : errSorted
        ? quantileSorted(errSorted, q)
        : quantileBySelection(absErr, q, scratch!);
  const z = qnorm(1 - (1 - level) / 2);
  const pLo = sigmoid(quantileSorted(sorted, 0.01));
  const pHi = sigmoid(quantileSorted(sorted, 0.99));
  const predicted: number[] = [];
  const observed: number[] = [];
  const lower: number[] = [];
  const upper: number[] = [];
  const x = new Float64Array(p);
  for (let g = 0; g < gridSize; g++) {
    const pg = clampRisk(pLo + ((pHi - pLo) * g) / (gridSize - 1));
    const e = logit(pg);
    x[0] = 1;
    x[1] = e;
    if (p > 2) {
      rcsBasis(e, knots, terms);
      x.set(terms, 2);
    }
    let lp = 0;
    let v = 0;
    for (let a = 0; a < p; a++) {
      lp += x[a] * fit.beta[a];
      for (let b = 0; b < p; b++) v += x[a] * fit.cov[a * p + b] * x[b];
    }
    const se = Math.sqrt(Math.max(0, v));
    predicted.push(pg);
    observed.push(sigmoid(lp));
    lower.push(sigmoid(lp - z * se));
    upper.push(sigmoid(lp + z * se));
  }
  return {
    knots,
    predicted,
    observed,
    lower,
    upper,
    level,
    ici: sum / sw,
    e50: errQuantile(0.5),
    e90: errQuantile(0.9),
    emax: errSorted ? errSorted[n - 1] : emax,
    method:
      knots.length > 0
        ? `Logistic regression of the outcome on a restricted cubic spline of the linear predictor with ` +
          `${knots.length} knots (Harrell's quantiles); ${Math.round(level * 100)}% pointwise Wald band on the ` +
          `logit scale; drawn from the 1st to the 99th percentile of the predicted risks.`
        : 'Logistic regression of the outcome on the linear predictor (straight line; too few distinct ' +
          'predictions for a spline).',
    warnings,
  };
}
