/**
 * Cache-blocked kernels over a column-major n×p design (Float64Array, column j at j·n). Same results as the
 * straightforward column loops in loss.ts up to summation order: rows are taken in blocks of ROW_BLOCK so the
 * block's slice of every column stays in cache, and columns are combined 2×4 (X'WX) or 4 at a time
 * (Xβ, X'r) to reuse every load from memory. Memory traffic per call: one pass over X.
 */

/** Rows per cache block (ROW_BLOCK·p·8 bytes ≈ 100 kB at p = 50). */
export const ROW_BLOCK = 256;

/**
 * Symmetric X'WX (row-major p×p, both triangles) with W = diag(w), accumulating only the upper triangle in
 * 2×4 register tiles per row block. `work` (length ≥ ROW_BLOCK·p) avoids an allocation per call; rows
 * [rowStart, rowEnd) only (a partial sum for one worker of a pool), default all.
 */
export function accumulateXtWX(
  X: Float64Array,
  n: number,
  p: number,
  w: Float64Array,
  out: Float64Array,
  work: Float64Array = new Float64Array(ROW_BLOCK * p),
  rowStart = 0,
  rowEnd = n,
): Float64Array {
  const R = ROW_BLOCK;
  const acc = new Float64Array(p * p);
  for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
    const m = Math.min(R, rowEnd - r0);
    for (let j = 0; j < p; j++) {
      const o = j * n + r0,
        ob = j * R;
      for (let i = 0; i < m; i++) work[ob + i] = w[r0 + i] * X[o + i];
    }
    // Every sum keeps the block's even rows and its odd rows apart and adds (even + odd) at the block's end: the
    // order of the WebAssembly SIMD kernel (wasmSimd.ts xtwx, one sum per f64x2 lane), so both give the same bits.
    const e = m & ~1;
    let j = 0;
    for (; j + 1 < p; j += 2) {
      const a0 = j * R,
        a1 = a0 + R;
      let k = j & ~3;
      for (; k + 3 < p; k += 4) {
        const x0 = k * n + r0,
          x1 = x0 + n,
          x2 = x1 + n,
          x3 = x2 + n;
        let s00 = 0,
          s01 = 0,
          s02 = 0,
          s03 = 0,
          s10 = 0,
          s11 = 0,
          s12 = 0,
          s13 = 0,
          t00 = 0,
          t01 = 0,
          t02 = 0,
          t03 = 0,
          t10 = 0,
          t11 = 0,
          t12 = 0,
          t13 = 0;
        for (let i = 0; i < e; i += 2) {
          const u = work[a0 + i],
            v = work[a1 + i],
            uo = work[a0 + i + 1],
            vo = work[a1 + i + 1];
          const b0 = X[x0 + i],
            b1 = X[x1 + i],
            b2 = X[x2 + i],
            b3 = X[x3 + i];
          s00 += u * b0;
          s01 += u * b1;
          s02 += u * b2;
          s03 += u * b3;
          s10 += v * b0;
          s11 += v * b1;
          s12 += v * b2;
          s13 += v * b3;
          const c0 = X[x0 + i + 1],
            c1 = X[x1 + i + 1],
            c2 = X[x2 + i + 1],
            c3 = X[x3 + i + 1];
          t00 += uo * c0;
          t01 += uo * c1;
          t02 += uo * c2;
          t03 += uo * c3;
          t10 += vo * c0;
          t11 += vo * c1;
          t12 += vo * c2;
          t13 += vo * c3;
        }
        if (e < m) {
          const u = work[a0 + e],
            v = work[a1 + e];
          s00 += u * X[x0 + e];
          s01 += u * X[x1 + e];
          s02 += u * X[x2 + e];
          s03 += u * X[x3 + e];
          s10 += v * X[x0 + e];
          s11 += v * X[x1 + e];
          s12 += v * X[x2 + e];
          s13 += v * X[x3 + e];
          t00 += 0;
          t01 += 0;
          t02 += 0;
          t03 += 0;
          t10 += 0;
          t11 += 0;
          t12 += 0;
          t13 += 0;
        }
        const c0 = j * p + k,
          c1 = c0 + p;
        acc[c0] += s00 + t00;
        acc[c0 + 1] += s01 + t01;
        acc[c0 + 2] += s02 + t02;
        acc[c0 + 3] += s03 + t03;
        acc[c1] += s10 + t10;
        acc[c1 + 1] += s11 + t11;
        acc[c1 + 2] += s12 + t12;
        acc[c1 + 3] += s13 + t13;
      }
      for (; k < p; k++) {
        const x0 = k * n + r0;
        let s0 = 0,
          s1 = 0,
          t0 = 0,
          t1 = 0;
        for (let i = 0; i < e; i += 2) {
          const b = X[x0 + i],
            c = X[x0 + i + 1];
          s0 += work[a0 + i] * b;
          s1 += work[a1 + i] * b;
          t0 += work[a0 + i + 1] * c;
          t1 += work[a1 + i + 1] * c;
        }
        if (e < m) {
          const b = X[x0 + e];
          s0 += work[a0 + e] * b;
          s1 += work[a1 + e] * b;
          t0 += 0;
          t1 += 0;
        }
        acc[j * p + k] += s0 + t0;
        acc[(j + 1) * p + k] += s1 + t1;
      }
    }
    if (j < p) {
      const a0 = j * R,
        x0 = j * n + r0;
      let s = 0,
        t = 0;
      for (let i = 0; i < e; i += 2) {
        s += work[a0 + i] * X[x0 + i];
        t += work[a0 + i + 1] * X[x0 + i + 1];
      }
      if (e < m) {
        s += work[a0 + e] * X[x0 + e];
        t += 0;
      }
      acc[j * p + j] += s + t;
    }
  }
  for (let j = 0; j < p; j++) {
    for (let k = j; k < p; k++) {
      const v = acc[j * p + k];
      out[j * p + k] = v;
      out[k * p + j] = v;
    }
  }
  return out;
}

