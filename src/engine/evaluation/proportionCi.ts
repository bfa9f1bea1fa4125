import { FulcraError } from '../core/data';
import { qbeta, qnorm } from '../numerics/distributions';

/** A proportion x/n with its confidence interval; null bounds when n = 0. */
export interface ProportionEstimate {
  x: number;
  n: number;
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  method: ProportionCiMethod;
}

export type ProportionCiMethod = 'wilson' | 'clopper-pearson';

function check(x: number, n: number, level: number): void {
  if (!(n >= 0) || !Number.isFinite(n))
    throw new FulcraError('bad-count', `The number of cases must be a finite count ≥ 0, got ${n}.`);
  if (!(x >= 0 && x <= n)) throw new FulcraError('bad-count', `The count ${x} must lie between 0 and n = ${n}.`);
  if (!(level > 0 && level < 1))
    throw new FulcraError('bad-level', `The confidence level must be between 0 and 1, got ${level}.`);
}

/**
 * Wilson score interval (Wilson 1927, JASA 22:209) for x/n, without continuity correction.
 * Same as R's prop.test(x, n, correct = FALSE)$conf.int. x and n may be non-integer (weighted counts).
 */
export function wilsonCi(x: number, n: number, level = 0.95): ProportionEstimate {
  check(x, n, level);
  if (n === 0) return { x, n, estimate: null, lower: null, upper: null, method: 'wilson' };
  const z = qnorm(1 - (1 - level) / 2);
  const p = x / n;
  const z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = (z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  return {
    x,
    n,
    estimate: p,
    lower: x === 0 ? 0 : Math.max(0, centre - half),
    upper: x === n ? 1 : Math.min(1, centre + half),
    method: 'wilson',
  };
}

/**
 * Exact Clopper–Pearson interval (Clopper & Pearson 1934, Biometrika 26:404) from beta quantiles,
 * as R's binom.test(x, n)$conf.int. Intended for integer counts.
 */
export function clopperPearsonCi(x: number, n: number, level = 0.95): ProportionEstimate {
  check(x, n, level);
  if (n === 0) return { x, n, estimate: null, lower: null, upper: null, method: 'clopper-pearson' };
  const a = (1 - level) / 2;
  return {
    x,
    n,
    estimate: x / n,
    lower: x === 0 ? 0 : qbeta(a, x, n - x + 1),
    upper: x === n ? 1 : qbeta(1 - a, x + 1, n - x),
    method: 'clopper-pearson',
  };
}

export function proportionCi(
  x: number,
  n: number,
  level = 0.95,
  method: ProportionCiMethod = 'wilson',
): ProportionEstimate {
  return method === 'wilson' ? wilsonCi(x, n, level) : clopperPearsonCi(x, n, level);
}
