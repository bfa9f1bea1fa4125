import { FulcraError } from '../core/data';
import { createRng } from '../numerics/rng';

/**
 * Risk-adjusted CUSUM log-likelihood-ratio weight (Steiner, Cook, Farewell & Treasure 2000, Biostatistics 1:441,
 * eq. 2.2) of a case with risk p and outcome y, testing odds ratio R_A against 1:
 *   W = y·log(R_A) − log(1 − p + R_A·p).
 */
export function cusumWeight(y: number, p: number, oddsRatio: number): number {
  return y * Math.log(oddsRatio) - Math.log(1 - p + oddsRatio * p);
}

/** A chart run on cases in order: every value, and the 0-based cases where it signalled (restart at 0 after). */
export interface CusumRun {
  values: Float64Array;
  signals: number[];
}

/** The weights W of every case for odds ratio R_A (one logarithm per case). */
export function cusumWeights(y: Float64Array, p: Float64Array, oddsRatio: number): Float64Array {
  if (!(oddsRatio > 0) || oddsRatio === 1)
    throw new FulcraError('bad-odds-ratio', 'The CUSUM odds ratio must differ from 1.');
  const logR = Math.log(oddsRatio),
    rm1 = oddsRatio - 1;
  const w = new Float64Array(y.length);
  for (let t = 0; t < y.length; t++) w[t] = y[t] * logR - Math.log(1 + rm1 * p[t]);
  return w;
}

/**
 * Runs the chart X_t = max(0, X_{t−1} + W_t) on weights W. A deterioration chart (`sign` 1, R_A > 1) returns
 * X_t; an improvement chart (`sign` −1, R_A < 1: Steiner et al.'s lower CUSUM Z_t = min(0, Z_{t−1} − W_t)) is
 * drawn below zero and returns Z_t = −X_t. Reaching h (or −h) signals; the chart restarts at 0 with the next case.
 */
export function runCusumWeights(w: Float64Array, h: number, sign: 1 | -1): CusumRun {
  const n = w.length;
  const values = new Float64Array(n);
  const signals: number[] = [];
  let x = 0;
  for (let t = 0; t < n; t++) {
    x += w[t];
    if (x < 0) x = 0;
    values[t] = sign * x;
    if (x >= h) {
      signals.push(t);
      x = 0;
    }
  }
  return { values, signals };
}

/** runCusumWeights on the weights of (y, p) for R_A, the sign following R_A (> 1: up, < 1: drawn below zero). */
export function runCusum(y: Float64Array, p: Float64Array, oddsRatio: number, h: number): CusumRun {
  return runCusumWeights(cusumWeights(y, p, oddsRatio), h, oddsRatio > 1 ? 1 : -1);
}

/**
 * The in-control distribution of the chart's increments W, from the empirical risks: each risk p contributes
 * probability (1 − p)/n to W(0, p) and p/n to W(1, p). Risks are grouped into `bins` equal-width bins of
 * the logit (each bin's mean risk), so the chain costs the same for 10³ or 10⁶ cases; `eta` (the logits, when
 * known) saves the logarithms.
 */
export interface IncrementDistribution {
  value: Float64Array;
  prob: Float64Array;
}

export function incrementDistribution(
  p: Float64Array,
  oddsRatio: number,
  bins = 2000,
  eta?: Float64Array,
): IncrementDistribution {
  const n = p.length;
  if (n === 0) throw new FulcraError('no-cases', 'The CUSUM needs at least one scored case.');
  let lo = Infinity,
    hi = -Infinity;
  const lg = eta ? (_: number, i: number) => eta[i] : (v: number) => Math.log(v / (1 - v));
  for (let i = 0; i < n; i++) {
    const l = lg(p[i], i);
    if (l < lo) lo = l;
    if (l > hi) hi = l;
  }
  const width = (hi - lo) / bins || 1;
  const sum = new Float64Array(bins),
    count = new Float64Array(bins);
  for (let i = 0; i < n; i++) {
    const b = Math.min(bins - 1, Math.floor((lg(p[i], i) - lo) / width));
    sum[b] += p[i];
    count[b]++;
  }
  const value: number[] = [],
    prob: number[] = [];
  for (let b = 0; b < bins; b++) {
    if (count[b] === 0) continue;
    const pb = sum[b] / count[b],
      share = count[b] / n;
    value.push(cusumWeight(0, pb, oddsRatio), cusumWeight(1, pb, oddsRatio));
    prob.push(share * (1 - pb), share * pb);
  }
  return { value: Float64Array.from(value), prob: Float64Array.from(prob) };
}

/** Solves A x = b in place by Gaussian elimination with partial pivoting (A row-major m×m). */
function solveDense(A: Float64Array, b: Float64Array, m: number): Float64Array {
  for (let k = 0; k < m; k++) {
    let piv = k;
    for (let i = k + 1; i < m; i++) if (Math.abs(A[i * m + k]) > Math.abs(A[piv * m + k])) piv = i;
    if (piv !== k) {
      for (let j = 0; j < m; j++) [A[k * m + j], A[piv * m + j]] = [A[piv * m + j], A[k * m + j]];
      [b[k], b[piv]] = [b[piv], b[k]];
    }
    const d = A[k * m + k];
    for (let i = k + 1; i < m; i++) {
      const f = A[i * m + k] / d;
      if (f === 0) continue;
      for (let j = k; j < m; j++) A[i * m + j] -= f * A[k * m + j];
      b[i] -= f * b[k];
    }
  }
  for (let k = m - 1; k >= 0; k--) {
    let v = b[k];
    for (let j = k + 1; j < m; j++) v -= A[k * m + j] * b[j];
    b[k] = v / A[k * m + k];
  }
  return b;
}