/** eta[r0..r1) += X[r0..r1, ·]β, four columns per pass over the block. */
function addEtaBlock(
  X: Float64Array,
  n: number,
  p: number,
  beta: ArrayLike<number>,
  r0: number,
  r1: number,
  eta: Float64Array,
  eOff = 0,
): void {
  let j = 0;
  for (; j + 3 < p; j += 4) {
    const b0 = beta[j],
      b1 = beta[j + 1],
      b2 = beta[j + 2],
      b3 = beta[j + 3];
    const o0 = j * n,
      o1 = o0 + n,
      o2 = o1 + n,
      o3 = o2 + n;
    for (let i = r0; i < r1; i++) eta[i - eOff] += b0 * X[o0 + i] + b1 * X[o1 + i] + b2 * X[o2 + i] + b3 * X[o3 + i];
  }
  for (; j < p; j++) {
    const b = beta[j],
      o = j * n;
    for (let i = r0; i < r1; i++) eta[i - eOff] += b * X[o + i];
  }
}

/** g += X[r0..r1, ·]'r[r0..r1), four columns per pass over the block of r (row i at r[i − rOff]). */
export function addXtrBlock(
  X: Float64Array,
  n: number,
  p: number,
  r: Float64Array,
  r0: number,
  r1: number,
  g: Float64Array,
  rOff = 0,
): void {
  let j = 0;
  for (; j + 3 < p; j += 4) {
    const [o0, o1, o2, o3] = [j * n, (j + 1) * n, (j + 2) * n, (j + 3) * n];
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    for (let i = r0; i < r1; i++) {
      const v = r[i - rOff];
      s0 += X[o0 + i] * v;
      s1 += X[o1 + i] * v;
      s2 += X[o2 + i] * v;
      s3 += X[o3 + i] * v;
    }
    g[j] += s0;
    g[j + 1] += s1;
    g[j + 2] += s2;
    g[j + 3] += s3;
  }
  for (; j < p; j++) {
    const o = j * n;
    let s = 0;
    for (let i = r0; i < r1; i++) s += X[o + i] * r[i - rOff];
    g[j] += s;
  }
}

