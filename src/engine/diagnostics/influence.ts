import { FulcraError, sheetRow, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { designFromRecipe } from '../design/design';
import { caseDeviance, sigmoid } from '../numerics/loss';
import { allocDesign, allocF64, allocI32, createRowPasses } from '../numerics/rowPool';

/** Rows per pass block: the block's design (block × p) is built, used and dropped, so memory stays O(block·p). */
export const DIAGNOSTICS_BLOCK = 65_536;
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

  // Each block's measures (influenceKernel.ts) go through block-sized arrays the row pool can read, so that a
  // block's O(rows·p²) products are shared by its threads; each row's numbers do not depend on the split.
  const B = Math.min(DIAGNOSTICS_BLOCK, Math.max(1, data.nRows));
  const out = {
    beta: allocF64(p),
    C: C ? allocF64(p * p) : null,
    sd: sdBeta ? allocF64(p) : null,
    risk: allocF64(B),
    pearson: allocF64(B),
    deviance: allocF64(B),
    leverage: allocF64(B),
    maxD: allocF64(B),
    maxS: allocF64(B),
    maxDJ: allocI32(B),
    maxSJ: allocI32(B),
    dfbetas: keepDfbetas ? allocF64(B * p) : null,
  };
  out.beta.set(beta);
  if (C && out.C) out.C.set(C);
  if (sdBeta && out.sd) out.sd.set(sdBeta);
  const scratch = allocDesign(B, p); // one block's design, reused block after block (SIMD kernels where they run)
  let k = 0;
  for (let start = 0; start < data.nRows; start += DIAGNOSTICS_BLOCK) {
    const end = Math.min(data.nRows, start + DIAGNOSTICS_BLOCK);
    const enc = designFromRecipe(f.recipe, sliceRows(data, start, end), { scratch });
    const m = enc.n;
    if (m === 0) continue;
    const k0 = k;
    k += m;
    for (let i = 0; i < m; i++) dataRows[k0 + i] = start + enc.rowsUsed[i];
    y.set(enc.y!, k0);
    createRowPasses(enc.X, m, p, undefined, undefined, undefined).influence({ ...out, y: enc.y!, sumDev2, dfResid });
    risk.set(out.risk.subarray(0, m), k0);
    pearson.set(out.pearson.subarray(0, m), k0);
    deviance.set(out.deviance.subarray(0, m), k0);
    if (!leverage) continue;
    leverage.set(out.leverage.subarray(0, m), k0);
    maxAbsDfbetas!.set(out.maxD.subarray(0, m), k0);
    maxDfbetasColumn!.set(out.maxDJ.subarray(0, m), k0);
    maxShiftInSe!.set(out.maxS.subarray(0, m), k0);
    maxShiftColumn!.set(out.maxSJ.subarray(0, m), k0);
    if (dfbetas && out.dfbetas) dfbetas.set(out.dfbetas.subarray(0, m * p), k0 * p);
  }
  if (k !== nUsed) throw new FulcraError('internal', `Diagnostics found ${k} rows where the fit used ${nUsed}.`);
  // sheetRow's rule in a plain loop (a callback per row took 0.1 s at 10⁶ rows)
  const sheetRows = new Int32Array(nUsed);
  if (data.rowNumbers) for (let i = 0; i < nUsed; i++) sheetRows[i] = sheetRow(data, dataRows[i]);
  else for (let i = 0, first = sheetRow(data, 0); i < nUsed; i++) sheetRows[i] = first + dataRows[i];
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
