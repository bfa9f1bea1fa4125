import { FulcraError } from '../../engine/data';
import { accumulateXtWX, blockedLinearPredictor, ROW_BLOCK } from '../../engine/kernels';
import { cholesky, choleskySolve } from '../../engine/linalg';
import { serialPasses, type RowPasses } from './rowPasses';

/**
 * PROTOTYPE for the lead (not used by the page): unpenalised logistic ML for large n by Newton steps whose
 * Hessian X'WX is taken on a fixed strided subsample of m rows (scaled by n/m) while the gradient and the
 * objective use every row, then ONE exact X'WX at the converged β (the information for the standard errors)
 * and one final exact Newton step from it. Approximate-Hessian Newton converges linearly at a rate
 * ≈ ‖I − H̃⁻¹H‖ (a few per cent for m ≈ 8·p²), each step costing one pass over X for Xβ and one for X'r
 * instead of p/2 passes for X'WX (cf. subsampled Newton: Roosta-Khorasani & Mahoney 2019, Math Program
 * 174:293). Subsamples: 2·p² rows while far from the optimum, 8·p² (≥ 10 000) near it. When n ≤ 2m the
 * subsample is every row, i.e. exact Newton.
 */
export interface FastNewtonResult {
  beta: Float64Array;
  iterations: number;
  converged: boolean;
  /** Exact X'WX (row-major p×p) at the estimate before the last exact step. */
  information: Float64Array;
  logLik: number;
  fitted: Float64Array;
  /** Rows in the Hessian subsample. */
  subsample: number;
}

/** Strided row subsample (rows ⌊k·n/m⌋) of a column-major design. */
function subsampleRows(X: Float64Array, n: number, p: number, m: number): Float64Array {
  const idx = new Int32Array(m);
  for (let k = 0; k < m; k++) idx[k] = Math.floor((k * n) / m);
  const Xs = new Float64Array(m * p);
  for (let j = 0; j < p; j++) {
    const col = X.subarray(j * n, (j + 1) * n), os = j * m;
    for (let k = 0; k < m; k++) Xs[os + k] = col[idx[k]];
  }
  return Xs;
}

/** Newton on the coarse subsample alone (to 1e-4): a start within sampling error of the full-data optimum. */
function warmStart(Xs: Float64Array, m: number, p: number, ys: Float64Array, beta: Float64Array): void {
  const passes = serialPasses(Xs, m, p, ys);
  const H = new Float64Array(p * p), g = new Float64Array(p), step = new Float64Array(p);
  const start = Float64Array.from(beta);
  for (let iter = 0; iter < 25; iter++) {
    passes.lossGradient(beta, 0, g);
    passes.information(0, H);
    choleskySolve(cholesky(H, p, 1e-12), g, step);
    let maxRel = 0;
    for (let j = 0; j < p; j++) { maxRel = Math.max(maxRel, Math.abs(step[j]) / (1 + Math.abs(beta[j]))); beta[j] += step[j]; }
    if (!beta.every(Number.isFinite) || maxRel > 1e3) { beta.set(start); return; }
    if (maxRel < 1e-4) return;
  }
}

export function fastNewtonLogistic(
  X: Float64Array, n: number, p: number, y: Float64Array,
  opts: { tol?: number; maxIter?: number; subsample?: number; passes?: RowPasses; warmStart?: boolean } = {},
): FastNewtonResult {
  const tol = opts.tol ?? 1e-10, maxIter = opts.maxIter ?? 100;
  if (X.length !== n * p || y.length !== n) throw new FulcraError('bad-argument', `X has length ${X.length} and y ${y.length}; expected n·p = ${n * p} and n = ${n}.`);
  const passes = opts.passes ?? serialPasses(X, n, p, y);
  // Coarse subsample while far from the optimum, a finer one (fixed, chord steps) near it.
  const mFine = Math.min(n, opts.subsample ?? Math.max(10_000, 8 * p * p));
  const mCoarse = Math.min(mFine, Math.max(4_000, 2 * p * p));
  const exact = 2 * mFine >= n;
  const Xf = exact ? X : subsampleRows(X, n, p, mFine);
  const Xc = exact ? X : subsampleRows(Xf, mFine, p, mCoarse);
  const mc = exact ? n : mCoarse, mf = exact ? n : mFine;

  const etaS = new Float64Array(mf), ws = new Float64Array(mf);
  const H = new Float64Array(p * p), g = new Float64Array(p), gTrial = new Float64Array(p);
  const step = new Float64Array(p), trial = new Float64Array(p);
  const work = new Float64Array(ROW_BLOCK * p);
  const beta = new Float64Array(p);
  let slot: 0 | 1 = 0;

  /** X̃'W̃X̃·(n/m) on a subsample at beta (exact X'WX when the subsample is every row). */
  const hessian = (Xs: Float64Array, m: number): void => {
    if (m === n) { passes.information(slot, H); return; }
    blockedLinearPredictor(Xs, m, p, beta, undefined, etaS);
    for (let k = 0; k < m; k++) { const a = Math.exp(-Math.abs(etaS[k])); ws[k] = a / ((1 + a) * (1 + a)); }
    accumulateXtWX(Xs, m, p, ws, H, work);
    const sc = n / m;
    for (let k = 0; k < p * p; k++) H[k] *= sc;
  };

  if (!exact && opts.warmStart !== false) warmStart(Xc, mc, p, subsampleRows(y, n, 1, mc), beta);
  let obj = passes.lossGradient(beta, slot, g);
  let converged = false, iterations = 0, fine = false, haveFine = false;
  for (let iter = 0; iter < maxIter; iter++) {
    if (!fine) hessian(Xc, mc);
    else if (!haveFine || exact) { hessian(Xf, mf); haveFine = true; }
    choleskySolve(cholesky(H, p, 1e-12), g, step);
    const other: 0 | 1 = slot === 0 ? 1 : 0;
    let t = 1, accepted = false, newObj = obj;
    for (let half = 0; half < 40; half++) {
      for (let j = 0; j < p; j++) trial[j] = beta[j] + t * step[j];
      newObj = passes.lossGradient(trial, other, gTrial);
      if (newObj <= obj + 1e-13 * Math.abs(obj)) { accepted = true; break; }
      t *= 0.5;
    }
    if (!accepted) break;
    let maxRel = 0;
    for (let j = 0; j < p; j++) maxRel = Math.max(maxRel, Math.abs(t * step[j]) / (1 + Math.abs(beta[j])));
    beta.set(trial);
    g.set(gTrial);
    slot = other;
    obj = newObj;
    iterations++;
    if (maxRel < 1e-3) fine = true;
    // Exact steps: the next error is ≈ step². Chord steps contract linearly (a few per cent per step): stop at
    // 1e-2·√tol, where the information below is exact to ~√tol·1e-2 relative and its Newton step ends the job.
    if (maxRel < (exact ? Math.sqrt(tol) : Math.sqrt(tol) * 1e-2)) { converged = true; break; }
  }
  // One exact information matrix at the estimate, then one exact Newton step from it.
  const information = passes.information(slot, new Float64Array(p * p));
  choleskySolve(cholesky(information, p, 1e-12), g, step);
  for (let j = 0; j < p; j++) beta[j] += step[j];
  const other: 0 | 1 = slot === 0 ? 1 : 0;
  obj = passes.lossGradient(beta, other, g);
  const r = passes.residuals(other);
  const fitted = new Float64Array(n);
  for (let i = 0; i < n; i++) fitted[i] = y[i] - r[i];
  return { beta, iterations: iterations + 1, converged, information, logLik: -obj, fitted, subsample: mf };
}