/**
 * g += X[r0..r1, ·]'r[r0..r1) as two interleaved sums per column: the block's even rows (r0, r0 + 2, …) and its odd
 * rows, each in row order, added (even + odd) onto g[j] at the block's end. This is exactly the order of the
 * WebAssembly SIMD kernel (wasmSimd.ts xtr: one sum per f64x2 lane, the odd last row in lane 0 with 0 in lane 1),
 * so the logistic passes give the same bits with or without it (wasmPasses.ts). Row i of r at r[i − rOff].
 */
export function addXtrBlockLanes(
  X: Float64Array,
  n: number,
  p: number,
  r: Float64Array,
  r0: number,
  r1: number,
  g: Float64Array,
  rOff = 0,
): void {
  const e = r0 + ((r1 - r0) & ~1);
  let j = 0;
  for (; j + 3 < p; j += 4) {
    const o0 = j * n,
      o1 = o0 + n,
      o2 = o1 + n,
      o3 = o2 + n;
    let s0 = 0,
      s1 = 0,
      s2 = 0,
      s3 = 0,
      t0 = 0,
      t1 = 0,
      t2 = 0,
      t3 = 0;
    for (let i = r0; i < e; i += 2) {
      const u = r[i - rOff],
        v = r[i + 1 - rOff];
      s0 += X[o0 + i] * u;
      t0 += X[o0 + i + 1] * v;
      s1 += X[o1 + i] * u;
      t1 += X[o1 + i + 1] * v;
      s2 += X[o2 + i] * u;
      t2 += X[o2 + i + 1] * v;
      s3 += X[o3 + i] * u;
      t3 += X[o3 + i + 1] * v;
    }
    if (e < r1) {
      const u = r[e - rOff];
      s0 += X[o0 + e] * u;
      s1 += X[o1 + e] * u;
      s2 += X[o2 + e] * u;
      s3 += X[o3 + e] * u;
      t0 += 0;
      t1 += 0;
      t2 += 0;
      t3 += 0;
    }
    g[j] += s0 + t0;
    g[j + 1] += s1 + t1;
    g[j + 2] += s2 + t2;
    g[j + 3] += s3 + t3;
  }
  for (; j < p; j++) {
    const o = j * n;
    let s = 0,
      t = 0;
    for (let i = r0; i < e; i += 2) {
      s += X[o + i] * r[i - rOff];
      t += X[o + i + 1] * r[i + 1 - rOff];
    }
    if (e < r1) {
      s += X[o + e] * r[e - rOff];
      t += 0;
    }
    g[j] += s + t;
  }
}

/** g = X'r (length p) into `out`, row-blocked, four columns per pass over the block of r. */
export function blockedXtr(X: Float64Array, n: number, p: number, r: Float64Array, out: Float64Array): Float64Array {
  const R = 2048;
  out.fill(0, 0, p);
  for (let r0 = 0; r0 < n; r0 += R) {
    const r1 = Math.min(n, r0 + R);
    addXtrBlock(X, n, p, r, r0, r1, out);
  }
  return out;
}

/**
 * e^x for x ≤ 0 by operations that WebAssembly's f64x2 instructions repeat exactly (wasmSimd.ts rowMathsFunc), so
 * the TypeScript and SIMD passes give the same bits: k = ⌊x·log₂e + ½⌋, r = (x − k·ln2_hi) − k·ln2_lo (Cody–Waite;
 * fdlibm e_exp.c's split of ln 2, whose high part has 21 low zero bits, so k·ln2_hi is exact), e^r by its Taylor
 * polynomial to r¹³ by Estrin's scheme (|r| ≤ ½ln 2: the first term left out is below 5·10⁻¹⁸ relative; products of
 * independent pairs of terms keep the SIMD kernel's pipeline full, where Horner's chain of 13 dependent steps made
 * it 1.4× slower), times 2^k exactly. 0 below −708 (where e^x would be ≈ 3·10⁻³⁰⁸: 1 + e^x is 1 there either way).
 * Within 2 ulp of Math.exp (tests/engine/kernels.test.ts); used for the unweighted rows of the logistic passes only.
 */
