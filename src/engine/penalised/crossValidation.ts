import { caseDeviance, sigmoid } from '../numerics/loss';
import { FulcraError } from '../core/data';
import type { PenalisedProblem } from './coordinateDescent';
import { countFolds, stratifiedFolds } from './folds';
import { lambdaPath, type LambdaPath, type PathOptions } from './lambdaPath';
import { createRng } from '../numerics/rng';
import { warning, type EngineWarning } from '../core/warnings';

/** Hooks for long loops: progress, cooperative cancellation, and a yield to the event loop (worker). */
export interface LongRunHooks {
  onProgress?: (done: number, total: number) => void;
  signal?: { aborted: boolean };
  tick?: () => Promise<void>;
}

/** Reports progress, yields, then throws FulcraError('cancelled') if the signal was raised. */
export async function checkpoint(hooks: LongRunHooks | undefined, done: number, total: number): Promise<void> {
  hooks?.onProgress?.(done, total);
  await hooks?.tick?.();
  if (hooks?.signal?.aborted) throw new FulcraError('cancelled', 'The run was cancelled.');
}

export type CvCriterion = 'deviance' | 'brier';

export interface CvOptions extends Partial<PathOptions> {
  /** Number of folds (default 10) or an explicit fold index per row (0-based, −1 = unused). */
  folds: number | Int32Array;
  seed: number;
  criterion: CvCriterion;
}

export const defaultCvOptions: CvOptions = { folds: 10, seed: 1, criterion: 'deviance' };

export interface CvPathRow {
  lambda: number;
  /** Mean out-of-fold error (fold means weighted by fold size). */
  error: number;
  /** Its standard error across folds. */
  se: number;
  nonzero: number;
}

export interface CvResult {
  alpha: number;
  criterion: CvCriterion;
  folds: number;
  seed: number;
  path: CvPathRow[];
  lambdaMin: number;
  lambda1se: number;
  indexMin: number;
  index1se: number;
  /** Full-data coefficients (original scale, intercept first) at λ_min and λ_1se. */
  coefficientsMin: number[];
  coefficients1se: number[];
  fullPath: LambdaPath;
  warnings: EngineWarning[];
}

/** Risk floor of the CV deviance, so one confident miss cannot dominate (cv.glmnet: p held in [1e-5, 1 − 1e-5]). */
const P_MIN = 1e-5;

function caseError(criterion: CvCriterion, y: number, eta: number): number {
  return criterion === 'brier' ? (y - sigmoid(eta)) ** 2 : caseDeviance(eta, y, P_MIN);
}

/**
 * K-fold cross-validation over the λ path of an elastic-net logistic model. The path is fitted on all rows;
 * each fold's model is refitted on the other folds over the same λ values (held-out rows get weight 0, so
 * the training rows' own standardisation is used) and scored on the held-out rows. Error per fold is the
 * weighted mean of the case errors; the CV error is the fold-size-weighted mean of fold errors and its SE
 * is sqrt(weighted variance of fold errors / (K − 1)) (the cv.glmnet conventions). λ_min minimises the CV
 * error; λ_1se is the largest λ whose error is within one SE of the minimum (Hastie, Tibshirani & Friedman,
 * Elements of Statistical Learning, 2nd ed., §7.10). Brier = mean (y − p)²; deviance = −2·loglik per case.
 */
