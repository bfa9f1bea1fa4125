import { FulcraError } from '../core/data';
import { sigmoid } from '../numerics/loss';
import { searchSorted } from '../numerics/searchSorted';
import { qnorm, twoSidedP } from '../numerics/distributions';
import { warning, type EngineWarning } from '../core/warnings';
import { discriminationWarnings } from './roc';
import { checkScoredOutcome, prepareThresholds, type PreparedThresholds } from './threshold';

/** AUC with the DeLong standard error and a confidence interval. Numbers are null when undefined (see warnings). */
export interface AucInterval {
  auc: number | null;
  se: number | null;
  lower: number | null;
  upper: number | null;
  level: number;
  /**
   * 'delong-auc-scale': auc ± z·se clamped to [0, 1] (as pROC's ci.auc(method = "delong"));
   * 'delong-logit-scale': the interval built on logit(AUC) and transformed back;
   * 'max-variance-bound': AUC of exactly 0 or 1, where the DeLong variance is 0 (see warnings).
   */
  ciMethod: 'delong-auc-scale' | 'delong-logit-scale' | 'max-variance-bound' | 'none';
  events: number;
  nonEvents: number;
  warnings: EngineWarning[];
}

export interface DelongOptions {
  level?: number;
  /** 'auc' (default, as pROC) or 'logit' (keeps the interval inside (0, 1) without clamping). */
  scale?: 'auc' | 'logit';
}

interface Placements {
  /** V10: per event (in case order), the fraction of non-events it outranks (ties ½). */
  v10: Float64Array;
  /** V01: per non-event (in case order), the fraction of events that outrank it (ties ½). */
  v01: Float64Array;
}

const lowerBound = (a: Float64Array, v: number): number => searchSorted(a, v, 'left');
const upperBound = (a: Float64Array, v: number): number => searchSorted(a, v, 'right');

/** Placement values in case order (needed to pair two scores), O(n log n): two sorts and binary searches. */
function placements(y: Float64Array, s: Float64Array): Placements {
  let m = 0;
  for (let i = 0; i < y.length; i++) m += y[i];
  const x = new Float64Array(m);
  const z = new Float64Array(y.length - m);
  for (let i = 0, a = 0, b = 0; i < y.length; i++)
    if (y[i] === 1) x[a++] = s[i];
    else z[b++] = s[i];
  const xs = x.slice().sort();
  const zs = z.slice().sort();
  const v10 = new Float64Array(x.length);
  const v01 = new Float64Array(z.length);
  for (let i = 0; i < x.length; i++) {
    const lo = lowerBound(zs, x[i]);
    v10[i] = (lo + 0.5 * (upperBound(zs, x[i]) - lo)) / zs.length;
  }
  for (let j = 0; j < z.length; j++) {
    const hi = upperBound(xs, z[j]);
    v01[j] = (xs.length - hi + 0.5 * (hi - lowerBound(xs, z[j]))) / xs.length;
  }
  return { v10, v01 };
}

function mean(a: Float64Array): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += a[i];
  return s / a.length;
}

function cov(a: Float64Array, b: Float64Array, ma: number, mb: number): number {
  let s = 0;
  for (let i = 0; i < a.length; i++) s += (a[i] - ma) * (b[i] - mb);
  return s / (a.length - 1);
}

function checkLevel(level: number): void {
  if (!(level > 0 && level < 1))
    throw new FulcraError('bad-level', `The confidence level must be between 0 and 1, got ${level}.`);
}

/**
 * AUC with the DeLong, DeLong & Clarke-Pearson (1988, Biometrics 44:837) variance. Higher score = higher
 * risk (no automatic direction). Case weights are not supported.
 * An AUC of exactly 0 or 1 has DeLong variance 0; the interval is then one-sided, from Bamber's
 * (1975, J Math Psychol 12:387) bound var ≤ A(1 − A)/min(m, n) (bound recalled from memory), giving
 * the lower limit k/(k + z²) with k = min(events, non-events), and a warning.
 */
export function delongAuc(y: Float64Array, score: Float64Array, options: DelongOptions = {}): AucInterval {
  return delongFromPrepared(prepareThresholds(y, score, undefined, false), options);
}

/**
 * DeLong AUC from the one-sort threshold structure in O(distinct scores): every event at a distinct score
 * shares one placement value V10 = (non-events below + ½·tied)/n, every non-event one V01 = (events
 * above + ½·tied)/m — the midrank formulation of Sun & Xu (2014, IEEE Signal Process Lett 21:1389).
 * With frequency weights (whole numbers) the counts are case counts, so the result is that of the cases written
 * out one row each.
 */