export function expNonPositive(x: number): number {
  if (x < EXP_MIN) return 0;
  if (x !== x) return x;
  const k = Math.floor(x * LOG2E + 0.5),
    r = x - k * LN2_HI - k * LN2_LO;
  const r2 = r * r,
    r4 = r2 * r2,
    r8 = r4 * r4;
  // the terms after 1 summed first, so that 1 + … is the one rounding at the scale of 1
  const q =
    1 +
    (r +
      (T2 + T3 * r) * r2 +
      (T4 + T5 * r + (T6 + T7 * r) * r2) * r4 +
      (T8 + T9 * r + (T10 + T11 * r) * r2 + (T12 + T13 * r) * r4) * r8);
  return q * POW2_NEG[-k];
}
/** fdlibm e_exp.c: ln2HI[0], ln2LO[0], invln2. */
export const LN2_HI = 6.9314718036912381649e-1,
  LN2_LO = 1.90821492927058770002e-10,
  LOG2E = 1.442695040888963387;
/** Below this, expNonPositive is 0. */
export const EXP_MIN = -708;
/** 1/i! for i = 0 … 13, each rounded once from the exact rational (the coefficients of expNonPositive). */
export const EXP_TAYLOR: readonly number[] = Array.from({ length: 14 }, (_, i) => {
  let f = 1;
  for (let j = 2; j <= i; j++) f *= j; // exact: 13! < 2⁵³
  return 1 / f;
});
const [, , T2, T3, T4, T5, T6, T7, T8, T9, T10, T11, T12, T13] = EXP_TAYLOR;
/** 2^−i for i = 0 … 1021 (k ≥ −1021 above EXP_MIN), exact: halving a normal double is exact. */
const POW2_NEG = new Float64Array(1022);
POW2_NEG[0] = 1;
for (let i = 1; i < POW2_NEG.length; i++) POW2_NEG[i] = POW2_NEG[i - 1] / 2;

/**
 * The row maths of one block of a logistic pass, for rows i < m: η at eta[eo + i], outcome y[yo + i], case weight
 * c[yo + i] (1 without c). From one a = e^−|η| per row: the residual c∘(y − μ) (1 − μ taken directly for y = 1) into
 * r[ro + i], the weight c∘μ(1 − μ) into w[wo + i] when w is given. Returns `loss` plus the block's case losses, the
 * log1p(e^−|η|) of rows of weight 1 as one log of their product, added last (see logisticRows). The one copy of this
 * arithmetic: the TypeScript passes here and the SIMD ones (wasmPasses.ts) call it, so both give the same bits.
 * Without case weights (unitRows): e^−|η| by expNonPositive, and the losses and products kept apart for even and
 * odd rows, in the order of the SIMD kernel's two lanes.
 */
export function blockRowMaths(
  eta: Float64Array,
  eo: number,
  y: Float64Array,
  yo: number,
  c: Float64Array | undefined,
  m: number,
  r: Float64Array,
  ro: number,
  w: Float64Array | null,
  wo: number,
  loss: number,
): number {
  if (!c) {
    unitLanes[0] = unitLanes[1] = 0;
    unitLanes[2] = unitLanes[3] = 1;
    unitRows(eta, eo, y, yo, 0, m, r, ro, w, wo, unitLanes, 0);
    return closeLanes(unitLanes, 0, loss);
  }
  let prod = 1;
  for (let i = 0; i < m; i++) {
    const t = eta[eo + i],
      a = Math.exp(-Math.abs(t)),
      yi = y[yo + i],
      ci = c[yo + i];
    const e = 1 + a,
      d = 1 / e;
    const mu = t >= 0 ? d : a * d,
      mc = t >= 0 ? a * d : d;
    if (w) w[wo + i] = ci * mu * mc;
    r[ro + i] = ci * (yi === 1 ? mc : yi - mu);
    if (ci === 1) {
      prod *= e;
      loss += t > 0 ? (1 - yi) * t : -yi * t;
    } else if (ci !== 0) loss += ci * (Math.log1p(a) + (t > 0 ? (1 - yi) * t : -yi * t));
  }
  return loss + Math.log(prod);
}

