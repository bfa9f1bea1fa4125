import { brierScore } from '../evaluation/brier';
import { linearPredictor as designLinearPredictor, sigmoid } from '../numerics/loss';
import { calibrationRegression } from '../evaluation/calibration';
import { checkpoint, type LongRunHooks } from '../penalised/crossValidation';
import { FulcraError } from '../core/data';
import { stratifiedFolds } from '../penalised/folds';
import { fitProcedure, pipelineDesign, type Pipeline, type PipelineDesign, type ProcedureFit } from './pipeline';
import { createRng } from '../numerics/rng';
import { quantileSorted } from '../numerics/quantile';
import { rocCurve } from '../evaluation/roc';
import { warning, type EngineWarning } from '../core/warnings';

export type MetricName = 'auc' | 'calibrationSlope' | 'calibrationInTheLarge' | 'brier';
export const METRICS: MetricName[] = ['auc', 'calibrationSlope', 'calibrationInTheLarge', 'brier'];
export type Metrics = Record<MetricName, number | null>;

/** One performance measure: as seen on the development data, the estimated optimism, and the corrected value. */
export interface ValidationRow {
  metric: MetricName;
  apparent: number | null;
  /** Mean optimism (bootstrap) or apparent − cross-validated (repeated CV). */
  optimism: number | null;
  corrected: number | null;
  /** Spread across replicates (bootstrap: of the optimism; repeated CV: of the per-repeat estimate). */
  sd: number | null;
  lower: number | null;
  upper: number | null;
  /** Replicates that gave a value. */
  replicates: number;
}

export interface InternalValidation {
  method: 'bootstrap' | 'repeated-cv';
  /** Bootstrap replicates, or folds × repeats. */
  planned: number;
  failed: number;
  seed: number;
  rows: ValidationRow[];
  /** λ of the development fit (0 unless penalised). */
  lambda: number;
  warnings: EngineWarning[];
}

function linearPredictor(d: PipelineDesign, beta: Float64Array): Float64Array {
  return designLinearPredictor(d.X, d.n, d.p, beta, undefined, new Float64Array(d.n));
}

/** AUC, calibration slope, calibration-in-the-large and Brier score of linear predictor eta for y (weighted). */
export function performanceMetrics(y: Float64Array, eta: Float64Array, weights?: Float64Array): Metrics {
  const risk = eta.map((e) => sigmoid(e));
  const cal = calibrationRegression(y, eta, { weights });
  return {
    auc: rocCurve(y, risk, { weights, maxPoints: 2 }).auc,
    calibrationSlope: cal.slope?.estimate ?? null,
    calibrationInTheLarge: cal.interceptInTheLarge?.estimate ?? null,
    brier: brierScore(y, risk, weights).brier,
  };
}

/**
 * performanceMetrics of one linear predictor on a resample (weights = counts) and on the original rows, with
 * one sort of the risks shared by both AUCs (rank sums over tied-risk groups: Mann–Whitney with ties ½, the same
 * value as the ROC trapezoid) and the calibration fits done by plain Newton steps from 0 and (0, 1). When a
 * calibration fit is not clean (one class, separation, no spread) that weighting goes through performanceMetrics,
 * so the results equal performanceMetrics' to the solver tolerance, warnings and nulls included.
 */
