import { qchisq, qnorm } from '../numerics/distributions';
import type { RatioInterval } from './types';

const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);

/** log Γ(x) for x > 0: Stirling's series from x ≥ 15, shifted up by the recurrence below (common practice). */
function lgamma(x: number): number {
  let shift = 0;
  while (x < 15) {
    shift += Math.log(x);
    x += 1;
  }
  const x2 = x * x;
  const series = 1 / (12 * x) - 1 / (360 * x * x2) + 1 / (1260 * x * x2 * x2) - 1 / (1680 * x * x2 * x2 * x2);
  return (x - 0.5) * Math.log(x) - x + HALF_LOG_2PI + series - shift;
}

/** P(X = r) for X ~ Poisson(mu), from its logarithm r·log mu − mu − log r!. */
export function dpois(r: number, mu: number): number {
  if (r < 0 || !Number.isInteger(r)) return 0;
  if (mu <= 0) return r === 0 ? 1 : 0;
  return Math.exp(r * Math.log(mu) - mu - lgamma(r + 1));
}

/**
 * P(X ≤ r) for X ~ Poisson(mu), summing the probabilities outward from r (down to 0 below the mean, or the upper
 * tail above it, subtracted from 1) until they no longer change the sum; the terms shrink geometrically, so a
 * few thousand suffice even at mu = 10⁵. (The chi-square route through @stdlib's incomplete gamma loses ~3
 * digits at mu ≈ 25 000 against R 4.2.2 ppois.)
 */
export function ppois(r: number, mu: number): number {
  r = Math.floor(r);
  if (r < 0) return 0;
  if (mu <= 0) return 1;
  if (r < mu) {
    let term = dpois(r, mu),
      sum = term;
    for (let k = r; k > 0 && term > 1e-17 * sum; k--) {
      term *= k / mu;
      sum += term;
    }
    return Math.min(1, sum);
  }
  let term = dpois(r + 1, mu),
    sum = term;
  for (let k = r + 2; term > 1e-17 * sum; k++) {
    term *= mu / k;
    sum += term;
  }
  return Math.max(0, 1 - sum);
}

/** The p-quantile of Poisson(mu): the smallest r with P(X ≤ r) ≥ p (R's qpois). */
export function qpois(p: number, mu: number): number {
  if (mu <= 0) return 0;
  let r = Math.max(0, Math.floor(mu + qnorm(p) * Math.sqrt(mu)));
  // A relative slack keeps a cdf that equals p up to rounding on the side R's qpois takes (common practice).
  const reach = (k: number) => ppois(k, mu) >= p * (1 - 64 * Number.EPSILON);
  if (reach(r)) {
    while (r > 0 && reach(r - 1)) r--;
  } else {
    while (!reach(r)) r++;
  }
  return r;
}

/**
 * Funnel-plot limit on the count scale for a Poisson count with expectation `mu` at tail probability p
 * (Spiegelhalter 2005, Stat Med 24:1185, appendix A.1): r_p = qpois(p, mu) is interpolated to
 * y_p = r_p − α with α = (P(X ≤ r_p) − p) / P(X = r_p), so the limits vary smoothly with mu. Kept ≥ 0.
 */
export function poissonLimitCount(p: number, mu: number): number {
  if (!(mu > 0)) return 0;
  const r = qpois(p, mu);
  const f = dpois(r, mu);
  const alpha = f > 0 ? (ppois(r, mu) - p) / f : 0;
  return Math.max(0, r - alpha);
}

/** Lower and upper funnel limits for O/E at expectation `mu` and two-sided `level`. */
export function funnelRatioLimits(level: number, mu: number): { lower: number; upper: number } {
  const tail = (1 - level) / 2;
  return { lower: poissonLimitCount(tail, mu) / mu, upper: poissonLimitCount(1 - tail, mu) / mu };
}

/** The mean mu at which P(X ≤ r; mu) = target (decreasing in mu): Newton with d/dmu = −P(X = r; mu), safeguarded. */
function poissonMeanFor(r: number, target: number, start: number): number {
  let mu = Math.max(start, 1e-12),
    lo = 0,
    hi = Infinity;
  for (let it = 0; it < 100; it++) {
    const g = ppois(r, mu) - target;
    if (g > 0) lo = mu;
    else hi = mu;
    const next = mu + g / dpois(r, mu);
    const bounded = next > lo && next < hi ? next : hi === Infinity ? 2 * mu : (lo + hi) / 2;
    if (Math.abs(bounded - mu) <= 1e-15 * mu) return bounded;
    mu = bounded;
  }
  return mu;
}

/**
 * Exact Poisson interval for an observed count O (Garwood 1936, Biometrika 28:437; Ulm 1990, Am J Epidemiol
 * 131:373): the means at which P(X ≥ O) = α/2 (lower; 0 when O = 0) and P(X ≤ O) = α/2 (upper), i.e.
 * χ²(α/2; 2O)/2 and χ²(1 − α/2; 2O + 2)/2. Started at @stdlib's chi-square quantiles, solved on the Poisson cdf
 * (the quantiles alone are off by ~1e-4 at large O, e.g. 1304.98 for R 4.2.2's 1304.82 at O = 1234).
 */
export function garwoodCount(observed: number, level: number): { lower: number; upper: number } {
  const a = (1 - level) / 2;
  return {
    lower: observed > 0 ? poissonMeanFor(observed - 1, 1 - a, qchisq(a, 2 * observed) / 2) : 0,
    upper: poissonMeanFor(observed, a, qchisq(1 - a, 2 * observed + 2) / 2),
  };
}

/** O/E with the Garwood interval divided by E; all null when E is 0. */
export function observedExpectedRatio(observed: number, expected: number, level: number): RatioInterval {
  if (!(expected > 0)) return { estimate: null, lower: null, upper: null };
  const ci = garwoodCount(observed, level);
  return { estimate: observed / expected, lower: ci.lower / expected, upper: ci.upper / expected };
}
