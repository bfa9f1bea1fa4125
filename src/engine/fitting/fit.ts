import type { Dataset } from '../core/data';
import type { CoefficientRow, FitResult, ModelSpec } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { destandardiseMap } from '../numerics/standardise';
import { validateFitOptions, type EngineFitOptions } from './fitOptions';
import { informationCriteria, nullDeviance, originalCovariance, waldTable, type WaldRow } from './inference';
import { newtonLogistic, type NewtonResult } from './newton';
import { caseTotal, eventCounts, originalScaleBeta, prepareFit, type PreparedFit } from './prepareFit';
import { runSteps, runStepsAsync, type ChordSteps, type ProfileTraces } from './chordSolve';
import { rowShards, type RowShards } from '../numerics/rowShards';
import { profileLimitSteps, separatedProfileLimits, type Limits } from './profileLimits';
import { detectSeparation, fitToLimit, noSeparation, separationWarning } from './separation';
import { modelTest, termTestSteps } from './termTests';

/**
 * Fits a logistic regression of `spec.outcome` on `spec.terms` by maximum likelihood, ridge (glmnet's objective
 * on standardised columns, intercept unpenalised) or Firth's penalised likelihood, with complete-case rows.
 * Coefficients are on the original scale, intercept first. Wald and profile-likelihood CIs (ML: profile deviance;
 * Firth: profile penalised likelihood), per-term and whole-model likelihood-ratio tests; ridge fits carry no
 * inference table. Data problems (separation, aliasing, few events, dropped rows) are coded warnings.
 * Cost: one Newton fit, plus a few passes over the rows per term test and per profile limit (chordSolve.ts; the
 * constrained refits of termTests / profileCi only where those do not converge, or for all with refitInference).
 * `progress(done, total)` is told after the Newton fit, each coefficient's profile limits and each term test
 * (synchronously: a worker passes it on to the page while it keeps computing).
 */
export function fit(
  data: Dataset,
  spec: ModelSpec,
  options: Partial<EngineFitOptions> = {},
  progress?: (done: number, total: number) => void,
): FitResult {
  return runSteps(fitSteps(data, spec, options, progress));
}

/**
 * fit with the passes of its profile limits and term tests shared with row shards (rowShards.ts: helper threads
 * without shared memory, e.g. in the single file); the same FitResult bit for bit. Without shards, fit.
 */
export async function fitAsync(
  data: Dataset,
  spec: ModelSpec,
  options: Partial<EngineFitOptions> = {},
  progress?: (done: number, total: number) => void,
  shards: RowShards | null = rowShards(),
): Promise<FitResult> {
  return shards ? runStepsAsync(fitSteps(data, spec, options, progress), shards) : fit(data, spec, options, progress);
}

