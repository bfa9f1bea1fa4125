import { FulcraError, type Dataset } from './data';
import { designFromRecipe } from './design';
import { cholesky, choleskyLogDet } from './linalg';
import { caseLoss, crossProductWeighted, sigmoid } from './loss';
import type { FitResult } from './model';
import { newtonLogistic } from './newton';
import { standardise } from './standardise';

export interface LossSurfaceOptions {
  /** Indices into result.coefficients of the two coefficients on the axes. */
  i: number;
  j: number;
  /** Grid points per axis (default 41). */
  grid: number;
  /** Half-width of the window in standard errors (default 3); the window also covers the optimiser's path. */
  span: number;
}

export interface LossSurface {
  nameX: string;
  nameY: string;
  x: number[];
  y: number[];
  /** Row-major G×G: z[a·G + b] = objective at (x[b], y[a]), other coefficients at their estimates. */
  z: number[];
  estimate: [number, number];
  /** Objective at the estimate. */
  minimum: number;
  /** Newton iterates (start first) projected on the two coefficients. */
  path: { x: number[]; y: number[] };
  /**
   * What z is: mean cross-entropy, plus the ridge penalty (λ/2)·Σβ_std² for ridge fits, or Firth's −½·log det(X'WX)/n
   * (X the standardised design, so up to a constant) for Firth fits when n·p²·G² ≤ 3e8 (else plain cross-entropy).
   */
  objective: 'cross-entropy' | 'cross-entropy+ridge' | 'cross-entropy+firth';
}

/**
 * Objective surface for the loss plot: mean cross-entropy (plus the ridge or Firth penalty) over a grid of two
 * coefficients around the estimate, the others held at their estimates, with the Newton path from the zero start
 * re-run on the same data and projected on the pair. Coefficients on the original scale.
 */
export function lossSurface(result: FitResult, data: Dataset, options: Partial<LossSurfaceOptions> & { i: number; j: number }): LossSurface {
  const { i, j, grid = 41, span = 3 } = options;
  const coefs = result.coefficients;
  for (const k of [i, j]) {
    if (!Number.isInteger(k) || k < 0 || k >= coefs.length) throw new FulcraError('bad-argument', `Coefficient index ${k} is out of range 0–${coefs.length - 1}.`);
    if (coefs[k].aliased) throw new FulcraError('bad-argument', `"${coefs[k].name}" is aliased and has no estimate to vary.`);
  }
  if (i === j) throw new FulcraError('bad-argument', 'Choose two different coefficients.');
  if (!Number.isInteger(grid) || grid < 3 || grid > 201) throw new FulcraError('bad-argument', `grid must be an integer from 3 to 201, got ${grid}.`);
  if (!(span > 0)) throw new FulcraError('bad-argument', `span must be > 0, got ${span}.`);

  const d = designFromRecipe(result.recipe, data);
  const { X, n, p } = d;
  const y = d.y!;
  const beta = coefs.map((c) => c.estimate);
  const { Z, scale, centerOverScale } = standardise(X, n, p);
  const keep = coefs.flatMap((c, k) => (c.aliased ? [] : [k]));
  const Zk = new Float64Array(n * keep.length);
  keep.forEach((c, k) => Zk.set(Z.subarray(c * n, (c + 1) * n), k * n));
  const ridge = result.method === 'ridge';
  const nr = newtonLogistic(
    { X: Zk, n, p: keep.length, y, firth: result.method === 'firth', penalty: ridge ? Float64Array.from(keep, (c) => (c === 0 ? 0 : result.lambda)) : undefined },
    { recordPath: true, maxIter: Math.max(result.iterations, 1) },
  );
  const toOriginal = (bk: Float64Array): [number, number] => {
    const full = new Float64Array(p);
    keep.forEach((c, k) => (full[c] = bk[k]));
    const orig = (c: number) => (c === 0 ? full[0] - full.reduce((s, b, m) => (m === 0 || b === 0 ? s : s + b * centerOverScale[m]), 0) : full[c] / scale[c]);
    return [orig(i), orig(j)];
  };
  const pts = [toOriginal(new Float64Array(keep.length)), ...(nr.path ?? []).map(toOriginal)];

  const etaBase = new Float64Array(n);
  for (let c = 0; c < p; c++) for (let r = 0; r < n; r++) etaBase[r] += beta[c] * X[c * n + r];
  let penBase = 0;
  if (ridge) for (let c = 1; c < p; c++) if (c !== i && c !== j) penBase += (beta[c] * scale[c]) ** 2;
  const pk = keep.length;
  // Firth's penalty −½·log det(X'WX)/n needs X'WX at every grid point: only within a work budget.
  const firth = result.method === 'firth' && n * pk * pk * grid * grid <= 3e8;
  const w = firth ? new Float64Array(n) : null;
  const info = new Float64Array(pk * pk), work = new Float64Array(1024);
  const objective = (bi: number, bj: number): number => {
    const di = bi - beta[i], dj = bj - beta[j];
    let s = 0;
    for (let r = 0; r < n; r++) {
      const e = etaBase[r] + di * X[i * n + r] + dj * X[j * n + r];
      s += caseLoss(e, y[r]);
      if (w) w[r] = sigmoid(e) * sigmoid(-e);
    }
    let pen = 0;
    if (ridge) pen = 0.5 * result.lambda * (penBase + (i > 0 ? (bi * scale[i]) ** 2 : 0) + (j > 0 ? (bj * scale[j]) ** 2 : 0));
    if (w) pen -= (0.5 * choleskyLogDet(cholesky(crossProductWeighted(Zk, n, pk, w, info, work), pk))) / n;
    return s / n + pen;
  };
  const axis = (k: number, c: 0 | 1): number[] => {
    const se = coefs[k].se ?? Math.max(0.5 * Math.abs(beta[k]), k === 0 ? 0.5 : 0.5 / scale[k]);
    let lo = beta[k] - span * se, hi = beta[k] + span * se;
    for (const pt of pts) { lo = Math.min(lo, pt[c]); hi = Math.max(hi, pt[c]); }
    const pad = 0.05 * (hi - lo);
    lo -= pad; hi += pad;
    return Array.from({ length: grid }, (_, g) => lo + ((hi - lo) * g) / (grid - 1));
  };
  const x = axis(i, 0), yy = axis(j, 1);
  const z: number[] = [];
  for (const bj of yy) for (const bi of x) z.push(objective(bi, bj));
  return {
    nameX: coefs[i].name, nameY: coefs[j].name, x, y: yy, z,
    estimate: [beta[i], beta[j]], minimum: objective(beta[i], beta[j]),
    path: { x: pts.map((q) => q[0]), y: pts.map((q) => q[1]) },
    objective: ridge ? 'cross-entropy+ridge' : firth ? 'cross-entropy+firth' : 'cross-entropy',
  };
}
