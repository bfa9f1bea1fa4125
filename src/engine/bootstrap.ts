import { brierScore } from './brier';
import { calibrationRegression } from './calibration';
import { checkpoint, type LongRunHooks } from './crossValidation';
import { FulcraError } from './data';
import { stratifiedFolds } from './folds';
import { fitProcedure, pipelineDesign, type Pipeline, type PipelineDesign, type ProcedureFit } from './pipeline';
import { createRng } from './rng';
import { rocCurve } from './roc';
import { warning, type EngineWarning } from './warnings';

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
  const { X, n, p } = d;
  const eta = new Float64Array(n);
  for (let j = 0; j < p; j++) {
    const b = beta[j];
    if (b === 0) continue;
    for (let i = 0; i < n; i++) eta[i] += b * X[j * n + i];
  }
  return eta;
}

/** AUC, calibration slope, calibration-in-the-large and Brier score of linear predictor eta for y (weighted). */
export function performanceMetrics(y: Float64Array, eta: Float64Array, weights?: Float64Array): Metrics {
  const risk = eta.map((e) => 1 / (1 + Math.exp(-e)));
  const cal = calibrationRegression(y, eta, { weights });
  return {
    auc: rocCurve(y, risk, { weights, maxPoints: 2 }).auc,
    calibrationSlope: cal.slope?.estimate ?? null,
    calibrationInTheLarge: cal.interceptInTheLarge?.estimate ?? null,
    brier: brierScore(y, risk, weights).brier,
  };
}

function quantile(sorted: number[], q: number): number {
  const h = (sorted.length - 1) * q, lo = Math.floor(h);
  return lo + 1 < sorted.length ? sorted[lo] + (h - lo) * (sorted[lo + 1] - sorted[lo]) : sorted[lo];
}

function spread(values: number[]): { mean: number; sd: number | null; lower: number; upper: number } {
  const s = values.slice().sort((a, b) => a - b);
  const mean = s.reduce((a, b) => a + b, 0) / s.length;
  const sd = s.length > 1 ? Math.sqrt(s.reduce((a, b) => a + (b - mean) ** 2, 0) / (s.length - 1)) : null;
  return { mean, sd, lower: quantile(s, 0.025), upper: quantile(s, 0.975) };
}