const unitLanes = new Float64Array(4);

/**
 * The unweighted rows [from, to) of a block (offsets as blockRowMaths): residuals, weights when w is given, and the
 * linear loss terms and the products of 1 + e^−|η| added into lanes (at L[lo]: loss of even rows, of odd rows,
 * product of even rows, of odd rows; a row's lane is the parity of its index in the block). The SIMD kernel does
 * the whole pairs of rows and this the odd last one.
 */
export function unitRows(
  eta: Float64Array,
  eo: number,
  y: Float64Array,
  yo: number,
  from: number,
  to: number,
  r: Float64Array,
  ro: number,
  w: Float64Array | null,
  wo: number,
  L: Float64Array,
  lo: number,
): void {
  let l0 = L[lo],
    l1 = L[lo + 1],
    p0 = L[lo + 2],
    p1 = L[lo + 3];
  for (let i = from; i < to; i++) {
    const t = eta[eo + i],
      a = expNonPositive(-Math.abs(t)),
      yi = y[yo + i];
    const e = 1 + a,
      d = 1 / e;
    const mu = t >= 0 ? d : a * d,
      mc = t >= 0 ? a * d : d;
    if (w) w[wo + i] = mu * mc;
    r[ro + i] = yi === 1 ? mc : yi - mu;
    const lin = t > 0 ? (1 - yi) * t : -yi * t;
    if (i & 1) {
      l1 += lin;
      p1 *= e;
    } else {
      l0 += lin;
      p0 *= e;
    }
  }
  L[lo] = l0;
  L[lo + 1] = l1;
  L[lo + 2] = p0;
  L[lo + 3] = p1;
}

/** `loss` plus a block's lanes (unitRows): the linear terms, then the log of the products. */
export const closeLanes = (L: Float64Array, lo: number, loss: number): number =>
  loss + (L[lo] + L[lo + 1]) + Math.log(L[lo + 2] * L[lo + 3]);

/** Residuals of one 512-row block when the caller keeps none (each thread has its own copy of this module). */
const rowScratch = new Float64Array(512);

/**
 * Fused full pass of a logistic model with optional case weights c and offset, in row blocks (each block of X
 * read twice while it is in cache): η = offset + Xβ, and from one a = e^−|η| per row μ, the case loss
 * softplus(η) − yη (in the cancellation-free form of loss.ts), r = c∘(y − μ) (1 − μ taken directly for y = 1),
 * w = c∘μ(1 − μ), and g = X'r (cleared first). Returns −loglik = Σ cᵢ·lossᵢ (rows with cᵢ = 0 add nothing).
 * The loss's log1p(e^−|η|) terms of rows with cᵢ = 1 are summed per 512-row block as the log of the product of the
 * 1 + e^−|η| the row already forms for μ (each factor in (1, 2], so the product stays below 2⁵¹²): one log per block
 * instead of one log1p per row, which made a pass 1.3–2× faster (11 ns less per row; 10⁶ rows, 2026-12-05). Its
 * error, under 512 roundings of the product (≤ 6·10⁻¹⁴ absolute per block), is far below the ≈ 6·10⁻¹¹ that adding
 * one term to a loss of 10⁵ rounds away; other weights keep log1p per row.
 * Rows [rowStart, rowEnd) only when given (one chunk of a pooled pass: src/engine/numerics/rowPool.ts). r is kept only
 * when an array is given for it (otherwise a block-sized scratch: one length-n buffer less to touch).
 */
