import { qnorm, twoSidedP } from '../numerics/distributions';
import type { PairedDifference } from './types';

export const PAIRED_BRIER_METHOD =
  'Per case, the squared error of b minus that of a, (y − p_b)² − (y − p_a)²; the difference in Brier score is ' +
  'their mean, its standard error their standard deviation (n − 1) over √n, the interval mean ± z·SE and the ' +
  'p-value two-sided from z = mean/SE (normal approximation for paired cases).';

/**
 * Difference in Brier score, model b − model a, on the same cases (riskB[k] is the same case as riskA[k]), with
 * the paired normal-theory interval of PAIRED_BRIER_METHOD. SE, z, p and limits are null below 2 cases or when
 * every case has the same difference.
 */
export function pairedBrierDifference(
  y: Float64Array,
  riskA: Float64Array,
  riskB: Float64Array,
  level: number,
): PairedDifference {
  const n = y.length;
  const d = new Float64Array(n);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    d[i] = (y[i] - riskB[i]) ** 2 - (y[i] - riskA[i]) ** 2;
    sum += d[i];
  }
  const estimate = n > 0 ? sum / n : 0;
  const none = { se: null, z: null, p: null, lower: null, upper: null, level, method: PAIRED_BRIER_METHOD };
  if (n < 2) return { estimate, ...none };
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (d[i] - estimate) ** 2;
  const se = Math.sqrt(ss / (n - 1) / n);
  if (!(se > 0)) return { estimate, ...none };
  const z = estimate / se;
  const q = qnorm(1 - (1 - level) / 2);
  return {
    estimate,
    se,
    z,
    p: twoSidedP(z),
    lower: estimate - q * se,
    upper: estimate + q * se,
    level,
    method: PAIRED_BRIER_METHOD,
  };
}
