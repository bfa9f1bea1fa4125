import { FulcraError, type Dataset } from '../core/data';
import { designFromRecipe } from '../design/design';
import { cholesky, choleskyLogDet } from '../numerics/linalg';
import { caseLoss, crossProductWeighted, sigmoid } from '../numerics/loss';
import type { FitResult } from '../core/model';
import { newtonLogistic } from './newton';
import { standardise } from '../numerics/standardise';

export interface LossSurfaceOptions {
  /** Indices into result.coefficients of the two coefficients on the axes. */
  i: number;
  j: number;
  /** Grid points per axis (default 41). */
  grid: number;
  /** Half-width of the window in standard errors (default 3). */
  span: number;
  /**
   * Axes per unit of each design column ('original', the default) or per standard deviation of it ('standardised':
   * β·s with s the column's population SD; the intercept then is the log-odds at the columns' means).
   */
  scale: 'original' | 'standardised';
  /**
   * 'path' (default): ±span SE around the estimate, widened (and padded by 5 %) to hold the optimiser's whole path;
   * 'estimate': exactly ±span SE around the estimate, so the path may leave it. Without SEs (penalised fits) one
   * "SE" is max(½·|β̂|, ½ per SD of the column; ½ for the intercept).
   */
  window: 'path' | 'estimate';
}

export interface LossSurface {
  nameX: string;
  nameY: string;
  x: number[];
  y: number[];
  /** Row-major G×G: z[a·G + b] = objective at (x[b], y[a]), other coefficients at their estimates. */
  z: number[];
  /** The estimate on the axes' scale. */
  estimate: [number, number];
  scale: 'original' | 'standardised';
  window: 'path' | 'estimate';
  /** Half-width span·SE of each axis around the estimate (before any widening for the path), on the axes' scale. */
  halfWidth: [number, number];
  /** Both half-widths come from standard errors (false: the fallback of a fit without SEs). */
  seBased: boolean;
  /** Objective at the estimate. */
  minimum: number;
  /** Newton iterates (start first) projected on the two coefficients, on the axes' scale. */
  path: { x: number[]; y: number[] };
  /**
   * What z is: mean cross-entropy, plus the ridge penalty (λ/2)·Σβ_std² for ridge fits, or Firth's −½·log det(X'WX)/n
   * (X the standardised design, so up to a constant) for Firth fits when n·p²·G² ≤ 3e8 (else plain cross-entropy).
   */
  objective: 'cross-entropy' | 'cross-entropy+ridge' | 'cross-entropy+firth';
  /**
   * Rows over which z is averaged: every row, or (subsampled) a fixed evenly spaced subsample of
   * max(20 000, ⌊5e8/G²⌋) rows when n·G² is above 5e8; z then is the value and gradient at the estimate from every
   * row plus the subsample's departure from that linear term, so z at the estimate is `minimum` (every row) and
   * the grid's minimum stays at the estimate. The estimate and the path always come from every row.
   */
  rowsUsed: number;
  subsampled: boolean;
}

/** Row × grid-point evaluations above which the grid is computed on an evenly spaced row subsample. */
export const SURFACE_WORK_LIMIT = 5e8;

/**
 * Objective surface for the loss plot: mean cross-entropy (plus the ridge or Firth penalty) over a grid of two
 * coefficients around the estimate, the others held at their estimates, with the Newton path from the zero start
 * re-run on the same data and projected on the pair. Coefficients on the original scale, or per SD of each column.
 */
