import { oddsRatio } from '../fitting/oddsRatio';
import {
  assemble,
  defaultCdOptions,
  penalisedLogistic,
  solveAtLambda,
  standardise as standardiseWeighted,
  type PenalisedProblem,
} from '../penalised/coordinateDescent';
import { crossValidateLambda, type CvCriterion, type CvResult, type LongRunHooks } from '../penalised/crossValidation';
import { FulcraError, type Dataset } from '../core/data';
import { buildDesign } from '../design/design';
import { validateFitOptions } from '../fitting/fitOptions';
import { defaultFitOptions, type DesignRecipe, type FitMethod, type FitOptions, type ModelSpec } from '../core/model';
import { newtonLogistic } from '../fitting/newton';
import { standardise } from '../numerics/standardise';
import { warning, type EngineWarning } from '../core/warnings';

/**
 * Elastic-net penalty with its λ chosen by cross-validation (or fixed). α = 1 lasso, α = 0 ridge;
 * glmnet conventions (see coordinateDescent.ts).
 */
export interface PenaltySelection {
  alpha: number;
  /** A fixed λ, or the CV choice: 'cv-min' (smallest CV error) or 'cv-1se' (one-standard-error rule). */
  lambda: number | 'cv-min' | 'cv-1se';
  folds: number;
  criterion: CvCriterion;
  nLambda: number;
}

export const defaultPenaltySelection: PenaltySelection = {
  alpha: 1,
  lambda: 'cv-1se',
  folds: 10,
  criterion: 'deviance',
  nLambda: 100,
};

/**
 * Everything needed to re-run a model building procedure from scratch, as a plain record (it crosses the
 * worker boundary): data, model specification, fit options, and an optional penalty with λ selection.
 * When `penalty` is set it replaces fitOptions.method; otherwise method 'ml', 'firth' or 'ridge' (fixed λ).
 */
export interface Pipeline {
  data: Dataset;
  spec: ModelSpec;
  fitOptions: Partial<FitOptions>;
  penalty: PenaltySelection | null;
  /** Seeds the cross-validation folds of λ selection. */
  seed: number;
}

/** The design (intercept first, column-major) a pipeline is fitted on; fixed once from the full data. */
export interface PipelineDesign {
  X: Float64Array;
  n: number;
  p: number;
  y: Float64Array;
  /** Frequency weights of the rows (cases each stands for); null: one case per row. */
  weights: Float64Array | null;
  columnNames: string[];
  recipe: DesignRecipe;
  warnings: EngineWarning[];
  /** Non-intercept columns centred and scaled (unit population SD; constant columns only centred), for Newton fits. */
  Z: Float64Array;
  center: Float64Array;
  scale: Float64Array;
  /** center/scale computed without overflow (for the intercept on the original scale). */
  centerOverScale: Float64Array;
}

/** The outcome of one run of the procedure. */
export interface ProcedureFit {
  /** Original scale, intercept first, in design column order. */
  beta: Float64Array;
  /** λ used (0 for maximum likelihood and Firth). */
  lambda: number;
  converged: boolean;
  cv: CvResult | null;
}

/** A fitted pipeline as a scoring model: coefficients aligned with recipe.columnNames. */
export interface PipelineFit {
  method: FitMethod;
  alpha: number | null;
  lambda: number;
  coefficients: { name: string; estimate: number; oddsRatio: number }[];
  recipe: DesignRecipe;
  converged: boolean;
  cv: CvResult | null;
  warnings: EngineWarning[];
}

/** Builds the design of a pipeline (complete cases, reference levels and spline knots from the full data). */
export function pipelineDesign(pipeline: Pipeline): PipelineDesign {
  const d = buildDesign(pipeline.data, pipeline.spec);
  return withStandardised({
    X: d.X,
    n: d.n,
    p: d.p,
    y: d.y,
    weights: d.weights,
    columnNames: d.columnNames,
    recipe: d.recipe,
    warnings: d.warnings,
  });
}