function replicateMetrics(
  y: Float64Array,
  eta: Float64Array,
  counts: Float64Array,
  base: Float64Array | null,
): { train: Metrics; test: Metrics } {
  const n = y.length,
    risk = new Float64Array(n),
    expNeg = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(eta[i]) || (y[i] !== 0 && y[i] !== 1) || !(counts[i] >= 0)) {
      return { train: performanceMetrics(y, eta, counts), test: performanceMetrics(y, eta, base ?? undefined) };
    }
    expNeg[i] = Math.exp(-eta[i]);
    risk[i] = 1 / (1 + expNeg[i]);
  }
  const order = radixOrder(risk);
  // Mann–Whitney sums over groups of tied risks, resample-weighted (W) and weighted as the original rows (1: one
  // case per row, or the rows' frequency weights).
  let [uW, belowW, eW, seW] = [0, 0, 0, 0]; // resample-weighted
  let [u1, below1, e1, se1] = [0, 0, 0, 0]; // original weights
  let sw = 0;
  let s1 = 0;
  for (let r = 0; r < n;) {
    const v = risk[order[r]];
    let ge = 0,
      gn = 0,
      ce = 0,
      cn = 0;
    for (; r < n && risk[order[r]] === v; r++) {
      const i = order[r],
        c = counts[i],
        b = base ? base[i] : 1,
        d = y[i] - v;
      if (y[i] === 1) {
        ge += c;
        ce += b;
      } else {
        gn += c;
        cn += b;
      }
      seW += c * d * d;
      se1 += b * d * d;
      sw += c;
      s1 += b;
    }
    uW += ge * (belowW + 0.5 * gn);
    belowW += gn;
    eW += ge;
    u1 += ce * (below1 + 0.5 * cn);
    below1 += cn;
    e1 += ce;
  }
  const metrics = (
    w: Float64Array | undefined,
    u: number,
    events: number,
    nonEvents: number,
    brier: number,
  ): Metrics => {
    const cal = calibrationByNewton(y, eta, expNeg, w);
    if (!cal) return performanceMetrics(y, eta, w);
    return {
      auc: Math.min(1, Math.max(0, u / (events * nonEvents))),
      calibrationSlope: cal.slope,
      calibrationInTheLarge: cal.citl,
      brier,
    };
  };
  return {
    train: metrics(counts, uW, eW, belowW, seW / sw),
    test: metrics(base ?? undefined, u1, e1, below1, se1 / s1),
  };
}

const LITTLE_ENDIAN = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;

/** Row order of non-negative doubles, ascending: stable LSD radix sort of the IEEE-754 bits in 11-bit digits. */
function radixOrder(v: Float64Array): Uint32Array {
  const n = v.length,
    bits = new Uint32Array(v.buffer, v.byteOffset, 2 * n),
    count = new Uint32Array(2048);
  let idx = new Uint32Array(n),
    tmp = new Uint32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  for (let pass = 0; pass < 6; pass++) {
    const word = pass < 3 === LITTLE_ENDIAN ? 0 : 1,
      shift = (pass % 3) * 11;
    count.fill(0);
    for (let i = 0; i < n; i++) count[(bits[2 * i + word] >>> shift) & 2047]++;
    if (count[(bits[word] >>> shift) & 2047] === n) continue;
    let sum = 0;
    for (let k = 0; k < 2048; k++) {
      const c = count[k];
      count[k] = sum;
      sum += c;
    }
    for (let r = 0; r < n; r++) {
      const i = idx[r];
      tmp[count[(bits[2 * i + word] >>> shift) & 2047]++] = i;
    }
    const t = idx;
    idx = tmp;
    tmp = t;
  }
  return idx;
}

/**
 * Calibration-in-the-large (glm(y ~ 1, offset = eta)) and slope (glm(y ~ eta)) by Newton's method without step
 * halving, to a relative step of 1e-10 (expNeg = e^−eta); null unless both classes have weight, both fits converge
 * within 50 steps and the slope model's information is well conditioned (the caller then uses calibrationRegression).
 */
function calibrationByNewton(
  y: Float64Array,
  eta: Float64Array,
  expNeg: Float64Array,
  w: Float64Array | undefined,
): { citl: number; slope: number } | null {
  const n = y.length;
  let sw = 0,
    sy = 0;
  for (let i = 0; i < n; i++) {
    const wi = w ? w[i] : 1;
    sw += wi;
    sy += wi * y[i];
  }
  if (!(sw > 0) || sy === 0 || sy === sw) return null;
  let a = 0,
    converged = false;
  for (let it = 0; it < 50 && !converged; it++) {
    let g = 0,
      h = 0;
    const ea = Math.exp(-a);
    for (let i = 0; i < n; i++) {
      const wi = w ? w[i] : 1;
      if (wi === 0) continue;
      const m = 1 / (1 + ea * expNeg[i]);
      g += wi * (y[i] - m);
      h += wi * m * (1 - m);
    }
    const step = g / h;
    if (!Number.isFinite(step)) return null;
    a += step;
    converged = Math.abs(step) <= 1e-10 * (1 + Math.abs(a));
  }
  if (!converged) return null;
  let b0 = 0,
    b1 = 1;
  converged = false;
  for (let it = 0; it < 50 && !converged; it++) {
    let g0 = 0,
      g1 = 0,
      h00 = 0,
      h01 = 0,
      h11 = 0;
    for (let i = 0; i < n; i++) {
      const wi = w ? w[i] : 1;
      if (wi === 0) continue;
      const e = eta[i],
        m = 1 / (1 + (it === 0 ? expNeg[i] : Math.exp(-(b0 + b1 * e)))),
        r = wi * (y[i] - m),
        v = wi * m * (1 - m);
      g0 += r;
      g1 += r * e;
      h00 += v;
      h01 += v * e;
      h11 += v * e * e;
    }
    const det = h00 * h11 - h01 * h01;
    if (!(det > 1e-8 * h00 * h11)) return null;
    const s0 = (h11 * g0 - h01 * g1) / det,
      s1 = (h00 * g1 - h01 * g0) / det;
    if (!Number.isFinite(s0) || !Number.isFinite(s1)) return null;
    b0 += s0;
    b1 += s1;
    converged = Math.max(Math.abs(s0) / (1 + Math.abs(b0)), Math.abs(s1) / (1 + Math.abs(b1))) <= 1e-10;
  }
  return converged ? { citl: a, slope: b1 } : null;
}

