import { FulcraError } from '../core/data';
import { quantileSorted } from '../numerics/quantile';

/** Hmisc's `fractied`: an end value held by at least this share of the values (and no inner one) is a knot itself. */
const FRACTIED = 0.05;

/** R's seq(from, to, length.out = m): from + i·(to − from)/(m − 1), the last point exactly `to`. */
function rSeq(from: number, to: number, m: number): number[] {
  const by = (to - from) / (m - 1);
  return Array.from({ length: m }, (_, i) => (i === m - 1 ? to : from + i * by));
}

function median(sorted: Float64Array): number {
  const n = sorted.length,
    h = n >> 1;
  return n % 2 === 1 ? sorted[h] : (sorted[h - 1] + sorted[h]) / 2;
}

const distinctCount = (v: Iterable<number>) => new Set(v).size;

/**
 * Default knots of a k-knot restricted cubic spline of sorted finite values, placed as Hmisc::rcspline.eval
 * (Hmisc 4.8, fractied = 0.05) places them (Harrell, Regression Modeling Strategies 2nd ed., sec. 2.4.6):
 * - at most k + 2 distinct values: the distinct values other than the smallest and the largest;
 * - else type-7 quantiles at seq(.10, .90) for k = 3 and seq(.05, .95) for k = 4, 5 (Harrell's Table 2.3);
 *   when the smallest (largest) value holds ≥ 5 % of the values and no inner value does, the next distinct
 *   value is a knot and the other knots are placed among the values strictly inside the two;
 *   if the quantiles tie, 2k quantiles are tried instead (Hmisc's alternative);
 *   with fewer than 100 values (among those inside) the outer knots move to the 5th smallest and 5th largest.
 * Returns the distinct knots in increasing order: possibly fewer than k, and fewer than 3 (where Hmisc stops)
 * when no spline can be placed, always so with fewer than 6 values.
 */
export function harrellKnots(sorted: ArrayLike<number>, k: 3 | 4 | 5): number[] {
  const x = sorted instanceof Float64Array ? sorted : Float64Array.from(sorted);
  const n = x.length;
  if (n < 6) return [];
  // runs of tied values: run j starts at starts[j] (typed, as 10⁶ values may be distinct)
  const starts = new Int32Array(n + 1);
  let m = 0;
  for (let i = 0; i < n; i++) if (i === 0 || x[i] !== x[i - 1]) starts[m++] = i;
  starts[m] = n;
  const values = (j: number) => x[starts[j]],
    counts = (j: number) => starts[j + 1] - starts[j];
  if (m - 2 <= k) return Array.from({ length: Math.max(0, m - 2) }, (_, j) => values(j + 1));
  const outer = k > 3 ? 0.05 : 0.1;
  let first: number | null = null,
    last: number | null = null,
    lo = 0,
    hi = n,
    nke: number = k;
  let inner = 0;
  for (let j = 1; j < m - 1; j++) inner = Math.max(inner, counts(j));
  if (inner / n < FRACTIED) {
    if (counts(0) / n >= FRACTIED) {
      first = values(1);
      lo = counts(0) + counts(1);
      nke--;
    }
    if (counts(m - 1) / n >= FRACTIED) {
      last = values(m - 2);
      hi = n - counts(m - 1) - counts(m - 2);
      nke--;
    }
  }
  const xx = x.subarray(lo, hi);
  let knots: number[];
  if (nke === 1) knots = [median(xx)];
  else {
    knots = (nke === 2 ? rSeq(0.5, 1 - outer, 2) : rSeq(outer, 1 - outer, nke)).map((q) => quantileSorted(xx, q));
    if (distinctCount(knots) < Math.min(nke, 3)) {
      knots = rSeq(outer, 1 - outer, 2 * nke).map((q) => quantileSorted(xx, q));
      if (first !== null && distinctCount(knots) < 3) {
        const mid = last !== null ? (first + last) / 2 : median(xx);
        knots = [first, mid, last ?? quantileSorted(xx, 1 - outer)].sort((a, b) => a - b);
      }
      if (distinctCount(knots) < 3) return [];
    }
    if (xx.length < 100) {
      // as Hmisc: the first and the nke-th knot (not necessarily the last one) move; out of range gives none
      if (first === null) knots[0] = xx[4] ?? NaN;
      if (last === null) knots[nke - 1] = xx[xx.length - 5] ?? NaN;
    }
  }
  const all = [...(first === null ? [] : [first]), ...knots, ...(last === null ? [] : [last])];
  return [...new Set(all.filter((v) => Number.isFinite(v)))].sort((a, b) => a - b);
}

/**
 * Knots of a restricted cubic spline of the non-missing values of `values` at Harrell's default placement
 * (harrellKnots). Fewer than k knots may result (ties; few distinct values), as in Hmisc. Throws a FulcraError
 * naming `column` when fewer than 6 values or fewer than 3 distinct knots result.
 */
export function rcsKnots(values: ArrayLike<number>, k: 3 | 4 | 5, column: string): number[] {
  const finite = Float64Array.from(Array.from(values).filter((v) => Number.isFinite(v))).sort();
  if (finite.length < 6)
    throw new FulcraError(
      'spline-no-data',
      `Column "${column}" has ${finite.length} value${finite.length === 1 ? '' : 's'}; ` +
        'a spline needs at least 6 to place its knots.',
      'Enter the column as a plain numeric term.',
    );
  const knots = harrellKnots(finite, k);
  if (knots.length < 3) {
    throw new FulcraError(
      'spline-knots-tied',
      `Column "${column}" has too few distinct values for a spline (${distinctCount(finite)} ` +
        'distinct values give fewer than 3 distinct knots).',
      'Enter the column as a plain numeric term.',
    );
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