/** Adds the centred and scaled copy of the design used by the Newton fits (better conditioned). */
export function withStandardised(
  d: Omit<PipelineDesign, 'Z' | 'center' | 'scale' | 'centerOverScale'>,
): PipelineDesign {
  const { Z, center, scale, centerOverScale } = standardise(d.X, d.n, d.p);
  return { ...d, Z, center, scale, centerOverScale };
}

function checkPenalty(s: PenaltySelection): void {
  if (!(s.alpha >= 0 && s.alpha <= 1))
    throw new FulcraError('bad-alpha', `alpha must be between 0 (ridge) and 1 (lasso); got ${s.alpha}.`);
  if (
    typeof s.lambda === 'number'
      ? !(s.lambda >= 0 && Number.isFinite(s.lambda))
      : s.lambda !== 'cv-min' && s.lambda !== 'cv-1se'
  ) {
    throw new FulcraError('bad-lambda', `lambda must be a number ≥ 0, "cv-min" or "cv-1se"; got ${String(s.lambda)}.`);
  }
}

/**
 * Runs the model-building procedure on a design with case weights (bootstrap counts; 0 leaves a row out).
 * Includes λ selection by cross-validation when the pipeline asks for it, so validation repeats it.
 * `start` (original scale, intercept first, e.g. the full-data fit) warm-starts the maximum likelihood, Firth
 * and ridge fits; it changes the result only within the solver tolerance. A warm fit that does not converge,
 * or that holds a collinear column at a non-zero start, is redone from 0 so that it matches the cold fit.
 */
export async function fitProcedure(
  d: PipelineDesign,
  pipeline: Pick<Pipeline, 'fitOptions' | 'penalty'>,
  weights: Float64Array | undefined,
  seed: number,
  hooks?: LongRunHooks,
  start?: Float64Array,
): Promise<ProcedureFit> {
  const o = validateFitOptions(pipeline.fitOptions);
  const { n, p } = d;
  const problem = { X: d.X.subarray(n), n, p: p - 1, y: d.y, weights };
  const pen = pipeline.penalty ? { ...defaultPenaltySelection, ...pipeline.penalty } : null;
  if (pen) {
    checkPenalty(pen);
    if (p === 1) return { beta: interceptOnly(d.y, weights), lambda: 0, converged: true, cv: null };
    if (typeof pen.lambda === 'number') {
      const f = penalisedLogistic(problem, pen.alpha, pen.lambda, { tol: o.tol, maxIter: Math.max(o.maxIter, 100) });
      return { beta: f.coefficients, lambda: pen.lambda, converged: f.converged, cv: null };
    }
    if (weights && d.weights)
      throw new FulcraError(
        'cross-validation-on-weighted-rows',
        'Choosing λ by cross-validation is not offered for grouped counts or frequency-weighted rows: its folds ' +
          'would split rows of the table, not cases.',
        'Give λ a fixed value, or use maximum likelihood or Firth.',
      );
    const cv = await crossValidateLambda(
      problem,
      pen.alpha,
      { folds: pen.folds, seed, criterion: pen.criterion, nLambda: pen.nLambda },
      hooks,
    );
    const k = pen.lambda === 'cv-min' ? cv.indexMin : cv.index1se;
    return {
      beta: Float64Array.from(cv.fullPath.coefficients[k]),
      lambda: cv.path[k].lambda,
      converged: cv.fullPath.converged,
      cv,
    };
  }
  if (o.method === 'ridge') {
    if (p === 1) return { beta: interceptOnly(d.y, weights), lambda: o.lambda, converged: true, cv: null };
    const cd = { tol: o.tol, maxIter: Math.max(o.maxIter, 100) };
    const f = start ? warmRidge(problem, o.lambda, start, cd) : null;
    const g = f && f.converged ? f : penalisedLogistic(problem, 0, o.lambda, cd);
    return { beta: g.coefficients, lambda: o.lambda, converged: g.converged, cv: null };
  }
  const zProblem = { X: d.Z, n, p, y: d.y, weights, firth: o.method === 'firth' };
  const nOpt = { tol: o.tol, maxIter: o.maxIter, information: false };
  const zStart = start ? toStandardised(d, start) : null;
  let f = zStart ? newtonLogistic({ ...zProblem, start: zStart }, { ...nOpt, maxIter: Math.min(o.maxIter, 25) }) : null;
  // Not converged in 25 warm steps (separation), or a collinear column held at a non-zero start: redo from 0.
  if (!f || !f.converged || f.dropped.some((dj, j) => dj === 1 && zStart![j] !== 0)) f = newtonLogistic(zProblem, nOpt);
  const beta = new Float64Array(p);
  beta[0] = f.beta[0];
  for (let j = 1; j < p; j++) {
    beta[j] = f.beta[j] / d.scale[j];
    beta[0] -= f.beta[j] * d.centerOverScale[j];
  }
  return { beta, lambda: 0, converged: f.converged, cv: null };
}