export function delongFromPrepared(prep: PreparedThresholds, options: DelongOptions = {}): AucInterval {
  const level = options.level ?? 0.95;
  checkLevel(level);
  if (prep.weighted && !prep.frequencyWeights)
    throw new FulcraError(
      'weights-not-supported',
      'The DeLong interval is defined for cases; with weights that are not whole numbers (counts of cases) it is ' +
        'not defined. Prepare the thresholds without weights.',
    );
  const { risks, eventsAtOrAbove: ea, nonEventsAtOrAbove: na, events: m, nonEvents: n } = prep;
  const K = risks.length;
  const warnings = discriminationWarnings(m, n, K);
  const base = { level, events: m, nonEvents: n, warnings };
  if (m === 0 || n === 0) return { auc: null, se: null, lower: null, upper: null, ciMethod: 'none', ...base };
  let auc = 0;
  for (let k = 0; k < K; k++) {
    const ek = ea[k] - (k + 1 < K ? ea[k + 1] : 0);
    const nk = na[k] - (k + 1 < K ? na[k + 1] : 0);
    auc += ek * (n - na[k] + 0.5 * nk);
  }
  auc /= m * n;
  if (m < 2 || n < 2) return { auc, se: null, lower: null, upper: null, ciMethod: 'none', ...base };
  let s10 = 0;
  let s01 = 0;
  for (let k = 0; k < K; k++) {
    const ek = ea[k] - (k + 1 < K ? ea[k + 1] : 0);
    const nk = na[k] - (k + 1 < K ? na[k + 1] : 0);
    if (ek > 0) s10 += ek * ((n - na[k] + 0.5 * nk) / n - auc) ** 2;
    if (nk > 0) s01 += nk * ((ea[k] - 0.5 * ek) / m - auc) ** 2;
  }
  const variance = s10 / ((m - 1) * m) + s01 / ((n - 1) * n);
  const se = Math.sqrt(Math.max(0, variance));
  const z = qnorm(1 - (1 - level) / 2);
  if (auc === 1 || auc === 0) {
    const k = Math.min(m, n);
    const bound = k / (k + z * z);
    warnings.push(
      warning(
        'auc-perfect',
        `The model separates events from non-events perfectly in these data (AUC = ${auc}). The DeLong standard ` +
          `error is 0, so no two-sided interval is given; the ${Math.round(level * 100)}% interval shown is ` +
          `one-sided, from the largest variance an AUC can have with ${k} cases in the smaller class.`,
        'Perfect separation usually means a predictor leaks the outcome or the sample is small; check on new data.',
      ),
    );
    return {
      auc,
      se,
      lower: auc === 1 ? bound : 0,
      upper: auc === 1 ? 1 : 1 - bound,
      ciMethod: 'max-variance-bound',
      ...base,
    };
  }
  if (!(se > 0)) {
    if (K > 1)
      warnings.push(
        warning(
          'auc-zero-variance',
          'The DeLong standard error is 0, so no confidence interval can be given.',
          'Evaluate on more varied data.',
        ),
      );
    return { auc, se, lower: null, upper: null, ciMethod: 'none', ...base };
  }
  if (options.scale === 'logit') {
    const l = Math.log(auc / (1 - auc));
    const h = (z * se) / (auc * (1 - auc));
    return {
      auc,
      se,
      lower: sigmoid(l - h),
      upper: sigmoid(l + h),
      ciMethod: 'delong-logit-scale',
      ...base,
    };
  }
  return {
    auc,
    se,
    lower: Math.max(0, auc - z * se),
    upper: Math.min(1, auc + z * se),
    ciMethod: 'delong-auc-scale',
    ...base,
  };
}

export interface PairedDelongTest {
  auc1: number | null;
  auc2: number | null;
  /** auc1 − auc2 */
  difference: number | null;
  se: number | null;
  z: number | null;
  p: number | null;
  lower: number | null;
  upper: number | null;
  /** Correlation of the two AUC estimates. */
  correlation: number | null;
  level: number;
  warnings: EngineWarning[];
}

/**
 * Paired DeLong test of two scores on the same cases (DeLong et al. 1988): z = (A1 − A2)/SE(A1 − A2),
 * two-sided p, and a Wald interval for the difference. As pROC's roc.test(method = "delong", paired = TRUE).
 */
export function delongPairedTest(
  y: Float64Array,
  score1: Float64Array,
  score2: Float64Array,
  options: { level?: number } = {},
): PairedDelongTest {
  const level = options.level ?? 0.95;
  checkLevel(level);
  checkScoredOutcome(y, score1, undefined, false);
  checkScoredOutcome(y, score2, undefined, false);
  const a = placements(y, score1);
  const b = placements(y, score2);
  const m = a.v10.length;
  const n = a.v01.length;
  const warnings = discriminationWarnings(m, n, 2);
  const none = { se: null, z: null, p: null, lower: null, upper: null, correlation: null, level, warnings };
  if (m === 0 || n === 0) return { auc1: null, auc2: null, difference: null, ...none };
  const auc1 = mean(a.v10);
  const auc2 = mean(b.v10);
  if (m < 2 || n < 2) return { auc1, auc2, difference: auc1 - auc2, ...none };
  const v1 = cov(a.v10, a.v10, auc1, auc1) / m + cov(a.v01, a.v01, auc1, auc1) / n;
  const v2 = cov(b.v10, b.v10, auc2, auc2) / m + cov(b.v01, b.v01, auc2, auc2) / n;
  const c12 = cov(a.v10, b.v10, auc1, auc2) / m + cov(a.v01, b.v01, auc1, auc2) / n;
  const vd = v1 + v2 - 2 * c12;
  const correlation = v1 > 0 && v2 > 0 ? c12 / Math.sqrt(v1 * v2) : null;
  if (!(vd > 1e-15 * Math.max(v1, v2, 1e-300))) {
    warnings.push(
      warning(
        'auc-difference-zero-variance',
        'The two scores rank the cases identically (or both perfectly), so the difference in AUC has no ' +
          'variance and cannot be tested.',
        'Compare models that differ in how they rank cases.',
      ),
    );
    return { auc1, auc2, difference: auc1 - auc2, ...none, correlation };
  }
  const se = Math.sqrt(vd);
  const z = (auc1 - auc2) / se;
  const q = qnorm(1 - (1 - level) / 2);
  return {
    auc1,
    auc2,
    difference: auc1 - auc2,
    se,
    z,
    p: twoSidedP(z),
    lower: auc1 - auc2 - q * se,
    upper: auc1 - auc2 + q * se,
    correlation,
    level,
    warnings,
  };
}