function spread(values: number[]): { mean: number; sd: number | null; lower: number; upper: number } {
  const s = values.slice().sort((a, b) => a - b);
  const mean = s.reduce((a, b) => a + b, 0) / s.length;
  const sd = s.length > 1 ? Math.sqrt(s.reduce((a, b) => a + (b - mean) ** 2, 0) / (s.length - 1)) : null;
  return { mean, sd, lower: quantileSorted(s, 0.025), upper: quantileSorted(s, 0.975) };
}

/**
 * One row per measure from the apparent values and the replicate values: `split(apparent, mean of replicates)`
 * gives [optimism, corrected]; sd and the 2.5/97.5 percentiles describe the replicates.
 */
function validationRows(
  apparent: Metrics,
  replicates: Record<MetricName, number[]>,
  split: (apparent: number, mean: number) => [number, number],
): ValidationRow[] {
  return METRICS.map((metric): ValidationRow => {
    const a = apparent[metric],
      v = replicates[metric];
    if (a === null || v.length === 0) {
      const none = { optimism: null, corrected: null, sd: null, lower: null, upper: null };
      return { metric, apparent: a, ...none, replicates: v.length };
    }
    const s = spread(v);
    const [optimism, corrected] = split(a, s.mean);
    return { metric, apparent: a, optimism, corrected, sd: s.sd, lower: s.lower, upper: s.upper, replicates: v.length };
  });
}

/** Internal validation of a pipeline (builds its design once). */
type Validation<O> = (pipeline: Pipeline, options?: Partial<O>, hooks?: LongRunHooks) => Promise<InternalValidation>;

/** What a validation needs of the pipeline besides its design. */
type ValidatedProcedure = Pick<Pipeline, 'fitOptions' | 'penalty' | 'seed'>;

type ValidationOnDesign<O> = (
  d: PipelineDesign,
  pipeline: ValidatedProcedure,
  options?: Partial<O>,
  hooks?: LongRunHooks,
) => Promise<InternalValidation>;

/**
 * The development fit on all rows with its apparent performance, the warm start of every replicate, the
 * replicate generator (seeded) and an empty list of replicate values per measure.
 */
async function development(d: PipelineDesign, pipeline: ValidatedProcedure, seed: number) {
  const dev = await fitProcedure(d, pipeline, d.weights ?? undefined, pipeline.seed);
  const values: Record<MetricName, number[]> = { auc: [], calibrationSlope: [], calibrationInTheLarge: [], brier: [] };
  return {
    dev,
    apparent: performanceMetrics(d.y, linearPredictor(d, dev.beta), d.weights ?? undefined),
    start: dev.converged ? dev.beta : undefined,
    rng: createRng(seed),
    values,
  };
}

function bothClasses(y: Float64Array, w: Float64Array): boolean {
  let ev = 0,
    ne = 0;
  for (let i = 0; i < y.length; i++) {
    if (!(w[i] > 0)) continue;
    if (y[i] === 1) ev++;
    else ne++;
  }
  return ev > 0 && ne > 0;
}

export interface BootstrapOptions {
  /** Number of bootstrap replicates (default 200). */
  B: number;
  seed: number;
  /** Explicit resamples as per-row counts (to reproduce replicates drawn elsewhere); overrides B and seed's draws. */
  counts?: Float64Array[];
}

export const defaultBootstrapOptions: BootstrapOptions = { B: 200, seed: 1 };

