/**
 * Centring and scaling of the non-intercept design columns (population SD, divisor n, as glmnet), used for
 * conditioning, aliasing tolerance and the ridge penalty scale. A constant column becomes 0 (scale = max |x|).
 * Computed on x/max|x|, so columns in units of 1e300 or 1e-300 standardise like any other.
 * β_original_j = β_std_j / s_j (j ≥ 1); intercept_original = β_std_0 − Σ_j β_std_j·m_j / s_j.
 */
export interface Standardised {
  Z: Float64Array;
  center: Float64Array;
  scale: Float64Array;
  /** center/scale computed without overflow (use it for the intercept: β₀ = β_std,0 − Σ β_std,j·center_j/scale_j). */
  centerOverScale: Float64Array;
}

/** Moments of one column x = X[o … o+n) in units of M = max |x| (mean = sd = 0 unless M > 0). */
export interface ColumnMoments {
  M: number;
  /** Mean and population SD of x/M: (weighted) mean, variance with divisor Σw (n unweighted). */
  mean: number;
  sd: number;
  /** False when sd ≤ 1e-12·|mean| (or M = 0): the column does not vary. */
  varying: boolean;
  /** x[o + i]/M, computed without overflow or underflow. */
  scaled: (i: number) => number;
}

/**
 * Mean and population SD of a column, computed on x/M (M = max |x|) so that sums and squares neither overflow nor
 * underflow at any scale (columns in units of 1e300 or 1e-300). `w`: case weights summing to 1 (default 1/n each).
 */
export function columnMoments(X: Float64Array, o: number, n: number, w?: Float64Array): ColumnMoments {
  let M = 0;
  for (let i = 0; i < n; i++) M = Math.max(M, Math.abs(X[o + i]));
  const invM = 1 / M;
  const safeM = Number.isFinite(invM) && invM !== 0;
  const scaled = (i: number) => (safeM ? X[o + i] * invM : X[o + i] / M);
  if (!(M > 0)) return { M, mean: 0, sd: 0, varying: false, scaled };
  let m = 0;
  if (w) for (let i = 0; i < n; i++) m += w[i] * scaled(i);
  else {
    for (let i = 0; i < n; i++) m += scaled(i);
    m /= n;
  }
  let v = 0;
  if (w) for (let i = 0; i < n; i++) v += w[i] * (scaled(i) - m) ** 2;
  else {
    for (let i = 0; i < n; i++) v += (scaled(i) - m) ** 2;
    v /= n;
  }
  const sd = Math.sqrt(v);
  return { M, mean: m, sd, varying: sd > 1e-12 * Math.abs(m), scaled };
}

/**
 * Centres and scales column j of the column-major X into Z (which may be X), writing its centre, scale and
 * centre/scale: the work of one column of standardise, on whichever thread runs it.
 */
export function standardiseColumn(
  X: Float64Array,
  Z: Float64Array,
  n: number,
  j: number,
  center: Float64Array,
  scale: Float64Array,
  centerOverScale: Float64Array,
): void {
  const o = j * n;
  const { M, mean: m, sd: s, varying, scaled: u } = columnMoments(X, o, n);
  if (M === 0) {
    for (let i = 0; i < n; i++) Z[o + i] = 0;
    return;
  }
  center[j] = m * M;
  scale[j] = varying ? s * M : M;
  centerOverScale[j] = varying ? m / s : m;
  const d = varying ? s : 1;
  for (let i = 0; i < n; i++) Z[o + i] = (u(i) - m) / d;
}

/** Centres and scales columns 1…p−1 of the column-major X into a new array, or into X itself when `inPlace`. */
export function standardise(X: Float64Array, n: number, p: number, inPlace = false): Standardised {
  const Z = inPlace ? X : new Float64Array(n * p);
  const center = new Float64Array(p),
    scale = new Float64Array(p).fill(1),
    centerOverScale = new Float64Array(p);
  if (!inPlace) Z.set(X.subarray(0, n));
  for (let j = 1; j < p; j++) standardiseColumn(X, Z, n, j, center, scale, centerOverScale);
  return { Z, center, scale, centerOverScale };
}

/**
 * The linear map A (row-major p×p) with β_original = A·β_std, for transforming estimates and covariances
 * (V_original = A·V·A').
 */
export function destandardiseMap(std: Standardised): Float64Array {
  const p = std.scale.length;
  const A = new Float64Array(p * p);
  A[0] = 1;
  for (let j = 1; j < p; j++) {
    A[j * p + j] = 1 / std.scale[j];
    A[j] = -std.centerOverScale[j];
  }
  return A;
}
