import { FulcraError, sheetRow, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { designFromRecipe } from '../design/design';
import { caseDeviance, sigmoid } from '../numerics/loss';

/** Rows per pass block: the block's design (block × p) is built, used and dropped, so memory stays O(block·p). */
export const DIAGNOSTICS_BLOCK = 32_768;
/** The full n×p DFBETAS matrix is kept up to this many cells; above it only each row's largest |DFBETAS| is. */
export const DFBETAS_MAX_CELLS = 2_000_000;

/**
 * Per-row regression diagnostics of a logistic fit, one entry per row used by the fit, in data order. Arrays that
 * do not apply to the fit's method are null (see measureApplicability).
 */
export interface RowDiagnostics {
  /** 0-based dataset index of each row used. */
  dataRows: Int32Array;
  /** Spreadsheet row number of each row used (sheetRow). */
  sheetRows: Int32Array;
  y: Float64Array;
  risk: Float64Array;
  /** Raw Pearson residual (y − μ)/√(μ(1 − μ)) and deviance residual sign(y − μ)·√dᵢ. */
  pearson: Float64Array;
  deviance: Float64Array;
  /** Hat value hᵢ = wᵢ·xᵢ'(X'WX)⁻¹xᵢ, wᵢ = μᵢ(1 − μᵢ). */
  leverage: Float64Array | null;
  /** rᴾᵢ/√(1 − hᵢ) and rᴰᵢ/√(1 − hᵢ) (R rstandard.glm, dispersion 1). */
  stdPearson: Float64Array | null;
  stdDeviance: Float64Array | null;
  /** (rᴾᵢ/(1 − hᵢ))²·hᵢ/p, p = rank (R cooks.distance.glm). */
  cooks: Float64Array | null;
  /** Row-major n×p DFBETAS (R dfbetas on a glm), kept when n·p ≤ DFBETAS_MAX_CELLS; aliased columns NaN. */
  dfbetas: Float64Array | null;
  /** Each row's largest |DFBETAS| over the non-intercept coefficients, and that coefficient's index. */
  maxAbsDfbetas: Float64Array | null;
  maxDfbetasColumn: Int32Array | null;
  /**
   * One-step change of every coefficient if the row were left out, Pregibon (1981): Δβᵢ = (X'WX)⁻¹xᵢ·(yᵢ − μᵢ)/(1 − hᵢ)
   * (β̂ − β̂₍₋ᵢ₎), reduced to each row's largest |Δβⱼ|/SEⱼ over the non-intercept coefficients and that index.
   */
  maxShiftInSe: Float64Array | null;
  maxShiftColumn: Int32Array | null;
  /** Rank of the design (p of Cook's distance). */
  rank: number;
}

/** The leading p×p covariance (X'WX)⁻¹ of the fit, or null when the fit has none (penalised, separated). */
function unscaledCovariance(f: FitResult): Float64Array | null {
  if (!f.covariance || f.method === 'ridge' || f.method === 'lasso' || f.method === 'elastic-net') return null;
  return Float64Array.from(f.covariance);
}

/** `data` restricted to rows [start, end) as views (no copy); row numbers are not needed inside a block. */
function sliceRows(data: Dataset, start: number, end: number): Dataset {
  return {
    nRows: end - start,
    columns: data.columns.map((c) =>
      c.kind === 'numeric'
        ? { kind: 'numeric', name: c.name, values: c.values.subarray(start, end) }
        : { kind: 'categorical', name: c.name, levels: c.levels, codes: c.codes.subarray(start, end) },
    ),
  };
}

/**
 * Leverage, standardised Pearson and deviance residuals, Cook's distance and DFBETAS of every row the fit used, as
 * R 4.2.2 computes them for a binomial glm (stats::hatvalues, rstandard, cooks.distance, dfbetas; dispersion 1):
 *
 *   wᵢ = μᵢ(1 − μᵢ), hᵢ = wᵢ·xᵢ'(X'WX)⁻¹xᵢ, rᴾᵢ = (yᵢ − μᵢ)/√wᵢ, rᴰᵢ = sign(yᵢ − μᵢ)·√dᵢ (dᵢ the row's deviance),
 *   standardised: rᴾᵢ/√(1 − hᵢ), rᴰᵢ/√(1 − hᵢ);  Cook's Dᵢ = (rᴾᵢ/(1 − hᵢ))²·hᵢ/p (p = rank);
 *   DFBETAS (stats:::dfbetas.lm over lm.influence of the IRLS fit, whose "residuals" are the deviance residuals):
 *   dfbetaᵢⱼ = [(X'WX)⁻¹xᵢ]ⱼ·√wᵢ·rᴰᵢ/(1 − hᵢ), σ₍ᵢ₎ = √((Σₖ rᴰₖ² − rᴰᵢ²/(1 − hᵢ))/(n − p − 1)),
 *   DFBETASᵢⱼ = dfbetaᵢⱼ/(σ₍ᵢ₎·√[(X'WX)⁻¹]ⱼⱼ)  (0 where hᵢ = 1, as R).
 *
 * Cost: one pass over the rows in blocks of DIAGNOSTICS_BLOCK (the block's design rebuilt from the recipe), and per
 * block one product X_b·(X'WX)⁻¹ with the inverse the fit already holds (its covariance): O(n·p²), no refits.
 * Penalised fits (ridge, lasso, elastic net) and fits without a covariance (separation) get the raw residuals only.
 */
export function rowDiagnostics(f: FitResult, data: Dataset): RowDiagnostics {
  const beta = f.coefficients.map((c) => c.estimate);
  const p = beta.length;
  const C = unscaledCovariance(f);
  // With frequency weights a row stands for identical cases: every measure is one case's (leverage, residuals and
  // the change from leaving out one case), one value per weighted row.
  const nUsed = f.rowsFitted ?? f.nUsed;
  const rank = f.coefficients.filter((c) => !c.aliased).length;
  const dataRows = new Int32Array(nUsed);
  const y = new Float64Array(nUsed);
  const risk = new Float64Array(nUsed);
  const pearson = new Float64Array(nUsed);
  const deviance = new Float64Array(nUsed);
  const leverage = C ? new Float64Array(nUsed) : null;
  const keepDfbetas = C !== null && nUsed * p <= DFBETAS_MAX_CELLS;
  // σ₍ᵢ₎ of DFBETAS needs Σₖ rᴰₖ² over all rows before the pass: that is the fit's deviance.
  const dfbetas = keepDfbetas ? new Float64Array(nUsed * p) : null;
  const maxAbsDfbetas = C ? new Float64Array(nUsed) : null;
  const maxDfbetasColumn = C ? new Int32Array(nUsed) : null;
  const maxShiftInSe = C ? new Float64Array(nUsed) : null;
  const maxShiftColumn = C ? new Int32Array(nUsed) : null;
  const sdBeta = C ? Float64Array.from({ length: p }, (_, j) => Math.sqrt(C[j * p + j])) : null;
  const sumDev2 = f.deviance;
  const dfResid = f.nUsed - rank - 1;

  // Per sub-block of SUB rows: V = X_sub·(X'WX)⁻¹ and the per-row scalars, reused for every block.
  const SUB = 512;
  const V = new Float64Array(SUB * p);
  const [q, wSub, scaleSub, shiftSub, bestD, bestS] = Array.from({ length: 6 }, () => new Float64Array(SUB));
  const [bestDJ, bestSJ] = [new Int32Array(SUB), new Int32Array(SUB)];
  let k = 0;
  for (let start = 0; start < data.nRows; start += DIAGNOSTICS_BLOCK) {
    const end = Math.min(data.nRows, start + DIAGNOSTICS_BLOCK);
    const enc = designFromRecipe(f.recipe, sliceRows(data, start, end));
    const { X, n: m } = enc;
    const yb = enc.y!;
    const eta = new Float64Array(m);
    for (let j = 0; j < p; j++) {
      const bj = beta[j];
      if (bj === 0) continue;
      const o = j * m;
      for (let i = 0; i < m; i++) eta[i] += bj * X[o + i];
    }
    for (let r0 = 0; r0 < m; r0 += SUB) {
      const b = Math.min(m, r0 + SUB) - r0;
      const k0 = k;
      k += b;
      for (let t = 0; t < b; t++) {
        const i = r0 + t;
        const mu = sigmoid(eta[i]);
        const yi = yb[i];
        const w = mu * (1 - mu);
        dataRows[k0 + t] = start + enc.rowsUsed[i];
        y[k0 + t] = yi;
        risk[k0 + t] = mu;
        wSub[t] = w;
        pearson[k0 + t] = (yi - mu) / Math.sqrt(w);
        deviance[k0 + t] = Math.sign(yi - mu) * Math.sqrt(caseDeviance(eta[i], yi));
      }
      if (!C || !leverage) continue;
      // V = X_sub·C (column-major SUB×p, the sub-block stays in cache): row t is ((X'WX)⁻¹xᵢ)'.
      // Four design columns per sweep of an output column: one load and store of V per four multiply-adds.
      V.fill(0);
      for (let c = 0; c < p; c++) {
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
          for (let t = 0; t < b; t++) V[oc + t] += X[o0 + t] * c0 + X[o1 + t] * c1 + X[o2 + t] * c2 + X[o3 + t] * c3;
        }
        for (; j < p; j++) {
          const cjc = C[j * p + c],
            o = j * m + r0;
          if (cjc === 0) continue;
          for (let t = 0; t < b; t++) V[oc + t] += X[o + t] * cjc;
        }
      }
      q.fill(0);
      for (let c = 0; c < p; c++) {
        const o = c * m + r0,
          oc = c * SUB;
        for (let t = 0; t < b; t++) q[t] += V[oc + t] * X[o + t];
      }
      for (let t = 0; t < b; t++) {
        const w = wSub[t];
        let h = w * q[t];
        if (h > 1 - 10 * Number.EPSILON) h = 1; // as R's lm.influence
        leverage[k0 + t] = h;
        const rd = deviance[k0 + t];
        const sigma = Math.sqrt(Math.max(0, sumDev2 - (rd * rd) / (1 - h)) / dfResid);
        scaleSub[t] = h === 1 ? 0 : (Math.sqrt(w) * rd) / (1 - h) / sigma;
        shiftSub[t] = h === 1 ? 0 : (y[k0 + t] - risk[k0 + t]) / (1 - h);
        bestD[t] = -1;
        bestDJ[t] = -1;
        bestS[t] = -1;
        bestSJ[t] = -1;
      }
      for (let j = 0; j < p; j++) {
        const sd = sdBeta![j];
        const oc = j * SUB;
        if (dfbetas)
          for (let t = 0; t < b; t++) dfbetas[(k0 + t) * p + j] = sd > 0 ? (V[oc + t] * scaleSub[t]) / sd : NaN;
        if (j === 0 || !(sd > 0)) continue;
        for (let t = 0; t < b; t++) {
          const d = Math.abs(V[oc + t] * scaleSub[t]) / sd;
          if (d > bestD[t]) {
            bestD[t] = d;
            bestDJ[t] = j;
          }
          const sh = Math.abs(V[oc + t] * shiftSub[t]) / sd;
          if (sh > bestS[t]) {
            bestS[t] = sh;
            bestSJ[t] = j;
          }
        }
      }
      for (let t = 0; t < b; t++) {
        maxAbsDfbetas![k0 + t] = bestD[t] < 0 ? NaN : bestD[t];
        maxDfbetasColumn![k0 + t] = bestDJ[t];
        maxShiftInSe![k0 + t] = bestS[t] < 0 ? NaN : bestS[t];
        maxShiftColumn![k0 + t] = bestSJ[t];
      }
    }
  }
  if (k !== nUsed) throw new FulcraError('internal', `Diagnostics found ${k} rows where the fit used ${nUsed}.`);
  const sheetRows = Int32Array.from(dataRows, (r) => sheetRow(data, r));
  let stdPearson: Float64Array | null = null,
    stdDeviance: Float64Array | null = null,
    cooks: Float64Array | null = null;
  if (leverage) {
    stdPearson = new Float64Array(nUsed);
    stdDeviance = new Float64Array(nUsed);
    cooks = new Float64Array(nUsed);
    for (let i = 0; i < nUsed; i++) {
      const h = leverage[i];
      stdPearson[i] = pearson[i] / Math.sqrt(1 - h);
      stdDeviance[i] = deviance[i] / Math.sqrt(1 - h);
      const a = pearson[i] / (1 - h);
      const d = (a * a * h) / rank;
      cooks[i] = Number.isFinite(d) ? d : NaN; // h = 1: R gives NaN
    }
  }
  return {
    dataRows,
    sheetRows,
    y,
    risk,
    pearson,
    deviance,
    leverage,
    stdPearson,
    stdDeviance,
    cooks,
    dfbetas,
    maxAbsDfbetas,
    maxDfbetasColumn,
    maxShiftInSe,
    maxShiftColumn,
    rank,
  };
}