/**
 * Optimism-corrected performance by the bootstrap (Efron 1983, JASA 78:316; Harrell, Lee & Mark 1996,
 * Stat Med 15:361). Each replicate draws n rows with replacement (as case-weight counts), re-runs the WHOLE
 * procedure — including λ selection by cross-validation when penalised — and scores the refitted model on
 * the resample and on the original rows; optimism = resample − original. corrected = apparent − mean
 * optimism; sd and 2.5/97.5 percentiles describe the spread of the optimism. The design (reference levels,
 * spline knots) is fixed from the full data. Replicates whose resample lacks one outcome class are
 * skipped and counted in `failed`. Calls onProgress after every replicate and honours the cancel signal.
 */
export const bootstrapValidation: Validation<BootstrapOptions> = (pipeline, options = {}, hooks) =>
  bootstrapOnDesign(pipelineDesign(pipeline), pipeline, options, hooks);

/** bootstrapValidation on a design already built (the same design for every replicate). */
export const bootstrapOnDesign: ValidationOnDesign<BootstrapOptions> = async (d, pipeline, options = {}, hooks) => {
  const o = { ...defaultBootstrapOptions, ...options };
  if (o.counts) {
    o.B = o.counts.length;
    o.counts.forEach((c, b) => {
      if (c.length !== d.n)
        throw new FulcraError('bad-resample', `Resample ${b + 1} has ${c.length} counts for ${d.n} rows.`);
    });
  }
  if (!Number.isInteger(o.B) || o.B < 1)
    throw new FulcraError(
      'bad-replicates',
      `The number of bootstrap replicates must be a whole number ≥ 1; got ${o.B}.`,
    );
  const { n, y } = d;
  const { dev, apparent, start, rng, values: optimism } = await development(d, pipeline, o.seed);
  const counts = new Float64Array(n);
  const draw = caseDraw(d.weights);
  let failed = 0,
    notConverged = 0;
  for (let b = 0; b < o.B; b++) {
    counts.fill(0);
    if (o.counts) counts.set(o.counts[b]);
    else draw(counts, rng);
    const innerSeed = rng.int(2 ** 31);
    if (!bothClasses(y, counts)) {
      failed++;
    } else {
      const fit = await tryFit(d, pipeline, counts, innerSeed, start);
      if (!fit) {
        failed++;
      } else {
        if (!fit.converged) notConverged++;
        const { train, test } = replicateMetrics(y, linearPredictor(d, fit.beta), counts, d.weights);
        for (const m of METRICS) {
          const a = train[m],
            t = test[m];
          if (a !== null && t !== null && Number.isFinite(a - t)) optimism[m].push(a - t);
        }
      }
    }
    await checkpoint(hooks, b + 1, o.B);
  }
  const rows = validationRows(apparent, optimism, (a, mean) => [mean, a - mean]);
  const warnings = [...d.warnings, ...runWarnings(failed, notConverged, o.B, 'bootstrap replicates')];
  return { method: 'bootstrap', planned: o.B, failed, seed: o.seed, rows, lambda: dev.lambda, warnings };
};

/**
 * One bootstrap resample as counts per row: n draws of a row with replacement, or with frequency weights (a row that
 * stands for w identical cases) N = Σw draws of a case, each row drawn with probability w/N — the resample of the
 * data written out one row per case, counted back onto its rows.
 */
export function caseDraw(
  weights: Float64Array | null,
): (counts: Float64Array, rng: { int(k: number): number }) => void {
  if (!weights) {
    return (counts, rng) => {
      const n = counts.length;
      for (let i = 0; i < n; i++) counts[rng.int(n)]++;
    };
  }
  const n = weights.length;
  const cumulative = new Float64Array(n);
  let total = 0;
  for (let i = 0; i < n; i++) cumulative[i] = total += weights[i];
  return (counts, rng) => {
    for (let k = 0; k < total; k++) {
      const u = rng.int(total); // a case, 0 … N−1; its row is the first whose cumulative count exceeds it
      let lo = 0,
        hi = n - 1;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (cumulative[mid] > u) hi = mid;
        else lo = mid + 1;
      }
      counts[lo]++;
    }
  };
}

/** A replicate whose data cannot support the procedure (e.g. a CV fold left with one class) counts as failed. */
async function tryFit(
  d: PipelineDesign,
  pipeline: Pick<Pipeline, 'fitOptions' | 'penalty'>,
  w: Float64Array,
  seed: number,
  start?: Float64Array,
): Promise<ProcedureFit | null> {
  try {
    return await fitProcedure(d, pipeline, w, seed, undefined, start);
  } catch (e) {
    if (e instanceof FulcraError && (e.code === 'fold-one-class' || e.code === 'one-outcome-class')) return null;
    throw e;
  }
}