export function logisticRows(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array,
  beta: ArrayLike<number>,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  eta: Float64Array,
  r: Float64Array | undefined,
  w: Float64Array,
  g: Float64Array,
  rowStart = 0,
  rowEnd = n,
): number {
  const R = 512;
  let loss = 0;
  const res = r ?? rowScratch;
  g.fill(0, 0, p);
  for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
    const r1 = Math.min(rowEnd, r0 + R),
      ro = r ? 0 : r0;
    if (offset) for (let i = r0; i < r1; i++) eta[i] = offset[i];
    else for (let i = r0; i < r1; i++) eta[i] = 0;
    addEtaBlock(X, n, p, beta, r0, r1, eta);
    loss = blockRowMaths(eta, r0, y, r0, c, r1 - r0, res, r0 - ro, w, r0, loss);
    addXtrBlockLanes(X, n, p, res, r0, r1, g, ro);
  }
  return loss;
}

/** η and residual blocks of the two vectors of logisticRowsPair (each thread has its own copy of this module). */
const pairScratch = Array.from({ length: 4 }, () => new Float64Array(512));

/**
 * logisticRows for two coefficient vectors at once, for solvers that step several points in lockstep (profile
 * limits, term tests: chordSolve.ts): each block of X is loaded once for both, which makes a pass per vector about
 * 1.6× cheaper than two single passes (every load of X feeds two multiply-adds). Per vector the arithmetic is
 * exactly that of logisticRows (same blocks, same order of every sum), so the losses and scores are bit-for-bit
 * those of two single passes. Keeps neither η nor the weights: ga and gb (cleared first) and the two losses in
 * loss[0], loss[1] only.
 */
export function logisticRowsPair(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array,
  ba: ArrayLike<number>,
  bb: ArrayLike<number>,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  ga: Float64Array,
  gb: Float64Array,
  loss: Float64Array,
  rowStart = 0,
  rowEnd = n,
): void {
  const R = 512;
  const [ea, eb, ra, rb] = pairScratch;
  let la = 0,
    lb = 0;
  ga.fill(0, 0, p);
  gb.fill(0, 0, p);
  for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
    const r1 = Math.min(rowEnd, r0 + R),
      m = r1 - r0;
    if (offset)
      for (let i = 0; i < m; i++) {
        ea[i] = offset[r0 + i];
        eb[i] = offset[r0 + i];
      }
    else {
      ea.fill(0, 0, m);
      eb.fill(0, 0, m);
    }
    addEtaBlockPair(X, n, p, ba, bb, r0, r1, ea, eb);
    la = blockRowMaths(ea, 0, y, r0, c, m, ra, 0, null, 0, la);
    lb = blockRowMaths(eb, 0, y, r0, c, m, rb, 0, null, 0, lb);
    addXtrBlockPair(X, n, p, ra, rb, r0, r1, ga, gb);
  }
  loss[0] = la;
  loss[1] = lb;
}

/**
 * logisticRowsPair for one vector (the odd one out of a lockstep round): the same arithmetic as either half of a
 * pair, so the same bits, for half the work. Loss into loss[0], score into ga (cleared first).
 */
export function logisticRowsOne(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array,
  ba: ArrayLike<number>,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  ga: Float64Array,
  loss: Float64Array,
  rowStart = 0,
  rowEnd = n,
): void {
  const R = 512;
  const [ea, , ra] = pairScratch;
  let la = 0;
  ga.fill(0, 0, p);
  for (let r0 = rowStart; r0 < rowEnd; r0 += R) {
    const r1 = Math.min(rowEnd, r0 + R),
      m = r1 - r0;
    if (offset) for (let i = 0; i < m; i++) ea[i] = offset[r0 + i];
    else ea.fill(0, 0, m);
    addEtaBlock(X, n, p, ba, r0, r1, ea, r0);
    la = blockRowMaths(ea, 0, y, r0, c, m, ra, 0, null, 0, la);
    addXtrBlockLanes(X, n, p, ra, r0, r1, ga, r0);
  }
  loss[0] = la;
}