function bothClasses(y: Float64Array, w: Float64Array): boolean {
  let ev = 0, ne = 0;
  for (let i = 0; i < y.length; i++) if (w[i] > 0) (y[i] === 1 ? ev++ : ne++);
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
export async function bootstrapValidation(
  pipeline: Pipeline,
  options: Partial<BootstrapOptions> = {},
  hooks?: LongRunHooks,
): Promise<InternalValidation> {
  return bootstrapOnDesign(pipelineDesign(pipeline), pipeline, options, hooks);
}

export async function bootstrapOnDesign(
  d: PipelineDesign,
  pipeline: Pick<Pipeline, 'fitOptions' | 'penalty' | 'seed'>,
  options: Partial<BootstrapOptions> = {},
  hooks?: LongRunHooks,
): Promise<InternalValidation> {
  const o = { ...defaultBootstrapOptions, ...options };
  if (o.counts) {
    o.B = o.counts.length;
    o.counts.forEach((c, b) => {
      if (c.length !== d.n) throw new FulcraError('bad-resample', `Resample ${b + 1} has ${c.length} counts for ${d.n} rows.`);
    });
  }
  if (!Number.isInteger(o.B) || o.B < 1) throw new FulcraError('bad-replicates', `The number of bootstrap replicates must be a whole number ≥ 1; got ${o.B}.`);
  const { n, y } = d;
  const dev = await fitProcedure(d, pipeline, undefined, pipeline.seed);
  const apparent = performanceMetrics(y, linearPredictor(d, dev.beta));
  const rng = createRng(o.seed);
  const optimism: Record<MetricName, number[]> = { auc: [], calibrationSlope: [], calibrationInTheLarge: [], brier: [] };
  const counts = new Float64Array(n);
  let failed = 0, notConverged = 0;
  for (let b = 0; b < o.B; b++) {
    counts.fill(0);
    if (o.counts) counts.set(o.counts[b]);
    else for (let i = 0; i < n; i++) counts[rng.int(n)]++;
    const innerSeed = rng.int(2 ** 31);
    if (!bothClasses(y, counts)) {
      failed++;
    } else {
      const fit = await tryFit(d, pipeline, counts, innerSeed);
      if (!fit) {
        failed++;
      } else {
        if (!fit.converged) notConverged++;
        const eta = linearPredictor(d, fit.beta);
        const train = performanceMetrics(y, eta, counts), test = performanceMetrics(y, eta);
        for (const m of METRICS) {
          const a = train[m], t = test[m];
          if (a !== null && t !== null && Number.isFinite(a - t)) optimism[m].push(a - t);
        }
      }
    }
    await checkpoint(hooks, b + 1, o.B);
  }
  const rows = METRICS.map((metric): ValidationRow => {
    const a = apparent[metric], v = optimism[metric];
    if (a === null || v.length === 0) return { metric, apparent: a, optimism: null, corrected: null, sd: null, lower: null, upper: null, replicates: v.length };
    const s = spread(v);
    return { metric, apparent: a, optimism: s.mean, corrected: a - s.mean, sd: s.sd, lower: s.lower, upper: s.upper, replicates: v.length };
  });
  const warnings = [...d.warnings, ...runWarnings(failed, notConverged, o.B, 'bootstrap replicates')];
  return { method: 'bootstrap', planned: o.B, failed, seed: o.seed, rows, lambda: dev.lambda, warnings };
}

/** A replicate whose data cannot support the procedure (e.g. a CV fold left with one class) counts as failed. */
async function tryFit(d: PipelineDesign, pipeline: Pick<Pipeline, 'fitOptions' | 'penalty'>, w: Float64Array, seed: number): Promise<ProcedureFit | null> {
  try {
    return await fitProcedure(d, pipeline, w, seed);
  } catch (e) {
    if (e instanceof FulcraError && (e.code === 'fold-one-class' || e.code === 'one-outcome-class')) return null;
    throw e;
  }
}

function runWarnings(failed: number, notConverged: number, total: number, what: string): EngineWarning[] {
  const w: EngineWarning[] = [];
  if (failed > 0) {
    w.push(warning('replicates-skipped', `${failed} of ${total} ${what} held only one outcome class (or left a cross-validation fold without one) and were skipped.`,
      'With so few events the validation is unstable; collect more events or use a simpler model.'));
  }
  if (notConverged > 0) {
    w.push(warning('replicates-not-converged', `The model did not converge in ${notConverged} of ${total} ${what} (often separation in a resample).`,
      'Consider Firth correction or a penalty, or fewer predictors.'));
  }
  return w;
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
export async function repeatedCrossValidation(
  pipeline: Pipeline,
  options: Partial<RepeatedCvOptions> = {},
  hooks?: LongRunHooks,
): Promise<InternalValidation> {
  return repeatedCvOnDesign(pipelineDesign(pipeline), pipeline, options, hooks);
}

export async function repeatedCvOnDesign(
  d: PipelineDesign,
  pipeline: Pick<Pipeline, 'fitOptions' | 'penalty' | 'seed'>,
  options: Partial<RepeatedCvOptions> = {},
  hooks?: LongRunHooks,
): Promise<InternalValidation> {
  const o = { ...defaultRepeatedCvOptions, ...options };
  if (!Number.isInteger(o.repeats) || o.repeats < 1) throw new FulcraError('bad-repeats', `The number of repeats must be a whole number ≥ 1; got ${o.repeats}.`);
  const { n, p, X, y } = d;
  const dev = await fitProcedure(d, pipeline, undefined, pipeline.seed);
  const apparent = performanceMetrics(y, linearPredictor(d, dev.beta));
  const rng = createRng(o.seed);
  const perRepeat: Record<MetricName, number[]> = { auc: [], calibrationSlope: [], calibrationInTheLarge: [], brier: [] };
  const total = o.folds * o.repeats;
  const w = new Float64Array(n), eta = new Float64Array(n);
  let failed = 0, notConverged = 0;
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
        const fit = await tryFit(d, pipeline, w, innerSeed);
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
  const rows = METRICS.map((metric): ValidationRow => {
    const a = apparent[metric], v = perRepeat[metric];
    if (a === null || v.length === 0) return { metric, apparent: a, optimism: null, corrected: null, sd: null, lower: null, upper: null, replicates: v.length };
    const s = spread(v);
    return { metric, apparent: a, optimism: a - s.mean, corrected: s.mean, sd: s.sd, lower: s.lower, upper: s.upper, replicates: v.length };
  });
  const warnings = [...d.warnings, ...runWarnings(failed, notConverged, total, 'cross-validation folds')];
  return { method: 'repeated-cv', planned: total, failed, seed: o.seed, rows, lambda: dev.lambda, warnings };
}