/**
 * In-control average run length of a chart started at 0 with limit h, by a Markov-chain approximation
 * (Brook & Evans 1972, Biometrika 59:539, used for the risk-adjusted CUSUM by Steiner et al. 2000, §3):
 * the chart's values are carried on the grid 0, Δ, …, (M − 1)Δ with Δ = h/M; a value v = iΔ + W between two grid
 * points puts its probability on both in proportion to its distance (linear interpolation, which keeps the
 * chart's drift exact), a value ≤ 0 on state 0, and a value ≥ h — or the share of it beyond (M − 1)Δ that
 * interpolates towards h — is absorbed. ARL = first entry of (I − Q)⁻¹·1.
 */
export function markovArl(dist: IncrementDistribution, h: number, states: number): number {
  const m = states;
  const delta = h / m;
  // An increment W moves state i by k = floor(W/Δ) with probability 1 − f and by k + 1 with f = W/Δ − k.
  const shift = new Map<number, number>();
  const add = (k: number, pr: number) => shift.set(k, (shift.get(k) ?? 0) + pr);
  for (let i = 0; i < dist.value.length; i++) {
    const u = dist.value[i] / delta;
    const k = Math.floor(u),
      f = u - k;
    add(k, dist.prob[i] * (1 - f));
    if (f > 0) add(k + 1, dist.prob[i] * f);
  }
  const ks = [...shift.entries()];
  const A = new Float64Array(m * m);
  for (let i = 0; i < m; i++) {
    A[i * m + i] += 1;
    for (const [k, pr] of ks) {
      const j = i + k;
      if (j >= m) continue;
      A[i * m + Math.max(0, j)] -= pr;
    }
  }
  const arl = solveDense(A, new Float64Array(m).fill(1), m);
  return arl[0];
}

/**
 * The limit h whose Markov-chain in-control ARL equals `target` (log ARL is close to linear in h, so a safeguarded
 * secant on log ARL within a bracket converges in a few steps). Returns h and the chain's ARL at h.
 */
export function cusumLimit(dist: IncrementDistribution, target: number, states: number): { h: number; arl0: number } {
  const f = (h: number) => Math.log(markovArl(dist, h, states)) - Math.log(target);
  let a = 0.05,
    fa = f(a);
  let b = 2,
    fb = f(b);
  while (fb < 0 && b < 200) {
    a = b;
    fa = fb;
    b *= 2;
    fb = f(b);
  }
  if (fa > 0) return { h: a, arl0: markovArl(dist, a, states) };
  // Illinois regula falsi.
  let side = 0;
  for (let it = 0; it < 60 && Math.abs(b - a) > 1e-4 * b; it++) {
    const c = b - (fb * (b - a)) / (fb - fa);
    const fc = f(c);
    if (Math.abs(fc) < 5e-4) {
      b = c;
      break;
    }
    if (fc * fb < 0) {
      a = b;
      fa = fb;
      side = 0;
    } else if (side === 1) fa /= 2;
    else side = 1;
    b = c;
    fb = fc;
  }
  const h = b;
  return { h, arl0: markovArl(dist, h, states) };
}

/**
 * In-control run lengths by simulation: each run draws cases with replacement from the observed risks, draws
 * y ~ Bernoulli(p) and runs the chart from 0 until it reaches h (seeded xoshiro128**). A run longer than
 * `maxLength` is stopped and counted as censored (its length enters the mean as `maxLength`). `logTerm`, when
 * given, holds log(1 − p + R_A·p) per case (saves the logarithms).
 */
export function simulateArl(
  p: Float64Array,
  oddsRatio: number,
  h: number,
  runs: number,
  seed: number,
  maxLength: number,
  logTerm?: Float64Array,
): { mean: number; se: number; runs: number; censored: number; seed: number } {
  const rng = createRng(seed);
  const logR = Math.log(oddsRatio),
    rm1 = oddsRatio - 1;
  const n = p.length;
  let sum = 0,
    sum2 = 0,
    censored = 0;
  for (let r = 0; r < runs; r++) {
    let x = 0,
      t = 0;
    while (t < maxLength) {
      t++;
      // One uniform picks the case (integer part of u·n) and draws its outcome (the fractional part, uniform on
      // [0, 1) given the case, with 53 − log2(n) bits).
      const u = rng.next() * n;
      const k = Math.floor(u);
      const y = u - k < p[k] ? 1 : 0;
      x += y * logR - (logTerm ? logTerm[k] : Math.log(1 + rm1 * p[k]));
      if (x < 0) x = 0;
      else if (x >= h) break;
    }
    if (x < h) censored++;
    sum += t;
    sum2 += t * t;
  }
  const mean = sum / runs;
  const sd = Math.sqrt(Math.max(0, (sum2 - runs * mean * mean) / (runs - 1)));
  return { mean, se: sd / Math.sqrt(runs), runs, censored, seed };
}
