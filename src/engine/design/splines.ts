import { FulcraError } from '../core/data';
import { quantileSorted } from '../numerics/quantile';

/** Knot quantiles recommended by Harrell, Regression Modeling Strategies 2nd ed., Table 2.3. */
export const rcsKnotQuantiles: Record<3 | 4 | 5, number[]> = {
  3: [0.1, 0.5, 0.9],
  4: [0.05, 0.35, 0.65, 0.95],
  5: [0.05, 0.275, 0.5, 0.725, 0.95],
};

/** Harrell's k knot quantiles (type 7) of sorted values; tied knots are left in for the caller to judge. */
export function harrellKnots(sorted: ArrayLike<number>, k: 3 | 4 | 5): number[] {
  return rcsKnotQuantiles[k].map((q) => quantileSorted(sorted, q));
}

/**
 * Knots of a restricted cubic spline at Harrell's quantiles of the non-missing values of `values`.
 * Throws a FulcraError naming `column` when fewer than `k` distinct knots result (too few distinct values).
 */
export function rcsKnots(values: ArrayLike<number>, k: 3 | 4 | 5, column: string): number[] {
  const finite = Array.from(values)
    .filter((v) => Number.isFinite(v))
    .sort((a, b) => a - b);
  if (finite.length === 0)
    throw new FulcraError('spline-no-data', `Column "${column}" has no values to place spline knots.`);
  const knots = harrellKnots(finite, k);
  for (let i = 1; i < knots.length; i++) {
    if (!(knots[i] > knots[i - 1])) {
      throw new FulcraError(
        'spline-knots-tied',
        `Column "${column}" has too few distinct values for a ${k}-knot spline (knots ` +
          `${knots.map((x) => +x.toPrecision(6)).join(', ')} are not distinct).`,
        'Use fewer knots or enter the column as a plain numeric term.',
      );
    }
  }
  return knots;
}

/**
 * Non-linear basis columns of a restricted cubic spline (k knots t₁…t_k → k−2 columns), in Harrell's
 * rcspline.eval parameterisation with norm = 2 (Harrell, RMS 2nd ed. eq. 2.25):
 *   X_j = [(x−t_j)₊³ − (x−t_{k−1})₊³·(t_k−t_j)/(t_k−t_{k−1}) + (x−t_k)₊³·(t_{k−1}−t_j)/(t_k−t_{k−1})] / (t_k−t₁)²
 * The linear column x itself is not included. NaN in x gives NaN.
 */
export function rcsBasis(
  x: number,
  knots: number[],
  out: Float64Array | number[] = new Float64Array(knots.length - 2),
): Float64Array | number[] {
  const k = knots.length;
  const tk = knots[k - 1],
    tk1 = knots[k - 2];
  // ((x − t)/s)³·s equals (x − t)³/s² but neither overflows nor underflows for any scale of x (s = t_k − t₁).
  const s = tk - knots[0];
  const cube = (v: number) => (v > 0 ? (v / s) ** 3 : 0);
  const a = cube(x - tk1),
    b = cube(x - tk);
  const r = tk - tk1;
  for (let j = 0; j < k - 2; j++) {
    const tj = knots[j];
    out[j] = (cube(x - tj) - (a * (tk - tj)) / r + (b * (tk1 - tj)) / r) * s;
  }
  return out;
}
