/**
 * Centring and scaling of the non-intercept design columns (population SD, divisor n, as glmnet), used for
 * conditioning, aliasing tolerance and the ridge penalty scale. A constant column is centred only (scale 1).
 * β_original_j = β_std_j / s_j (j ≥ 1); intercept_original = β_std_0 − Σ_j β_std_j·m_j / s_j.
 */
export interface Standardised {
  Z: Float64Array;
  center: Float64Array;
  scale: Float64Array;
}

/** Centres and scales columns 1…p−1 of the column-major X into a new array, or into X itself when `inPlace`. */
export function standardise(X: Float64Array, n: number, p: number, inPlace = false): Standardised {
  const Z = inPlace ? X : new Float64Array(n * p);
  const center = new Float64Array(p), scale = new Float64Array(p).fill(1);
  if (!inPlace) Z.set(X.subarray(0, n));
  for (let j = 1; j < p; j++) {
    const o = j * n;
    let m = 0;
    for (let i = 0; i < n; i++) m += X[o + i];
    m /= n;
    let v = 0;
    for (let i = 0; i < n; i++) v += (X[o + i] - m) ** 2;
    const s = Math.sqrt(v / n);
    center[j] = m;
    scale[j] = s > 1e-12 * Math.max(Math.abs(m), 1e-300) ? s : 1;
    const inv = 1 / scale[j];
    for (let i = 0; i < n; i++) Z[o + i] = (X[o + i] - m) * inv;
  }
  return { Z, center, scale };
}

/**
 * The linear map A (row-major p×p) with β_original = A·β_std, for transforming estimates and covariances
 * (V_original = A·V·A').
 */
export function destandardiseMap(center: Float64Array, scale: Float64Array): Float64Array {
  const p = scale.length;
  const A = new Float64Array(p * p);
  A[0] = 1;
  for (let j = 1; j < p; j++) {
    A[j * p + j] = 1 / scale[j];
    A[j] = -center[j] / scale[j];
  }
  return A;
}