export function lossSurface(
  result: FitResult,
  data: Dataset,
  options: Partial<LossSurfaceOptions> & { i: number; j: number },
): LossSurface {
  const { i, j, grid = 41, span = 3, scale: axisScale = 'original', window = 'path' } = options;
  const coefs = result.coefficients;
  for (const k of [i, j]) {
    if (!Number.isInteger(k) || k < 0 || k >= coefs.length)
      throw new FulcraError('bad-argument', `Coefficient index ${k} is out of range 0–${coefs.length - 1}.`);
    if (coefs[k].aliased)
      throw new FulcraError('bad-argument', `"${coefs[k].name}" is aliased and has no estimate to vary.`);
  }
  if (i === j) throw new FulcraError('bad-argument', 'Choose two different coefficients.');
  if (!Number.isInteger(grid) || grid < 3 || grid > 201)
    throw new FulcraError('bad-argument', `grid must be an integer from 3 to 201, got ${grid}.`);
  if (!(span > 0)) throw new FulcraError('bad-argument', `span must be > 0, got ${span}.`);
  if (axisScale !== 'original' && axisScale !== 'standardised')
    throw new FulcraError('bad-argument', `scale must be "original" or "standardised", got ${String(axisScale)}.`);
  if (window !== 'path' && window !== 'estimate')
    throw new FulcraError('bad-argument', `window must be "path" or "estimate", got ${String(window)}.`);

  const d = designFromRecipe(result.recipe, data);
  const { X, n, p } = d;
  const y = d.y!;
  // Frequency weights (grouped tables, weighted rows): every sum below is over cases, w per row.
  const caseWeights = d.weights ?? new Float64Array(n).fill(1);
  const beta = coefs.map((c) => c.estimate);
  const { Z, scale, center, centerOverScale } = standardise(X, n, p);
  const std = axisScale === 'standardised';
  // The estimate on the axes' scale: β·s per SD; the intercept at the columns' means, β₀ + Σ β·centre.
  const interceptStd = beta.reduce((t, b, m) => (m === 0 || b === 0 ? t : t + b * center[m]), beta[0]);
  const centreOf = (k: number): number => (!std ? beta[k] : k === 0 ? interceptStd : beta[k] * scale[k]);
  const ci = centreOf(i),
    cj = centreOf(j);
  const keep = coefs.flatMap((c, k) => (c.aliased ? [] : [k]));
  const Zk = new Float64Array(n * keep.length);
  keep.forEach((c, k) => Zk.set(Z.subarray(c * n, (c + 1) * n), k * n));
  const ridge = result.method === 'ridge';
  const nr = newtonLogistic(
    {
      X: Zk,
      n,
      p: keep.length,
      y,
      ...(d.weights ? { weights: d.weights } : {}),
      firth: result.method === 'firth',
      penalty: ridge ? Float64Array.from(keep, (c) => (c === 0 ? 0 : result.lambda)) : undefined,
    },
    { recordPath: true, maxIter: Math.max(result.iterations, 1) },
  );
  const toOriginal = (bk: Float64Array): [number, number] => {
    const full = new Float64Array(p);
    keep.forEach((c, k) => (full[c] = bk[k]));
    if (std) return [full[i], full[j]]; // Newton ran on the standardised design: its iterates are per SD already
    const orig = (c: number) =>
      c === 0
        ? full[0] - full.reduce((s, b, m) => (m === 0 || b === 0 ? s : s + b * centerOverScale[m]), 0)
        : full[c] / scale[c];
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
  const info = new Float64Array(pk * pk),
    work = new Float64Array(1024);
  // Only η̂, xᵢ, xⱼ and y are needed per row: on every row, or on an evenly spaced subsample for big grids
  // (never for Firth, whose budget above is far smaller).
  const m =
    n * grid * grid > SURFACE_WORK_LIMIT
      ? Math.min(n, Math.max(20_000, Math.floor(SURFACE_WORK_LIMIT / (grid * grid))))
      : n;
  // η moves by Δ·(column) along an axis: the design column per unit, the standardised column per SD.
  const axisColumns = std ? Z : X;
  let ev = etaBase,
    Xi = axisColumns.subarray(i * n, (i + 1) * n),
    Xj = axisColumns.subarray(j * n, (j + 1) * n),
    yv = y,
    wv = caseWeights;
  // Subsample z = value and slope at the estimate from every row + the subsample's change beyond the linear term:
  // shift[0] + shift[1]·(bᵢ − β̂ᵢ) + shift[2]·(bⱼ − β̂ⱼ) is added, so the grid's minimum stays at the estimate.
  const shift = [0, 0, 0];
  if (m < n) {
    const moments = (e: Float64Array, a: Float64Array, b: Float64Array, yy: Float64Array, ww: Float64Array) => {
      const k = e.length,
        v = [0, 0, 0];
      let sw = 0;
      for (let r = 0; r < k; r++) {
        const res = ww[r] * (sigmoid(e[r]) - yy[r]);
        v[0] += ww[r] * caseLoss(e[r], yy[r]);
        v[1] += res * a[r];
        v[2] += res * b[r];
        sw += ww[r];
      }
      return v.map((t) => t / sw);
    };
    const full = moments(ev, Xi, Xj, yv, wv);
    const idx = Int32Array.from({ length: m }, (_, k) => Math.floor((k * n) / m));
    const pick = (v: Float64Array) => Float64Array.from(idx, (r) => v[r]);
    [ev, Xi, Xj, yv, wv] = [pick(ev), pick(Xi), pick(Xj), pick(yv), pick(wv)];
    const part = moments(ev, Xi, Xj, yv, wv);
    for (let t = 0; t < 3; t++) shift[t] = full[t] - part[t];
  }
  const shifted = (bi: number, bj: number): number => shift[0] + shift[1] * (bi - ci) + shift[2] * (bj - cj);
  /** Σ case losses over the m rows, coefficients i, j at (bi, bj), the others at their estimates; fills w for Firth. */
  const lossSum = (bi: number, bj: number): number => {
    const di = bi - ci,
      dj = bj - cj;
    let s = 0;
    for (let r = 0; r < m; r++) {
      const e = ev[r] + di * Xi[r] + dj * Xj[r];
      s += wv[r] * caseLoss(e, yv[r]);
      if (w) w[r] = wv[r] * sigmoid(e) * sigmoid(-e);
    }
    return s;
  };
  let casesInSum = 0;
  for (let r = 0; r < m; r++) casesInSum += wv[r];
  const casesAll = caseWeights.reduce((a, b) => a + b, 0);
  const perSd = (k: number, b: number): number => (k === 0 ? 0 : std ? b : b * scale[k]);
  const penalty = (bi: number, bj: number): number =>
    ridge ? 0.5 * result.lambda * (penBase + perSd(i, bi) ** 2 + perSd(j, bj) ** 2) : 0;
  const objective = (bi: number, bj: number): number => {
    const s = lossSum(bi, bj);
    let pen = penalty(bi, bj);
    if (w) pen -= (0.5 * choleskyLogDet(cholesky(crossProductWeighted(Zk, n, pk, w, info, work), pk))) / casesAll;
    return s / casesInSum + pen + shifted(bi, bj);
  };
  let binary = true;
  for (let r = 0; r < m && binary; r++) binary = yv[r] === 0 || yv[r] === 1;
  const V = result.covariance;
  /** The SE on the axes' scale (the standardised intercept's from the covariance), or null. */
  const seOf = (k: number): number | null => {
    const se = coefs[k].se;
    if (se === null || !std) return se;
    if (k > 0) return se * scale[k];
    if (!V || V.length !== p * p) return null;
    const a = Float64Array.from({ length: p }, (_, m) => (m === 0 ? 1 : center[m]));
    let v = 0;
    for (let r = 0; r < p; r++) for (let c = 0; c < p; c++) if (a[r] && a[c]) v += a[r] * V[r * p + c] * a[c];
    return Number.isFinite(v) && v >= 0 ? Math.sqrt(v) : null;
  };
  const fallbackSe = (k: number, centre: number) =>
    Math.max(0.5 * Math.abs(centre), k === 0 || std ? 0.5 : 0.5 / scale[k]);
  const halfWidth = [i, j].map((k, c) => span * (seOf(k) ?? fallbackSe(k, c === 0 ? ci : cj))) as [number, number];
  const axis = (c: 0 | 1): number[] => {
    const centre = c === 0 ? ci : cj;
    let lo = centre - halfWidth[c],
      hi = centre + halfWidth[c];
    if (window === 'path') {
      for (const pt of pts) {
        lo = Math.min(lo, pt[c]);
        hi = Math.max(hi, pt[c]);
      }
      const pad = 0.05 * (hi - lo);
      lo -= pad;
      hi += pad;
    }
    return Array.from({ length: grid }, (_, g) => lo + ((hi - lo) * g) / (grid - 1));
  };
  const x = axis(0),
    yy = axis(1);
  const z: number[] = [];
  if (firth || !binary || d.weights) {
    for (const bj of yy) for (const bi of x) z.push(objective(bi, bj));
  } else {
    const sums = gridLossSums(
      ev,
      Xi,
      Xj,
      yv,
      x.map((v) => v - ci),
      yy.map((v) => v - cj),
    );
    for (let a = 0; a < grid; a++) {
      for (let b = 0; b < grid; b++) {
        let v = sums[a * grid + b];
        if (!Number.isFinite(v)) v = lossSum(x[b], yy[a]); // a row's loss beyond ~130: the direct sum
        z.push(v / m + penalty(x[b], yy[a]) + shifted(x[b], yy[a]));
      }
    }
  }
  return {
    nameX: coefs[i].name,
    nameY: coefs[j].name,
    x,
    y: yy,
    z,
    estimate: [ci, cj],
    scale: axisScale,
    window,
    halfWidth,
    seBased: seOf(i) !== null && seOf(j) !== null,
    minimum: objective(ci, cj),
    path: { x: pts.map((q) => q[0]), y: pts.map((q) => q[1]) },
    objective: ridge ? 'cross-entropy+ridge' : firth ? 'cross-entropy+firth' : 'cross-entropy',
    rowsUsed: m,
    subsampled: m < n,
  };
}

/**
 * out[o + k] = exp(e0 + d[k]·u) for an evenly spaced d, by powers of one ratio (rounding ~ d.length·ε relative),
 * starting from the larger end so that an underflow can only affect values that are really below 1e-308
 * (directly when an end could overflow).
 */
function geometric(out: Float64Array, o: number, e0: number, d: number[], u: number): void {
  const G = d.length,
    h = G > 1 ? (d[G - 1] - d[0]) / (G - 1) : 0;
  if (!(Math.abs(e0) + Math.max(Math.abs(d[0]), Math.abs(d[G - 1])) * Math.abs(u) < 700)) {
    for (let k = 0; k < G; k++) out[o + k] = Math.exp(e0 + d[k] * u); // an end overflows: one exp each
  } else if (h * u >= 0) {
    const ratio = Math.exp(-h * u);
    let v = Math.exp(e0 + d[G - 1] * u);
    for (let k = G - 1; k >= 0; k--) {
      out[o + k] = v;
      v *= ratio;
    }
  } else {
    const ratio = Math.exp(h * u);
    let v = Math.exp(e0 + d[0] * u);
    for (let k = 0; k < G; k++) {
      out[o + k] = v;
      v *= ratio;
    }
  }
}

/**
 * Σᵣ softplus(sᵣηᵣ(a, b)) (sᵣ = 1 − 2yᵣ, the binary case loss) for every grid point at once, with
 * ηᵣ(a, b) = η̂ᵣ + da[a]·xᵢᵣ + db[b]·xⱼᵣ: as exp(sᵣηᵣ) = Fᵣ·Pᵣ[a]·Qᵣ[b], the G² losses of a row cost one
 * multiply-add and one multiply each, and the logarithm is taken of running products (only when a product
 * passes 1e200, and at the end). da and db must be evenly spaced. Row-major G×G over (db index, da index); a point
 * where a factor overflowed is NaN or ±Infinity (the caller sums that point directly).
 */
export function gridLossSums(
  eta: Float64Array,
  xi: Float64Array,
  xj: Float64Array,
  y: Float64Array,
  da: number[],
  db: number[],
): Float64Array {
  const n = eta.length,
    Ga = da.length,
    Gb = db.length;
  const prod = new Float64Array(Ga * Gb).fill(1),
    logs = new Float64Array(Ga * Gb);
  // four rows at a time: P[t·Ga + a] = Fᵣ·Pᵣ[a], Q[t·Gb + b] = Qᵣ[b] for the rows r0 + t
  const P = new Float64Array(4 * Ga),
    Q = new Float64Array(4 * Gb);
  for (let r0 = 0; r0 < n; r0 += 4) {
    const m = Math.min(4, n - r0);
    for (let t = 0; t < 4; t++) {
      if (t >= m) {
        P.fill(0, t * Ga, (t + 1) * Ga);
        Q.fill(0, t * Gb, (t + 1) * Gb);
        continue;
      }
      const r = r0 + t,
        s = y[r] === 1 ? -1 : 1;
      geometric(P, t * Ga, s * eta[r], da, s * xi[r]);
      geometric(Q, t * Gb, 0, db, s * xj[r]);
    }
    for (let b = 0; b < Gb; b++) {
      const q0 = Q[b],
        q1 = Q[Gb + b],
        q2 = Q[2 * Gb + b],
        q3 = Q[3 * Gb + b],
        o = b * Ga;
      for (let a = 0; a < Ga; a++) {
        const v =
          prod[o + a] *
          ((1 + P[a] * q0) * (1 + P[Ga + a] * q1)) *
          ((1 + P[2 * Ga + a] * q2) * (1 + P[3 * Ga + a] * q3));
        if (v > 1e200) {
          logs[o + a] += Math.log(v);
          prod[o + a] = 1;
        } else prod[o + a] = v;
      }
    }
  }
  for (let k = 0; k < Ga * Gb; k++) logs[k] += Math.log(prod[k]);
  return logs;
}
