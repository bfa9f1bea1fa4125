/**
 * The per-row influence measures of a logistic fit over one block of rows (src/engine/diagnostics/influence.ts
 * rowDiagnostics has the formulas and their R references). A kernel of its own so that the row pool
 * (rowPool.ts) can split a block's rows over its threads: every row's numbers come from that row alone.
 */
import { caseDeviance, sigmoid } from './loss';
import { wasmInfluenceV, type WasmLayout } from './wasmPasses';

/** One block of rows: every per-row array block-relative (row t at index t; dfbetas row-major, row t at t·p). */
export interface InfluenceBlock {
  /** The block's design, column-major with n rows, its outcome, and the fit's coefficients. */
  X: Float64Array;
  n: number;
  p: number;
  y: Float64Array;
  beta: Float64Array;
  /** (X'WX)⁻¹ of the fit (p×p) and the square roots of its diagonal; null when the fit has none. */
  C: Float64Array | null;
  sd: Float64Array | null;
  /** Σₖ rᴰₖ² over all rows (the fit's deviance) and n − rank − 1, for σ₍ᵢ₎. */
  sumDev2: number;
  dfResid: number;
  /** Out per row: μ, the Pearson and deviance residuals. */
  risk: Float64Array;
  pearson: Float64Array;
  deviance: Float64Array;
  /** Out per row (with C): hᵢ; the largest |DFBETAS| and |Δβ|/SE over the non-intercept coefficients, and where. */
  leverage: Float64Array;
  maxD: Float64Array;
  maxDJ: Int32Array;
  maxS: Float64Array;
  maxSJ: Int32Array;
  /** Out: the whole DFBETAS rows, when kept. */
  dfbetas: Float64Array | null;
}

/** Rows per sub-block: the sub-block's slice of X and of V = X_sub·C stay in cache. */
const SUB = 512;

/**
 * Rows [rowStart, rowEnd) of an influence block, in sub-blocks of SUB rows: η = Xβ (column by column), μ and the
 * residuals; then V = X_sub·C (two output columns per sweep of four design columns), hᵢ = wᵢ·xᵢ'Cxᵢ, and each row's
 * DFBETAS and one-step shifts.
 */