/** fit as steps that yield their rounds of chord solves (profile limits, term tests). */
function* fitSteps(
  data: Dataset,
  spec: ModelSpec,
  options: Partial<EngineFitOptions>,
  progress?: (done: number, total: number) => void,
): ChordSteps<FitResult> {
  const o = validateFitOptions(options);
  const prep = prepareFit(data, spec, o);
  const { design, keep, warnings } = prep;
  const { n, p, y } = design;
  const ridge = o.method === 'ridge';
  const total = 1 + (o.profile ? keep.length : 0) + (!ridge && o.termTests ? design.termColumns.length : 0);
  let done = 0;
  const step = () => progress?.(++done, total);
  progress?.(0, total);

  const nrPath = newtonLogistic(prep.problem, { tol: o.tol, maxIter: o.maxIter, recordPath: o.method === 'ml' });
  const sep =
    o.method === 'ml'
      ? detectSeparation(
          nrPath,
          y,
          Float64Array.from(keep, (j) => prep.std.centerOverScale[j]),
          prep.problem.X,
        )
      : noSeparation(keep.length);
  const separated = sep.kind !== 'none';
  // Under separation every statistic is the limiting one: the deviance at the iterate where the determined rows'
  // risks are 0/1 to machine precision, and refits without a term taken to their limits likewise.
  const nr = separated ? fitToLimit({ ...prep.problem, start: nrPath.beta }, Math.min(o.tol, 1e-12)) : nrPath;
  const sepCols = new Set(sep.columns.map((k) => keep[k]));
  const sepWarning = separationWarning(sep, sepCols, design, n, nrPath.converged, o.maxIter);
  if (sepWarning) warnings.push(sepWarning);
  step();

  const beta = originalScaleBeta(prep, nrPath.beta);
  let covariance = ridge ? null : originalCovariance(nrPath.information, keep, p, destandardiseMap(prep.std));
  // Under quasi-separation only the coefficients that stay finite keep their (limiting) Wald inference; under
  // complete separation none do (every row is determined, the information vanishes).
  const wald = covariance && sep.kind !== 'complete' ? waldTable(beta, covariance, o.level) : [];
  if (separated) covariance = null;
  let profiles: Limits[] = [];
  const traces: ProfileTraces = new Map();
  if (o.profile && separated) profiles = separatedProfileLimits(prep, nr, sep, o.level, Math.min(o.tol, 1e-12));
  else if (o.profile && covariance)
    profiles = yield* profileLimitSteps(
      prep,
      nr,
      beta,
      (j) => wald[j]?.se ?? NaN,
      o.level,
      Math.max(o.maxIter, 100),
      step,
      o.refitInference,
      traces,
    );

  const deviance = -2 * nr.logLik;
  const w = prep.problem.weights;
  const cases = caseTotal(prep.problem);
  const nullDev = nullDeviance(y, w);
  const { modelDf, modelLrChi2, modelLrP } = modelTest(prep, nr, o, nullDev, deviance, o.refitInference);
  const { aic, bic } = informationCriteria(deviance, keep.length, cases);
  const counts = eventCounts(y, keep.length - 1, warnings, w);
  if (ridge) warnings.push(ridgeWarning(o.lambda));
  const coefficients = coefficientRows(
    prep.design,
    beta,
    prep.aliased,
    (j) => (sepCols.has(j) ? null : wald[j]),
    profiles,
  );
  const terms = yield* termTestSteps(prep, nr, o, !ridge && o.termTests, separated, step, o.refitInference, traces);

  return {
    method: o.method,
    lambda: ridge ? o.lambda : 0,
    level: o.level,
    converged: nrPath.converged,
    iterations: nrPath.iterations,
    coefficients,
    terms,
    deviance,
    nullDeviance: nullDev,
    logLik: nr.logLik,
    penalisedLogLik: o.method === 'firth' ? penalisedLogLik(prep, nr) : null,
    testLikelihood: o.method === 'firth' ? 'penalised' : 'ordinary',
    aic: ridge ? null : aic,
    bic: ridge ? null : bic,
    modelLrChi2: ridge ? null : modelLrChi2,
    modelDf,
    modelLrP: ridge ? null : modelLrP,
    nUsed: w ? cases : n,
    ...(w ? { rowsFitted: n } : {}),
    nDropped: design.nDropped,
    droppedByColumn: design.droppedByColumn,
    ...counts,
    covariance: covariance ? Array.from(covariance) : null,
    recipe: design.recipe,
    warnings,
  };
}

/** The inference table: one row per design column, with its Wald (or null) and profile limits. */
function coefficientRows(
  design: { columnNames: string[]; columnTerms: string[] },
  beta: Float64Array,
  aliased: boolean[],
  waldOf: (j: number) => WaldRow | null | undefined,
  profiles: Limits[],
): CoefficientRow[] {
  return design.columnNames.map((name, j) => {
    const w = waldOf(j) ?? null;
    const or = Math.exp(beta[j]);
    return {
      name,
      term: design.columnTerms[j],
      estimate: beta[j],
      se: w?.se ?? null,
      z: w?.z ?? null,
      p: w?.p ?? null,
      waldLower: w?.lower ?? null,
      waldUpper: w?.upper ?? null,
      profileLower: profiles[j]?.lower ?? null,
      profileUpper: profiles[j]?.upper ?? null,
      profileLowerUnbounded: profiles[j]?.lowerUnbounded === true,
      profileUpperUnbounded: profiles[j]?.upperUnbounded === true,
      oddsRatio: Number.isFinite(or) ? or : Number.MAX_VALUE,
      aliased: aliased[j],
    };
  });
}

/**
 * ℓ*(β̂) = ℓ + ½·log det X'WX on the original design: the solver's objective is on the standardised kept columns,
 * X_std = X·A with det A = Π 1/s_j (slopes), so log det X'WX = log det X_std'WX_std + 2·Σ log s_j.
 */
function penalisedLogLik(prep: PreparedFit, nr: NewtonResult): number {
  let logScale = 0;
  for (const j of prep.keep) if (j > 0) logScale += Math.log(prep.std.scale[j]);
  return -caseTotal(prep.problem) * nr.objective + logScale;
}

function ridgeWarning(lambda: number): EngineWarning {
  return warning(
    'penalised-no-inference',
    `Ridge estimates (λ = ${lambda.toPrecision(4)}) are shrunk towards zero on purpose, so standard errors, ` +
      'p-values, confidence intervals, likelihood-ratio tests and AIC/BIC are not valid and are not shown.',
    'Use bootstrap validation to judge the model, or refit with maximum likelihood or Firth for an inference table.',
  );
}