/**
 * The one-step change Δβᵢ = (X'WX)⁻¹xᵢ·(yᵢ − μᵢ)/(1 − hᵢ) of every coefficient if data row `dataRow` were left out
 * (Pregibon 1981), and its DFBETAS row; one solve with the fit's covariance. null for fits without one.
 */
export function rowInfluence(
  f: FitResult,
  data: Dataset,
  dataRow: number,
): { delta: number[]; dfbetas: number[]; leverage: number } | null {
  const C = unscaledCovariance(f);
  if (!C) return null;
  const enc = designFromRecipe(f.recipe, sliceRows(data, dataRow, dataRow + 1));
  if (enc.n !== 1 || !enc.y) return null;
  const p = f.coefficients.length;
  const x = Float64Array.from({ length: p }, (_, j) => enc.X[j]);
  let eta = 0;
  for (let j = 0; j < p; j++) eta += f.coefficients[j].estimate * x[j];
  const mu = sigmoid(eta);
  const w = mu * (1 - mu);
  const yi = enc.y[0];
  const v = new Float64Array(p);
  for (let j = 0; j < p; j++) for (let c = 0; c < p; c++) v[c] += x[j] * C[j * p + c];
  let q = 0;
  for (let c = 0; c < p; c++) q += v[c] * x[c];
  const h = Math.min(1, w * q);
  const rank = f.coefficients.filter((c) => !c.aliased).length;
  const rd = Math.sign(yi - mu) * Math.sqrt(caseDeviance(eta, yi));
  const sigma = Math.sqrt(Math.max(0, f.deviance - (rd * rd) / (1 - h)) / (f.nUsed - rank - 1));
  const shift = h >= 1 ? 0 : (yi - mu) / (1 - h);
  const scale = h >= 1 ? 0 : (Math.sqrt(w) * rd) / (1 - h) / sigma;
  return {
    delta: Array.from(v, (vj) => vj * shift),
    dfbetas: Array.from(v, (vj, j) => (C[j * p + j] > 0 ? (vj * scale) / Math.sqrt(C[j * p + j]) : NaN)),
    leverage: h,
  };
}
