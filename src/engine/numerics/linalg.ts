/**
 * Small dense linear algebra on row-major p×p Float64Arrays (p is the number of model columns).
 */

export interface Cholesky {
  /** Lower-triangular factor L (row-major p×p) with A = L·L' on the kept columns. */
  L: Float64Array;
  p: number;
  /** 1 where the column was dropped as (numerically) a linear combination of earlier columns. */
  dropped: Uint8Array;
  rank: number;
}

/**
 * Cholesky factorisation in column order that drops a column when its pivot falls below
 * `tol` × its original diagonal (i.e. 1 − R² of that column on the earlier kept ones < tol).
 * Dropped columns get a zero row/column in L and are ignored by the solvers below.
 */
export function cholesky(
  A: Float64Array,
  p: number,
  tol = 1e-12,
  L = new Float64Array(p * p),
  dropped = new Uint8Array(p),
): Cholesky {
  L.fill(0);
  dropped.fill(0);
  let rank = 0;
  for (let j = 0; j < p; j++) {
    let d = A[j * p + j];
    for (let k = 0; k < j; k++) d -= L[j * p + k] * L[j * p + k];
    const orig = A[j * p + j];
    if (!(orig > 0) || !(d > tol * orig)) {
      dropped[j] = 1;
      continue;
    }
    const ljj = Math.sqrt(d);
    L[j * p + j] = ljj;
    rank++;
    for (let i = j + 1; i < p; i++) {
      let s = A[i * p + j];
      for (let k = 0; k < j; k++) s -= L[i * p + k] * L[j * p + k];
      L[i * p + j] = s / ljj;
    }
  }
  return { L, p, dropped, rank };
}

/** Solves A·x = b with the factor (dropped components set to 0); x may alias b. */
export function choleskySolve(ch: Cholesky, b: ArrayLike<number>, x = new Float64Array(ch.p)): Float64Array {
  const { L, p, dropped } = ch;
  for (let i = 0; i < p; i++) {
    if (dropped[i]) {
      x[i] = 0;
      continue;
    }
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * p + k] * x[k];
    x[i] = s / L[i * p + i];
  }
  for (let i = p - 1; i >= 0; i--) {
    if (dropped[i]) {
      x[i] = 0;
      continue;
    }
    let s = x[i];
    for (let k = i + 1; k < p; k++) s -= L[k * p + i] * x[k];
    x[i] = s / L[i * p + i];
  }
  return x;
}

/** Inverse of A on the kept columns (rows/columns of dropped ones are 0), row-major p×p. */
export function choleskyInverse(ch: Cholesky): Float64Array {
  const p = ch.p;
  const inv = new Float64Array(p * p);
  const e = new Float64Array(p);
  const col = new Float64Array(p);
  for (let j = 0; j < p; j++) {
    e.fill(0);
    e[j] = 1;
    choleskySolve(ch, e, col);
    for (let i = 0; i < p; i++) inv[i * p + j] = col[i];
  }
  for (let i = 0; i < p; i++) {
    for (let j = i + 1; j < p; j++) {
      const m = 0.5 * (inv[i * p + j] + inv[j * p + i]);
      inv[i * p + j] = m;
      inv[j * p + i] = m;
    }
  }
  return inv;
}

/** log det A over the kept columns: 2·Σ log L_jj. */
export function choleskyLogDet(ch: Cholesky): number {
  let s = 0;
  for (let j = 0; j < ch.p; j++) if (!ch.dropped[j]) s += Math.log(ch.L[j * ch.p + j]);
  return 2 * s;
}

/**
 * Inverse of the lower factor, L⁻¹ (row-major, lower-triangular; dropped rows 0), used to get hat values
 * hᵢ = wᵢ·‖L⁻¹xᵢ‖² column-wise.
 */
export function choleskyFactorInverse(ch: Cholesky, out = new Float64Array(ch.p * ch.p)): Float64Array {
  const { L, p, dropped } = ch;
  out.fill(0);
  for (let j = 0; j < p; j++) {
    if (dropped[j]) continue;
    for (let i = j; i < p; i++) {
      if (dropped[i]) continue;
      let s = i === j ? 1 : 0;
      for (let k = j; k < i; k++) s -= L[i * p + k] * out[k * p + j];
      out[i * p + j] = s / L[i * p + i];
    }
  }
  return out;
}
