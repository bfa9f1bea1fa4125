import { interceptDeviance } from '../numerics/loss';
import { cholesky, choleskyInverse } from '../numerics/linalg';
import { qnorm, twoSidedP } from '../numerics/distributions';

export interface WaldRow {
  se: number;
  z: number;
  p: number;
  lower: number;
  upper: number;
}

/**
 * Wald inference per coefficient from the covariance (row-major p×p): se = √V_jj, z = β/se,
 * two-sided normal p, CI β ± z_{(1+level)/2}·se. Rows with a non-positive or non-finite variance give null.
 */
export function waldTable(beta: ArrayLike<number>, cov: ArrayLike<number>, level: number): (WaldRow | null)[] {
  const p = beta.length;
  const zc = qnorm(0.5 + level / 2);
  return Array.from({ length: p }, (_, j) => {
    const v = cov[j * p + j];
    if (!(v > 0) || !Number.isFinite(v)) return null;
    const se = Math.sqrt(v);
    const z = beta[j] / se;
    return { se, z, p: twoSidedP(z), lower: beta[j] - zc * se, upper: beta[j] + zc * se };
  });
}

/**
 * −2·loglik of the intercept-only model: −2·Σ wᵢ[y·log ȳ + (1−y)·log(1−ȳ)] (ȳ weighted; w = 1 without frequency
 * weights); 0 when all outcomes are equal.
 */
export function nullDeviance(y: ArrayLike<number>, weights?: ArrayLike<number>): number {
  let s = 0;
  let n = 0;
  for (let i = 0; i < y.length; i++) {
    const w = weights ? weights[i] : 1;
    s += w * y[i];
    n += w;
  }
  return interceptDeviance(s, n);
}

/** AIC = deviance + 2k, BIC = deviance + k·log n, k = number of estimated coefficients (intercept included). */
export function informationCriteria(deviance: number, k: number, n: number): { aic: number; bic: number } {
  return { aic: deviance + 2 * k, bic: deviance + k * Math.log(n) };
}

/** V = A·B·A' for row-major p×p A and B. */
export function sandwich(A: Float64Array, B: ArrayLike<number>, p: number): Float64Array {
  const AB = new Float64Array(p * p),
    out = new Float64Array(p * p);
  for (let i = 0; i < p; i++)
    for (let k = 0; k < p; k++) {
      const a = A[i * p + k];
      if (a === 0) continue;
      for (let j = 0; j < p; j++) AB[i * p + j] += a * B[k * p + j];
    }
  for (let i = 0; i < p; i++)
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let k = 0; k < p; k++) s += AB[i * p + k] * A[j * p + k];
      out[i * p + j] = s;
    }
  return out;
}

/**
 * Covariance of the original-scale coefficients (row-major p×p, aliased columns 0) from the information of the
 * kept standardised columns: V = A·I⁻¹·A' (A = destandardiseMap); null when it is not finite.
 */
export function originalCovariance(
  information: Float64Array,
  keep: number[],
  p: number,
  A: Float64Array,
): Float64Array | null {
  const pk = keep.length;
  const inv = choleskyInverse(cholesky(information, pk));
  const full = new Float64Array(p * p);
  keep.forEach((i, a) => keep.forEach((j, b) => (full[i * p + j] = inv[a * pk + b])));
  const covariance = sandwich(A, full, p);
  return covariance.every(Number.isFinite) ? covariance : null;
}