/** Original-scale coefficients to the Z scale of the Newton fits (fitProcedure's map inverted); null if not finite. */
function toStandardised(d: PipelineDesign, beta: Float64Array): Float64Array | null {
  if (beta.length !== d.p)
    throw new FulcraError('bad-start', `The start has ${beta.length} coefficients for ${d.p} design columns.`);
  const z = new Float64Array(d.p);
  z[0] = beta[0];
  for (let j = 1; j < d.p; j++) {
    z[j] = beta[j] * d.scale[j];
    z[0] += z[j] * d.centerOverScale[j];
  }
  return z.every(Number.isFinite) ? z : null;
}

/** Ridge at fixed λ from original-scale coefficients, on this weighting's standardised scale (coordinateDescent). */
function warmRidge(
  problem: PenalisedProblem,
  lambda: number,
  start: Float64Array,
  cd: { tol: number; maxIter: number },
) {
  if (start.length !== problem.p + 1)
    throw new FulcraError(
      'bad-start',
      `The start has ${start.length} coefficients for ${problem.p + 1} design columns.`,
    );
  const s = standardiseWeighted(problem);
  const b = new Float64Array(s.p);
  let b0 = start[0];
  for (let j = 0; j < s.p; j++) {
    if (s.constant[j]) continue;
    b[j] = start[j + 1] * s.sd[j];
    b0 += start[j + 1] * s.mean[j];
  }
  if (!Number.isFinite(b0) || b.some((v) => !Number.isFinite(v))) return null;
  return assemble(s, problem, 0, lambda, solveAtLambda(s, lambda, 0, { b0, b }, { ...defaultCdOptions, ...cd }));
}

function interceptOnly(y: Float64Array, weights?: Float64Array): Float64Array {
  let sw = 0,
    sy = 0;
  for (let i = 0; i < y.length; i++) {
    const w = weights ? weights[i] : 1;
    sw += w;
    sy += w * y[i];
  }
  return Float64Array.of(Math.log(sy / (sw - sy)));
}

/** Fits a pipeline on its full data and returns it as a scoring model (coefficients with the recipe). */
export async function fitPipeline(pipeline: Pipeline, hooks?: LongRunHooks): Promise<PipelineFit> {
  const d = pipelineDesign(pipeline);
  const f = await fitProcedure(d, pipeline, d.weights ?? undefined, pipeline.seed, hooks);
  const a = pipeline.penalty?.alpha;
  const method: FitMethod = pipeline.penalty
    ? a === 1
      ? 'lasso'
      : a === 0
        ? 'ridge'
        : 'elastic-net'
    : (pipeline.fitOptions.method ?? defaultFitOptions.method);
  const warnings = [...d.warnings, ...(f.cv?.warnings ?? [])];
  if (!f.converged) {
    warnings.push(
      warning(
        'not-converged',
        'The model fit did not converge.',
        'Raise the iteration limit, or use a penalty or Firth correction if the data separate.',
      ),
    );
  }
  return {
    method,
    alpha: pipeline.penalty ? pipeline.penalty.alpha : method === 'ridge' ? 0 : null,
    lambda: f.lambda,
    coefficients: d.columnNames.map((name, j) => ({ name, estimate: f.beta[j], oddsRatio: oddsRatio(f.beta[j]) })),
    recipe: d.recipe,
    converged: f.converged,
    cv: f.cv,
    warnings,
  };
}
