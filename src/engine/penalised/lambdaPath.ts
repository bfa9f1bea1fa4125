import { interceptDeviance } from '../numerics/loss';
import { FulcraError } from '../core/data';
import {
  assemble,
  defaultCdOptions,
  solveAtLambda,
  standardise,
  type CdOptions,
  type PenalisedProblem,
  type Standardised,
} from './coordinateDescent';
import { warning, type EngineWarning } from '../core/warnings';

export interface PathOptions extends CdOptions {
  /** Number of λ values (default 100). */
  nLambda: number;
  /** λ_min / λ_max; default 1e-4 when n > p, else 1e-2 (glmnet's lambda.min.ratio). */
  ratio?: number;
  /** A user λ sequence (sorted decreasing) instead of the automatic one. */
  lambda?: number[];
  /** Stop the path early when the deviance ratio gains less than this (glmnet fdev, 1e-5) or exceeds 0.999. */
  earlyStop: boolean;
}

export const defaultPathOptions: PathOptions = { ...defaultCdOptions, nLambda: 100, earlyStop: true };

/** A fitted λ path: one entry per λ, coefficients column by column (each intercept first, original scale). */
export interface LambdaPath {
  alpha: number;
  lambda: number[];
  /** coefficients[k] = original-scale coefficients at lambda[k], intercept first. */
  coefficients: number[][];
  /** Non-zero non-intercept coefficients at each λ. */
  nonzero: number[];
  /** 1 − deviance / null deviance at each λ. */
  devianceRatio: number[];
  nullDeviance: number;
  converged: boolean;
  warnings: EngineWarning[];
}

/**
 * Smallest λ at which every penalised coefficient is zero: max_j |Σ wᵢ x̃ᵢⱼ (yᵢ − ȳ)| / max(α, 10⁻³), with
 * weights summing to 1 (glmnet uses α = 10⁻³ in place of a pure ridge's 0).
 */
export function lambdaMax(s: Standardised, alpha: number): number {
  const { X, n, p, y, w, mean, sd, constant, ybar } = s;
  let g = 0;
  for (let j = 0; j < p; j++) {
    if (constant[j]) continue;
    const o = j * n;
    let t = 0;
    for (let i = 0; i < n; i++) t += w[i] * (X[o + i] - mean[j]) * (y[i] - ybar);
    g = Math.max(g, Math.abs(t) / sd[j]);
  }
  return g / Math.max(alpha, 1e-3);
}

/** nLambda values log-spaced from λ_max down to ratio·λ_max. */
export function lambdaSequence(max: number, ratio: number, nLambda: number): number[] {
  if (!(nLambda >= 1) || !Number.isInteger(nLambda))
    throw new FulcraError('bad-nlambda', `nLambda must be a whole number ≥ 1; got ${nLambda}.`);
  if (!(ratio > 0 && ratio < 1))
    throw new FulcraError('bad-lambda-ratio', `The λ ratio must be between 0 and 1; got ${ratio}.`);
  if (nLambda === 1) return [max];
  return Array.from({ length: nLambda }, (_, k) => max * Math.exp((k / (nLambda - 1)) * Math.log(ratio)));
}

/**
 * Elastic-net logistic path with warm starts along a decreasing λ sequence (Friedman, Hastie & Tibshirani
 * 2010, J Stat Softw 33(1)). Conventions as in coordinateDescent.ts.
 */
export function lambdaPath(problem: PenalisedProblem, alpha: number, options: Partial<PathOptions> = {}): LambdaPath {
  const o = { ...defaultPathOptions, ...options };
  if (!(alpha >= 0 && alpha <= 1))
    throw new FulcraError('bad-alpha', `alpha must be between 0 (ridge) and 1 (lasso); got ${alpha}.`);
  const s = standardise(problem);
  const warnings: EngineWarning[] = [];
  if (s.ybar <= 0 || s.ybar >= 1) {
    throw new FulcraError('one-outcome-class', 'Every (weighted) row has the same outcome, so no model can be fitted.');
  }
  const lambdas = o.lambda
    ? checkUserLambda(o.lambda)
    : lambdaSequence(lambdaMax(s, alpha), o.ratio ?? (s.n > s.p ? 1e-4 : 1e-2), o.nLambda);
  const constantCols: number[] = [];
  s.constant.forEach((c, j) => c && constantCols.push(j + 1));
  if (constantCols.length > 0) {
    warnings.push(
      warning(
        'constant-column',
        `Predictor column(s) ${constantCols.join(', ')} do not vary among the rows used; their coefficient is ` +
          `kept at 0.`,
        'Remove predictors that take a single value.',
      ),
    );
  }
  const nullDev = interceptDeviance(s.ybar, 1);
  let start: { b0: number; b: Float64Array } = { b0: Math.log(s.ybar / (1 - s.ybar)), b: new Float64Array(s.p) };
  const out: LambdaPath = {
    alpha,
    lambda: [],
    coefficients: [],
    nonzero: [],
    devianceRatio: [],
    nullDeviance: 0,
    converged: true,
    warnings,
  };
  let W = 0;
  for (let i = 0; i < s.n; i++) W += problem.weights ? problem.weights[i] : 1;
  out.nullDeviance = nullDev * W;
  for (let k = 0; k < lambdas.length; k++) {
    // As in glmnet, the first point of an automatic sequence is the null model (λ = λ_max, or ∞ for a ridge).
    const sol =
      k === 0 && !o.lambda
        ? {
            b0: start.b0,
            b: new Float64Array(s.p),
            converged: true,
            iterations: 0,
            objective: nullDev / 2,
            meanDeviance: nullDev,
          }
        : solveAtLambda(s, lambdas[k], alpha, start, o);
    const fit = assemble(s, problem, alpha, lambdas[k], sol);
    const ratio = 1 - sol.meanDeviance / nullDev;
    out.lambda.push(lambdas[k]);
    out.coefficients.push(Array.from(fit.coefficients));
    out.nonzero.push(fit.nonzero);
    out.devianceRatio.push(ratio);
    if (!sol.converged) out.converged = false;
    start = { b0: sol.b0, b: sol.b };
    if (o.earlyStop && !o.lambda && k >= 4 && (ratio - out.devianceRatio[k - 1] < 1e-5 || ratio > 0.999)) break;
  }
  if (!out.converged) {
    warnings.push(
      warning(
        'not-converged',
        'The penalised fit did not converge at every λ.',
        'Raise the iteration limit, or use a larger smallest λ (a larger λ ratio).',
      ),
    );
  }
  return out;
}

function checkUserLambda(lambda: number[]): number[] {
  if (lambda.length === 0) throw new FulcraError('bad-lambda', 'The λ sequence is empty.');
  for (let k = 0; k < lambda.length; k++) {
    if (!(lambda[k] >= 0) || !Number.isFinite(lambda[k]))
      throw new FulcraError('bad-lambda', `λ value ${lambda[k]} is not a finite number ≥ 0.`);
    if (k > 0 && lambda[k] > lambda[k - 1])
      throw new FulcraError('bad-lambda', 'The λ sequence must be decreasing (warm starts run from large to small λ).');
  }
  return lambda.slice();
}