export function influenceRows(b: InfluenceBlock, rowStart: number, rowEnd: number, wasm?: WasmLayout, slot = 0): void {
  const { X, n: m, p, C, sd, beta } = b;
  const Vjs = new Float64Array(SUB * p);
  const [eta, wSub, q, scaleSub, shiftSub, bestD, bestS] = Array.from({ length: 7 }, () => new Float64Array(SUB));
  const [bestDJ, bestSJ] = [new Int32Array(SUB), new Int32Array(SUB)];
  for (let r0 = rowStart; r0 < rowEnd; r0 += SUB) {
    const nb = Math.min(rowEnd, r0 + SUB) - r0;
    eta.fill(0);
    for (let j = 0; j < p; j++) {
      const bj = beta[j];
      if (bj === 0) continue;
      const o = j * m + r0;
      for (let t = 0; t < nb; t++) eta[t] += bj * X[o + t];
    }
    for (let t = 0; t < nb; t++) {
      const mu = sigmoid(eta[t]),
        yi = b.y[r0 + t],
        w = mu * (1 - mu);
      wSub[t] = w;
      b.risk[r0 + t] = mu;
      b.pearson[r0 + t] = (yi - mu) / Math.sqrt(w);
      b.deviance[r0 + t] = Math.sign(yi - mu) * Math.sqrt(caseDeviance(eta[t], yi));
    }
    if (!C || !sd) continue;
    // With X in WebAssembly memory the SIMD kernels give V, one column of C at a time: the same sums, same order.
    const V = wasm ? wasmInfluenceV(wasm, slot, C, r0, nb) : Vjs;
    if (!wasm) V.fill(0);
    let c = wasm ? p : 0;
    // two output columns per sweep of four design columns: each load of X feeds two multiply-adds
    for (; c + 1 < p; c += 2) {
      const oc = c * SUB,
        od = oc + SUB;
      let j = 0;
      for (; j + 3 < p; j += 4) {
        const c0 = C[j * p + c],
          c1 = C[(j + 1) * p + c],
          c2 = C[(j + 2) * p + c],
          c3 = C[(j + 3) * p + c],
          d0 = C[j * p + c + 1],
          d1 = C[(j + 1) * p + c + 1],
          d2 = C[(j + 2) * p + c + 1],
          d3 = C[(j + 3) * p + c + 1];
        const o0 = j * m + r0,
          o1 = o0 + m,
          o2 = o1 + m,
          o3 = o2 + m;
        for (let t = 0; t < nb; t++) {
          const x0 = X[o0 + t],
            x1 = X[o1 + t],
            x2 = X[o2 + t],
            x3 = X[o3 + t];
          V[oc + t] += x0 * c0 + x1 * c1 + x2 * c2 + x3 * c3;
          V[od + t] += x0 * d0 + x1 * d1 + x2 * d2 + x3 * d3;
        }
      }
      for (; j < p; j++) {
        const cjc = C[j * p + c],
          cjd = C[j * p + c + 1],
          o = j * m + r0;
        for (let t = 0; t < nb; t++) {
          const x = X[o + t];
          V[oc + t] += x * cjc;
          V[od + t] += x * cjd;
        }
      }
    }
    for (; c < p; c++) {
      const oc = c * SUB;
      let j = 0;
      for (; j + 3 < p; j += 4) {
        const c0 = C[j * p + c],
          c1 = C[(j + 1) * p + c],
          c2 = C[(j + 2) * p + c],
          c3 = C[(j + 3) * p + c];
        const o0 = j * m + r0,
          o1 = o0 + m,
          o2 = o1 + m,
          o3 = o2 + m;
        for (let t = 0; t < nb; t++) V[oc + t] += X[o0 + t] * c0 + X[o1 + t] * c1 + X[o2 + t] * c2 + X[o3 + t] * c3;
      }
      for (; j < p; j++) {
        const cjc = C[j * p + c],
          o = j * m + r0;
        for (let t = 0; t < nb; t++) V[oc + t] += X[o + t] * cjc;
      }
    }
    q.fill(0);
    for (let c2 = 0; c2 < p; c2++) {
      const o = c2 * m + r0,
        oc = c2 * SUB;
      for (let t = 0; t < nb; t++) q[t] += V[oc + t] * X[o + t];
    }
    for (let t = 0; t < nb; t++) {
      const w = wSub[t];
      let h = w * q[t];
      if (h > 1 - 10 * Number.EPSILON) h = 1; // as R's lm.influence
      b.leverage[r0 + t] = h;
      const rd = b.deviance[r0 + t];
      const sigma = Math.sqrt(Math.max(0, b.sumDev2 - (rd * rd) / (1 - h)) / b.dfResid);
      scaleSub[t] = h === 1 ? 0 : (Math.sqrt(w) * rd) / (1 - h) / sigma;
      shiftSub[t] = h === 1 ? 0 : (b.y[r0 + t] - b.risk[r0 + t]) / (1 - h);
      bestD[t] = -1;
      bestDJ[t] = -1;
      bestS[t] = -1;
      bestSJ[t] = -1;
    }
    const dfb = b.dfbetas;
    for (let j = 0; j < p; j++) {
      const s = sd[j];
      const oc = j * SUB;
      if (dfb) for (let t = 0; t < nb; t++) dfb[(r0 + t) * p + j] = s > 0 ? (V[oc + t] * scaleSub[t]) / s : NaN;
      if (j === 0 || !(s > 0)) continue;
      for (let t = 0; t < nb; t++) {
        const d = Math.abs(V[oc + t] * scaleSub[t]) / s;
        if (d > bestD[t]) {
          bestD[t] = d;
          bestDJ[t] = j;
        }
        const sh = Math.abs(V[oc + t] * shiftSub[t]) / s;
        if (sh > bestS[t]) {
          bestS[t] = sh;
          bestSJ[t] = j;
        }
      }
    }
    for (let t = 0; t < nb; t++) {
      b.maxD[r0 + t] = bestD[t] < 0 ? NaN : bestD[t];
      b.maxDJ[r0 + t] = bestDJ[t];
      b.maxS[r0 + t] = bestS[t] < 0 ? NaN : bestS[t];
      b.maxSJ[r0 + t] = bestSJ[t];
    }
  }
}
