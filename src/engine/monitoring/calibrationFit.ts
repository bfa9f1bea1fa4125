import type { IntervalEstimate } from '../evaluation/calibration';
import { qnorm } from '../numerics/distributions';

/**
 * Calibration-in-the-large α (logit P(y) = α + offset(η)) and the calibration slope b (logit P(y) = a + b·η) by
 * Newton's method written for one and two parameters, one pass over the cases per step, so 10⁶ cases take
 * milliseconds; the same maximum-likelihood estimates and Wald intervals as evaluation/calibration.ts
 * calibrationRegression (checked in tests/engine/monitoring/monitor.test.ts). Cases [from, to); null when the
 * cases are all events or all non-events, or Newton does not converge in 50 steps. `start`: α to start from.
 * `expNeg`: e^−η per case when the caller has it (then a step needs no exponential: e^−(η+α) = e^−η·e^−α).
 */
export function citlFit(
  y: Float64Array,
  eta: Float64Array,
  level: number,
  from = 0,
  to = y.length,
  start = 0,
  expNeg?: Float64Array,
): IntervalEstimate | null {
  let ev = 0;
  for (let i = from; i < to; i++) ev += y[i];
  if (ev === 0 || ev === to - from) return null;
  let a = start;
  for (let it = 0; it < 50; it++) {
    let g = 0,
      h = 0;
    if (expNeg) {
      const ea = Math.exp(-a);
      for (let i = from; i < to; i++) {
        const p = 1 / (1 + expNeg[i] * ea);
        g += y[i] - p;
        h += p * (1 - p);
      }
    } else
      for (let i = from; i < to; i++) {
        const p = 1 / (1 + Math.exp(-(eta[i] + a)));
        g += y[i] - p;
        h += p * (1 - p);
      }
    const step = Math.max(-5, Math.min(5, g / h));
    a += step;
    // At a step below 1e-10 the information at the previous iterate equals that at the estimate to ~1e-10.
    if (Math.abs(step) < 1e-10) return interval(a, 1 / h, level);
  }
  return null;
}

function interval(est: number, variance: number, level: number): IntervalEstimate {
  const se = Math.sqrt(variance),
    z = qnorm(1 - (1 - level) / 2);
  return { estimate: est, se, lower: est - z * se, upper: est + z * se };
}

/** The calibration slope b of logit P(y) = a + b·η with its Wald interval (and a), or null (see citlFit). */
export function slopeFit(
  y: Float64Array,
  eta: Float64Array,
  level: number,
): { intercept: IntervalEstimate; slope: IntervalEstimate } | null {
  const n = y.length;
  let ev = 0,
    lo = Infinity,
    hi = -Infinity;
  for (let i = 0; i < n; i++) {
    ev += y[i];
    if (eta[i] < lo) lo = eta[i];
    if (eta[i] > hi) hi = eta[i];
  }
  if (ev === 0 || ev === n || !(hi > lo)) return null;
  let a = 0,
    b = 1;
  for (let it = 0; it < 50; it++) {
    let g0 = 0,
      g1 = 0,
      h00 = 0,
      h01 = 0,
      h11 = 0;
    for (let i = 0; i < n; i++) {
      const x = eta[i];
      const p = 1 / (1 + Math.exp(-(a + b * x)));
      const r = y[i] - p,
        w = p * (1 - p);
      g0 += r;
      g1 += r * x;
      h00 += w;
      h01 += w * x;
      h11 += w * x * x;
    }
    const det = h00 * h11 - h01 * h01;
    if (!(det > 0)) return null;
    const da = (h11 * g0 - h01 * g1) / det,
      db = (h00 * g1 - h01 * g0) / det;
    a += da;
    b += db;
    if (Math.abs(da) < 1e-10 && Math.abs(db) < 1e-10)
      return { intercept: interval(a, h11 / det, level), slope: interval(b, h00 / det, level) };
  }
  return null;
}
