import { cholesky, type Cholesky } from '../numerics/linalg';
import { crossProductWeighted } from '../numerics/loss';
import { newtonLogistic } from '../fitting/newton';
import type { Rng } from '../numerics/rng';

/**
 * Parameter draws for the imputation models of multiple imputation by chained equations
 * (van Buuren & Groothuis-Oudshoorn 2011, J Stat Softw 45(3); van Buuren 2018, Flexible Imputation of
 * Missing Data, 2nd ed., §3.2–3.6). X is a column-major n×q design (intercept first) over all rows;
 * `obs` lists the rows whose target value is observed, `mis` the rows to impute.
 */
export interface ImputationDesign {
  X: Float64Array;
  n: number;
  q: number;
}

/** Draws from a chi-square with df degrees of freedom: 2·Gamma(df/2), Marsaglia & Tsang (2000, ACM TOMS 26:363). */
export function drawChiSquare(rng: Rng, df: number): number {
  return 2 * drawGamma(rng, df / 2);
}

function drawGamma(rng: Rng, shape: number): number {
  if (shape < 1) return drawGamma(rng, shape + 1) * Math.pow(1 - rng.next(), 1 / shape);
  const d = shape - 1 / 3,
    c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number, v: number;
    do {
      x = rng.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = 1 - rng.next();
    if (Math.log(u) < 0.5 * x * x + d - d * v + d * Math.log(v)) return d * v;
  }
}

/** β + σ·(C')⁻¹z, z ~ N(0, I), for the factor C·C' = A: a draw from N(β, σ²A⁻¹). Dropped columns stay at β. */
function perturb(beta: Float64Array, ch: Cholesky, sigma: number, rng: Rng): Float64Array {
  const { L, p, dropped } = ch;
  const u = new Float64Array(p);
  for (let i = 0; i < p; i++) u[i] = dropped[i] ? 0 : rng.normal();
  for (let i = p - 1; i >= 0; i--) {
    if (dropped[i]) continue;
    let s = u[i];
    for (let k = i + 1; k < p; k++) s -= L[k * p + i] * u[k];
    u[i] = s / L[i * p + i];
  }
  const out = new Float64Array(p);
  for (let j = 0; j < p; j++) out[j] = beta[j] + sigma * u[j];
  return out;
}

export interface LinearDraw {
  /** Least-squares coefficients on the observed rows (0 for aliased columns). */
  coef: Float64Array;
  /** A draw from their posterior: β̂ + σ*·(X'X)^{-1/2}z with σ*² = RSS/χ²(n_obs − q). */
  beta: Float64Array;
  sigma: number;
  /** Number of predictor columns dropped as linear combinations of earlier ones. */
  aliased: number;
}

/**
 * Bayesian linear-regression parameter draw used by predictive mean matching (Rubin 1987, p. 167;
 * mice's .norm.draw). Aliased columns get coefficient 0, as mice's rank adjustment does.
 */
export function drawLinear(design: ImputationDesign, y: Float64Array, obs: Int32Array, rng: Rng): LinearDraw {
  const q = design.q;
  const no = obs.length;
  const Xo = gatherRows(design, obs);
  const yo = new Float64Array(no);
  for (let r = 0; r < no; r++) yo[r] = y[obs[r]];
  const xtx = crossProductWeighted(
    Xo,
    no,
    q,
    new Float64Array(no).fill(1),
    new Float64Array(q * q),
    new Float64Array(no),
  );
  const ch = cholesky(xtx, q, 1e-10);
  const xty = new Float64Array(q);
  for (let j = 0; j < q; j++) {
    let s = 0;
    for (let r = 0; r < no; r++) s += Xo[j * no + r] * yo[r];
    xty[j] = s;
  }
  const coef = solveLower(ch, xty);
  let rss = 0;
  for (let r = 0; r < no; r++) {
    let f = 0;
    for (let j = 0; j < q; j++) f += Xo[j * no + r] * coef[j];
    rss += (yo[r] - f) ** 2;
  }
  const df = Math.max(no - ch.rank, 1);
  const sigma = Math.sqrt(rss / drawChiSquare(rng, df));
  return { coef, beta: perturb(coef, ch, sigma, rng), sigma, aliased: q - ch.rank };
}

function solveLower(ch: Cholesky, b: Float64Array): Float64Array {
  const { L, p, dropped } = ch;
  const x = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    if (dropped[i]) continue;
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * p + k] * x[k];
    x[i] = s / L[i * p + i];
  }
  for (let i = p - 1; i >= 0; i--) {
    if (dropped[i]) continue;
    let s = x[i];
    for (let k = i + 1; k < p; k++) s -= L[k * p + i] * x[k];
    x[i] = s / L[i * p + i];
  }
  return x;
}

/** Column-major copy of the given rows of the design. */
export function gatherRows(design: ImputationDesign, rows: Int32Array): Float64Array {
  const { X, n, q } = design;
  const m = rows.length;
  const out = new Float64Array(m * q);
  for (let j = 0; j < q; j++) for (let r = 0; r < m; r++) out[j * m + r] = X[j * n + rows[r]];
  return out;
}

export interface LogisticDraw {
  beta: Float64Array;
  converged: boolean;
}