/** ea[0..m) += X[r0..r1, ·]·ba and eb likewise (block-relative), with addEtaBlock's grouping of four columns. */
function addEtaBlockPair(
  X: Float64Array,
  n: number,
  p: number,
  ba: ArrayLike<number>,
  bb: ArrayLike<number>,
  r0: number,
  r1: number,
  ea: Float64Array,
  eb: Float64Array,
): void {
  let j = 0;
  for (; j + 3 < p; j += 4) {
    const a0 = ba[j],
      a1 = ba[j + 1],
      a2 = ba[j + 2],
      a3 = ba[j + 3],
      b0 = bb[j],
      b1 = bb[j + 1],
      b2 = bb[j + 2],
      b3 = bb[j + 3];
    const o0 = j * n + r0,
      o1 = o0 + n,
      o2 = o1 + n,
      o3 = o2 + n;
    for (let i = 0; i < r1 - r0; i++) {
      const x0 = X[o0 + i],
        x1 = X[o1 + i],
        x2 = X[o2 + i],
        x3 = X[o3 + i];
      ea[i] += a0 * x0 + a1 * x1 + a2 * x2 + a3 * x3;
      eb[i] += b0 * x0 + b1 * x1 + b2 * x2 + b3 * x3;
    }
  }
  for (; j < p; j++) {
    const a = ba[j],
      b = bb[j],
      o = j * n + r0;
    for (let i = 0; i < r1 - r0; i++) {
      const x = X[o + i];
      ea[i] += a * x;
      eb[i] += b * x;
    }
  }
}

/**
 * ga += X[r0..r1, ·]'ra and gb likewise (ra, rb block-relative): per vector exactly addXtrBlockLanes' sums (even and
 * odd rows apart, added at the block's end), with each load of X used for both vectors.
 */
function addXtrBlockPair(
  X: Float64Array,
  n: number,
  p: number,
  ra: Float64Array,
  rb: Float64Array,
  r0: number,
  r1: number,
  ga: Float64Array,
  gb: Float64Array,
): void {
  const m = r1 - r0,
    e = m & ~1;
  let j = 0;
  for (; j + 1 < p; j += 2) {
    const o0 = j * n + r0,
      o1 = o0 + n;
    let s0 = 0,
      s1 = 0,
      t0 = 0,
      t1 = 0,
      u0 = 0,
      u1 = 0,
      v0 = 0,
      v1 = 0;
    for (let i = 0; i < e; i += 2) {
      const a0 = ra[i],
        a1 = ra[i + 1],
        b0 = rb[i],
        b1 = rb[i + 1];
      const x0 = X[o0 + i],
        x1 = X[o0 + i + 1],
        z0 = X[o1 + i],
        z1 = X[o1 + i + 1];
      s0 += x0 * a0;
      t0 += x1 * a1;
      s1 += z0 * a0;
      t1 += z1 * a1;
      u0 += x0 * b0;
      v0 += x1 * b1;
      u1 += z0 * b0;
      v1 += z1 * b1;
    }
    if (e < m) {
      s0 += X[o0 + e] * ra[e];
      s1 += X[o1 + e] * ra[e];
      u0 += X[o0 + e] * rb[e];
      u1 += X[o1 + e] * rb[e];
      t0 += 0;
      t1 += 0;
      v0 += 0;
      v1 += 0;
    }
    ga[j] += s0 + t0;
    ga[j + 1] += s1 + t1;
    gb[j] += u0 + v0;
    gb[j + 1] += u1 + v1;
  }
  for (; j < p; j++) {
    const o = j * n + r0;
    let s = 0,
      t = 0,
      u = 0,
      v = 0;
    for (let i = 0; i < e; i += 2) {
      const x0 = X[o + i],
        x1 = X[o + i + 1];
      s += x0 * ra[i];
      t += x1 * ra[i + 1];
      u += x0 * rb[i];
      v += x1 * rb[i + 1];
    }
    if (e < m) {
      s += X[o + e] * ra[e];
      u += X[o + e] * rb[e];
      t += 0;
      v += 0;
    }
    ga[j] += s + t;
    gb[j] += u + v;
  }
}