function runWarnings(failed: number, notConverged: number, total: number, what: string): EngineWarning[] {
  const w: EngineWarning[] = [];
  if (failed > 0) {
    w.push(
      warning(
        'replicates-skipped',
        `${failed} of ${total} ${what} held only one outcome class (or left a cross-validation fold without ` +
          `one) and were skipped.`,
        'With so few events the validation is unstable; collect more events or use a simpler model.',
      ),
    );
  }
  if (notConverged > 0) {
    w.push(
      warning(
        'replicates-not-converged',
        `The model did not converge in ${notConverged} of ${total} ${what} (often separation in a resample).`,
        'Consider Firth correction or a penalty, or fewer predictors.',
      ),
    );
  }
  return w;
}

/**
 * Folds are made of rows; with frequency weights (or a grouped table) a row stands for many cases, and folds of rows
 * are not folds of cases, so cross-validation on such data is refused rather than run on the wrong unit.
 */
export function weightedCvError(what: string, fix: string): FulcraError {
  return new FulcraError(
    'cross-validation-on-weighted-rows',
    `${what} is not offered for grouped counts or frequency-weighted rows: its folds would split rows of the table, ` +
      'not cases.',
    fix,
  );
}

export interface RepeatedCvOptions {
  folds: number;
  repeats: number;
  seed: number;
}

export const defaultRepeatedCvOptions: RepeatedCvOptions = { folds: 10, repeats: 10, seed: 1 };

/**
 * Repeated stratified k-fold cross-validation of the whole procedure (incl. λ selection when penalised):
 * in each repeat every row gets an out-of-fold linear predictor from the model fitted without its fold;
 * the measures are computed on those pooled predictions, then averaged over repeats (sd and 2.5/97.5
 * percentiles across repeats). Steyerberg 2019, Clinical Prediction Models 2nd ed., §17.
 */
export const repeatedCrossValidation: Validation<RepeatedCvOptions> = (pipeline, options = {}, hooks) =>
  repeatedCvOnDesign(pipelineDesign(pipeline), pipeline, options, hooks);

/** repeatedCrossValidation on a design already built. */
export const repeatedCvOnDesign: ValidationOnDesign<RepeatedCvOptions> = async (d, pipeline, options = {}, hooks) => {
  const o = { ...defaultRepeatedCvOptions, ...options };
  if (!Number.isInteger(o.repeats) || o.repeats < 1)
    throw new FulcraError('bad-repeats', `The number of repeats must be a whole number ≥ 1; got ${o.repeats}.`);
  if (d.weights) throw weightedCvError('Repeated cross-validation', 'Use the bootstrap, which resamples cases.');
  const { n, p, X, y } = d;
  const { dev, apparent, start, rng, values: perRepeat } = await development(d, pipeline, o.seed);
  const total = o.folds * o.repeats;
  const w = new Float64Array(n),
    eta = new Float64Array(n);
  let failed = 0,
    notConverged = 0;
  for (let r = 0; r < o.repeats; r++) {
    const fold = stratifiedFolds(y, o.folds, rng);
    let complete = true;
    for (let f = 0; f < o.folds; f++) {
      for (let i = 0; i < n; i++) w[i] = fold[i] === f ? 0 : 1;
      const innerSeed = rng.int(2 ** 31);
      if (!bothClasses(y, w)) {
        failed++;
        complete = false;
      } else {
        const fit = await tryFit(d, pipeline, w, innerSeed, start);
        if (!fit) {
          failed++;
          complete = false;
          await checkpoint(hooks, r * o.folds + f + 1, total);
          continue;
        }
        if (!fit.converged) notConverged++;
        for (let i = 0; i < n; i++) {
          if (fold[i] !== f) continue;
          let e = 0;
          for (let j = 0; j < p; j++) e += fit.beta[j] * X[j * n + i];
          eta[i] = e;
        }
      }
      await checkpoint(hooks, r * o.folds + f + 1, total);
    }
    if (!complete) continue;
    const m = performanceMetrics(y, eta);
    for (const k of METRICS) if (m[k] !== null) perRepeat[k].push(m[k] as number);
  }
  const rows = validationRows(apparent, perRepeat, (a, mean) => [a - mean, mean]);
  const warnings = [...d.warnings, ...runWarnings(failed, notConverged, total, 'cross-validation folds')];
  return { method: 'repeated-cv', planned: total, failed, seed: o.seed, rows, lambda: dev.lambda, warnings };
};