/**
 * Logistic-regression parameter draw β* ~ N(β̂, I(β̂)⁻¹) on the rows `obs` with outcome y01 (0/1), after
 * augmenting the data with 4·(q−1) weighted pseudo-rows at the predictor means ± ½ SD, total weight q,
 * against perfect prediction (White, Daniel & Royston 2010, Comput Stat Data Anal 54:2267; mice's augment()).
 */
export function drawLogistic(design: ImputationDesign, y01: Float64Array, obs: Int32Array, rng: Rng): LogisticDraw {
  const { X, n, q } = design;
  const no = obs.length;
  const nAug = q > 1 ? 4 * (q - 1) : 0;
  const N = no + nAug;
  const Xa = new Float64Array(N * q),
    ya = new Float64Array(N),
    wa = new Float64Array(N);
  for (let r = 0; r < no; r++) {
    ya[r] = y01[obs[r]];
    wa[r] = 1;
  }
  for (let j = 0; j < q; j++) for (let r = 0; r < no; r++) Xa[j * N + r] = X[j * n + obs[r]];
  if (nAug > 0) {
    const mean = new Float64Array(q),
      sd = new Float64Array(q),
      lo = new Float64Array(q),
      hi = new Float64Array(q);
    for (let j = 0; j < q; j++) {
      let s = 0,
        s2 = 0,
        mn = Infinity,
        mx = -Infinity;
      for (let i = 0; i < n; i++) {
        const v = X[j * n + i];
        s += v;
        s2 += v * v;
        if (v < mn) mn = v;
        if (v > mx) mx = v;
      }
      mean[j] = s / n;
      sd[j] = n > 1 ? Math.sqrt(Math.max(0, (s2 - n * mean[j] * mean[j]) / (n - 1))) : 0;
      lo[j] = mn;
      hi[j] = mx;
    }
    let r = no;
    for (let k = 1; k < q; k++) {
      for (const yv of [0, 1]) {
        for (const sign of [0.5, -0.5]) {
          for (let j = 0; j < q; j++) {
            const v = j === k ? mean[j] + sign * sd[j] : mean[j];
            Xa[j * N + r] = Math.min(hi[j], Math.max(lo[j], v));
          }
          ya[r] = yv;
          wa[r] = q / nAug;
          r++;
        }
      }
    }
  }
  const fit = newtonLogistic({ X: Xa, n: N, p: q, y: ya, weights: wa }, { tol: 1e-8, maxIter: 30 });
  const ch = cholesky(fit.information, q, 1e-10);
  const beta = Float64Array.from(fit.beta);
  for (let j = 0; j < q; j++) if (ch.dropped[j]) beta[j] = 0;
  return { beta: perturb(beta, ch, 1, rng), converged: fit.converged };
}

/** Linear predictor x_i'β for row i of the design. */
export function rowDot(design: ImputationDesign, i: number, beta: Float64Array): number {
  let s = 0;
  for (let j = 0; j < design.q; j++) s += design.X[j * design.n + i] * beta[j];
  return s;
}

export interface CategoricalImputation {
  /** Imputed level codes for the rows `mis`. */
  codes: Int32Array;
  /** Number of logistic imputation fits that did not converge. */
  notConverged: number;
}

/**
 * Imputes a categorical column with K ≥ 2 observed levels. K = 2: logistic regression with a parameter
 * draw (mice's "logreg"). K > 2: baseline-category logits fitted as K−1 separate binary logistic regressions
 * of each level against the most frequent level on the rows holding those two levels (Begg & Gray 1984,
 * Biometrika 71:11), each with its own parameter draw; level probabilities ∝ exp(x'β*_k), then one draw.
 */
export function imputeCategorical(
  design: ImputationDesign,
  codes: Int32Array,
  levels: number,
  obs: Int32Array,
  mis: Int32Array,
  rng: Rng,
): CategoricalImputation {
  const counts = new Array<number>(levels).fill(0);
  for (let r = 0; r < obs.length; r++) counts[codes[obs[r]]]++;
  const present = counts.map((c, k) => (c > 0 ? k : -1)).filter((k) => k >= 0);
  const out = new Int32Array(mis.length);
  if (present.length === 1) return { codes: out.fill(present[0]), notConverged: 0 };
  const base = present.reduce((a, k) => (counts[k] > counts[a] ? k : a), present[0]);
  const others = present.filter((k) => k !== base);
  const betas: Float64Array[] = [];
  let notConverged = 0;
  for (const k of others) {
    const rows = Int32Array.from(Array.from(obs).filter((i) => codes[i] === k || codes[i] === base));
    const y01 = new Float64Array(design.n);
    for (const i of rows) y01[i] = codes[i] === k ? 1 : 0;
    const d = drawLogistic(design, y01, rows, rng);
    if (!d.converged) notConverged++;
    betas.push(d.beta);
  }
  const eta = new Float64Array(others.length);
  for (let r = 0; r < mis.length; r++) {
    const i = mis[r];
    let mx = 0;
    for (let k = 0; k < others.length; k++) {
      eta[k] = rowDot(design, i, betas[k]);
      if (eta[k] > mx) mx = eta[k];
    }
    let total = Math.exp(-mx);
    for (let k = 0; k < others.length; k++) total += Math.exp(eta[k] - mx);
    let u = rng.next() * total - Math.exp(-mx);
    let pick = base;
    for (let k = 0; k < others.length && u >= 0; k++) {
      u -= Math.exp(eta[k] - mx);
      if (u < 0) pick = others[k];
    }
    out[r] = pick;
  }
  return { codes: out, notConverged };
}
