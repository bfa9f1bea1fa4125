/**
 * Distribution functions used for p-values and intervals, from @stdlib (well-tested ports of the
 * Cephes/Boost algorithms). Upper tails are computed directly, not as 1 − cdf, so tiny p-values keep
 * their digits.
 */
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import gammainc from '@stdlib/math-base-special-gammainc';
import tCdf from '@stdlib/stats-base-dists-t-cdf';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import chisqQuantile from '@stdlib/stats-base-dists-chisquare-quantile';
import betaQuantile from '@stdlib/stats-base-dists-beta-quantile';
import betainc from '@stdlib/math-base-special-betainc';

/** Standard normal CDF Φ(z). */
export function pnorm(z: number): number {
  return normalCdf(z, 0, 1);
}

/** Standard normal quantile Φ⁻¹(p). */
export function qnorm(p: number): number {
  return normalQuantile(p, 0, 1);
}

/** Two-sided p-value of a z statistic: 2·Φ(−|z|). */
export function twoSidedP(z: number): number {
  return 2 * normalCdf(-Math.abs(z), 0, 1);
}

/** Upper tail P(X ≥ x) of a chi-square with df degrees of freedom. */
export function pchisqUpper(x: number, df: number): number {
  if (!(x > 0)) return 1;
  if (x === Infinity) return 0;
  return gammainc(x / 2, df / 2, true, true);
}

export function qchisq(p: number, df: number): number {
  return chisqQuantile(p, df);
}

/** Student t CDF. */
export function pt(x: number, df: number): number {
  return tCdf(x, df);
}

export function qt(p: number, df: number): number {
  return tQuantile(p, df);
}

/** Beta quantile (used for exact Clopper–Pearson intervals). */
export function qbeta(p: number, a: number, b: number): number {
  return betaQuantile(p, a, b);
}

/**
 * Upper tail P(F > x) of an F distribution with d1 and d2 degrees of freedom: the upper regularised incomplete
 * beta I_{1−u}(d2/2, d1/2) at u = d1·x/(d1·x + d2), computed directly; the χ²(d1)/d1 limit when d2 = ∞.
 */
export function pfUpper(x: number, d1: number, d2: number): number {
  if (Number.isNaN(x)) return NaN;
  if (!(x > 0)) return 1;
  if (x === Infinity) return 0;
  if (d2 === Infinity) return pchisqUpper(d1 * x, d1);
  return betainc((d1 * x) / (d1 * x + d2), d1 / 2, d2 / 2, true, true);
}