export async function crossValidateLambda(
  problem: PenalisedProblem,
  alpha: number,
  options: Partial<CvOptions> = {},
  hooks?: LongRunHooks,
): Promise<CvResult> {
  const o = { ...defaultCvOptions, ...options };
  if (o.criterion !== 'deviance' && o.criterion !== 'brier') {
    throw new FulcraError(
      'bad-criterion',
      `The cross-validation criterion must be "deviance" or "brier"; got "${String(o.criterion)}".`,
    );
  }
  const { n, p, y } = problem;
  const w = problem.weights ?? new Float64Array(n).fill(1);
  const fold = typeof o.folds === 'number' ? stratifiedFolds(y, o.folds, createRng(o.seed), w) : o.folds;
  if (fold.length !== n)
    throw new FulcraError('bad-folds', `The fold assignment has ${fold.length} entries for ${n} rows.`);
  const K = countFolds(fold);
  const full = lambdaPath(problem, alpha, o);
  const warnings: EngineWarning[] = [...full.warnings];
  const L = full.lambda.length;
  const foldError = Array.from({ length: K }, () => new Float64Array(L));
  const foldWeight = new Float64Array(K);
  const wTrain = new Float64Array(n);
  let emptyClassFolds = 0;
  for (let f = 0; f < K; f++) {
    let ev = 0,
      ne = 0,
      evTrain = 0,
      neTrain = 0;
    for (let i = 0; i < n; i++) {
      wTrain[i] = fold[i] === f || fold[i] < 0 ? 0 : w[i];
      if (fold[i] === f) {
        foldWeight[f] += w[i];
        if (y[i] === 1) ev += w[i];
        else ne += w[i];
      } else if (wTrain[i] > 0) {
        if (y[i] === 1) evTrain += w[i];
        else neTrain += w[i];
      }
    }
    if (ev === 0 || ne === 0) emptyClassFolds++;
    if (evTrain === 0 || neTrain === 0) {
      throw new FulcraError(
        'fold-one-class',
        `Without fold ${f + 1}, the remaining rows hold only ${evTrain === 0 ? 'non-events' : 'events'}, so no ` +
          `model can be fitted for cross-validation.`,
        'Use fewer folds, or collect more events.',
      );
    }
    const fit = lambdaPath({ ...problem, weights: wTrain }, alpha, { ...o, lambda: full.lambda });
    if (!fit.converged) warnings.push(...fit.warnings.filter((x) => x.code === 'not-converged').slice(0, 1));
    for (let k = 0; k < L; k++) {
      const b = fit.coefficients[k];
      let e = 0;
      for (let i = 0; i < n; i++) {
        if (fold[i] !== f || !(w[i] > 0)) continue;
        let eta = b[0];
        for (let j = 0; j < p; j++) eta += b[j + 1] * problem.X[j * n + i];
        e += w[i] * caseError(o.criterion, y[i], eta);
      }
      foldError[f][k] = e / foldWeight[f];
    }
    await checkpoint(hooks, f + 1, K);
  }
  const W = foldWeight.reduce((a, b) => a + b, 0);
  const path: CvPathRow[] = full.lambda.map((lambda, k) => {
    let m = 0;
    for (let f = 0; f < K; f++) m += (foldWeight[f] * foldError[f][k]) / W;
    let v = 0;
    for (let f = 0; f < K; f++) v += (foldWeight[f] * (foldError[f][k] - m) ** 2) / W;
    return { lambda, error: m, se: Math.sqrt(v / (K - 1)), nonzero: full.nonzero[k] };
  });
  let indexMin = 0;
  for (let k = 1; k < L; k++) if (path[k].error < path[indexMin].error) indexMin = k;
  const bound = path[indexMin].error + path[indexMin].se;
  let index1se = indexMin;
  for (let k = 0; k <= indexMin; k++) {
    if (path[k].error <= bound) {
      index1se = k;
      break;
    }
  }
  if (emptyClassFolds > 0) {
    warnings.push(
      warning(
        'fold-one-class',
        `${emptyClassFolds} of ${K} folds hold rows of only one outcome class.`,
        'Use fewer folds, so each fold holds both events and non-events.',
      ),
    );
  }
  if (indexMin === L - 1 && L > 1) {
    warnings.push(
      warning(
        'lambda-at-edge',
        'The smallest cross-validated error is at the smallest λ of the path.',
        'The best penalty may be weaker still: lower the λ ratio to extend the path.',
      ),
    );
  }
  return {
    alpha,
    criterion: o.criterion,
    folds: K,
    seed: o.seed,
    path,
    lambdaMin: path[indexMin].lambda,
    lambda1se: path[index1se].lambda,
    indexMin,
    index1se,
    coefficientsMin: full.coefficients[indexMin],
    coefficients1se: full.coefficients[index1se],
    fullPath: full,
    warnings,
  };
}
