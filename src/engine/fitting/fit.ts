import { findAliased } from '../design/aliasing';
import { FulcraError, type Dataset } from '../core/data';
import { buildDesign, type Design } from '../design/design';
import { pchisqUpper } from '../numerics/distributions';
import { informationCriteria, nullDeviance, sandwich, waldTable } from './inference';
import { cholesky, choleskyInverse } from '../numerics/linalg';
import {
  defaultFitOptions,
  type CoefficientRow,
  type FitOptions,
  type FitResult,
  type ModelSpec,
  type TermRow,
} from '../core/model';
import { newtonLogistic, type LogisticProblem, type NewtonResult } from './newton';
import { profileInterval } from './profileCi';
import { detectSeparation } from './separation';
import { destandardiseMap, standardise, type Standardised } from '../numerics/standardise';
import { warning, type EngineWarning } from '../core/warnings';
import { allocF64 } from '../numerics/rowPool';

/** Options of this implementation beyond model.ts's FitOptions. */
export interface FitExtraOptions {
  /** Likelihood-ratio test per term (one constrained refit per term; default true). */
  termTests: boolean;
}
export type EngineFitOptions = FitOptions & FitExtraOptions;
export const defaultEngineFitOptions: EngineFitOptions = { ...defaultFitOptions, termTests: true };

/** Declared constraints of every fit option: one table, checked before any work is done. */
export const fitOptionTable: { [K in keyof EngineFitOptions]: { valid: (v: unknown) => boolean; expected: string } } = {
  method: { valid: (v) => v === 'ml' || v === 'ridge' || v === 'firth', expected: "'ml', 'ridge' or 'firth'" },
  lambda: { valid: (v) => typeof v === 'number' && Number.isFinite(v) && v >= 0, expected: 'a finite number ≥ 0' },
  tol: { valid: (v) => typeof v === 'number' && v > 0 && v < 1, expected: 'a number between 0 and 1' },
  maxIter: {
    valid: (v) => Number.isInteger(v) && (v as number) >= 1 && (v as number) <= 10_000,
    expected: 'an integer from 1 to 10000',
  },
  level: { valid: (v) => typeof v === 'number' && v > 0 && v < 1, expected: 'a number between 0 and 1 (e.g. 0.95)' },
  profile: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
  termTests: { valid: (v) => typeof v === 'boolean', expected: 'true or false' },
};

/** Fills defaults and checks every option against fitOptionTable; throws a FulcraError naming the bad value. */
export function validateFitOptions(options: Partial<EngineFitOptions> = {}): EngineFitOptions {
  for (const key of Object.keys(options)) {
    if (!(key in fitOptionTable)) {
      throw new FulcraError(
        'bad-option',
        `Unknown fit option "${key}". Known options: ${Object.keys(fitOptionTable).join(', ')}.`,
      );
    }
  }
  const o = { ...defaultEngineFitOptions, ...options };
  for (const key of Object.keys(fitOptionTable) as (keyof EngineFitOptions)[]) {
    const v = o[key];
    if (!fitOptionTable[key].valid(v)) {
      throw new FulcraError(
        'bad-option',
        `Fit option ${key} = ${JSON.stringify(v)} is not valid; expected ${fitOptionTable[key].expected}.`,
      );
    }
  }
  if (o.method === 'ridge' && !(o.lambda > 0)) {
    throw new FulcraError(
      'bad-option',
      `Ridge needs lambda > 0, got ${o.lambda}.`,
      'Set lambda, or use method "ml" for an unpenalised fit.',
    );
  }
  return o;
}

/**
 * Everything the fit and its profiles share. To save memory the design matrix is standardised in place:
 * design.X holds the centred and scaled columns (std.Z is the same array).
 */
export interface PreparedFit {
  design: Design;
  std: Standardised;
  /** Indices of the non-aliased design columns, in order (0 = intercept). */
  keep: number[];
  aliased: boolean[];
  /** Problem on the standardised kept columns. */
  problem: LogisticProblem;
  warnings: EngineWarning[];
}

/** Builds the design, checks the outcome classes, standardises, drops aliased columns and sets up the problem. */
export function prepareFit(data: Dataset, spec: ModelSpec, o: FitOptions): PreparedFit {
  const design = buildDesign(data, spec);
  const warnings = [...design.warnings];
  const { X, n, p, y } = design;
  let events = 0;
  for (let i = 0; i < n; i++) events += y[i];
  if (events === 0 || events === n) {
    throw new FulcraError(
      'one-outcome-class',
      `Every one of the ${n} rows used has the same outcome (${events === 0 ? 'no' : 'all'} "${design.recipe.event}" events in "${spec.outcome}"); a risk model needs both events and non-events.`,
      'Check the outcome column and the event level.',
    );
  }
  const std = standardise(X, n, p, true);
  const ali = findAliased(std.Z, n, p, design.columnNames, design.columnTerms);
  warnings.push(...ali.warnings);
  const keep = ali.aliased.flatMap((a, j) => (a ? [] : [j]));
  let Zk = std.Z;
  if (keep.length < p) {
    Zk = allocF64(n * keep.length);
    keep.forEach((j, k) => Zk.set(std.Z.subarray(j * n, (j + 1) * n), k * n));
  }
  const problem: LogisticProblem = { X: Zk, n, p: keep.length, y };
  if (o.method === 'ridge') problem.penalty = Float64Array.from(keep, (j) => (j === 0 ? 0 : o.lambda));
  if (o.method === 'firth') problem.firth = true;
  return { design, std, keep, aliased: ali.aliased, problem, warnings };
}

/** β on the original scale (length p, aliased columns 0) from the coefficients of the kept standardised columns. */
export function originalScaleBeta(prep: PreparedFit, betaKept: ArrayLike<number>): Float64Array {
  const p = prep.design.p;
  const b = new Float64Array(p);
  prep.keep.forEach((j, k) => (b[j] = betaKept[k]));
  const out = new Float64Array(p);
  out[0] = b[0];
  for (let j = 1; j < p; j++) {
    if (b[j] === 0) continue;
    out[j] = b[j] / prep.std.scale[j];
    out[0] -= b[j] * prep.std.centerOverScale[j];
  }
  return out;
}

/** 2N·(objective with the given kept columns fixed at 0 − objective at the fit). */
function constrainedStat(prep: PreparedFit, nr: NewtonResult, zero: number[], o: FitOptions): number {
  const fixed = new Uint8Array(prep.problem.p);
  const start = Float64Array.from(nr.beta);
  for (const k of zero) {
    fixed[k] = 1;
    start[k] = 0;
  }
  const r = newtonLogistic(
    { ...prep.problem, fixed, start },
    { tol: Math.min(o.tol, 1e-12), maxIter: Math.max(o.maxIter, 100), information: false },
  );
  return Math.max(0, 2 * prep.problem.n * (r.objective - nr.objective));
}

/**
 * Fits a logistic regression of `spec.outcome` on `spec.terms` by maximum likelihood, ridge (glmnet's objective
 * on standardised columns, intercept unpenalised) or Firth's penalised likelihood, with complete-case rows.
 * Coefficients are on the original scale, intercept first. Wald and profile-likelihood CIs (ML: profile deviance;
 * Firth: profile penalised likelihood), per-term and whole-model likelihood-ratio tests; ridge fits carry no
 * inference table. Data problems (separation, aliasing, few events, dropped rows) are coded warnings.
 * Cost: one Newton fit, plus one constrained refit per term (termTests) and about 2×4 per coefficient (profile).
 */
export function fit(data: Dataset, spec: ModelSpec, options: Partial<EngineFitOptions> = {}): FitResult {
  const o = validateFitOptions(options);
  const prep = prepareFit(data, spec, o);
  const { design, std, keep, problem, warnings } = prep;
  const { n, p, y, columnNames, columnTerms } = design;
  const pk = keep.length;
  const ridge = o.method === 'ridge';

  const nr = newtonLogistic(problem, { tol: o.tol, maxIter: o.maxIter, recordPath: o.method === 'ml' });
  const sep = o.method === 'ml' ? detectSeparation(nr, y) : { kind: 'none' as const, columns: [], determinedRows: 0 };
  const sepCols = new Set(sep.columns.map((k) => keep[k]));
  if (sep.kind !== 'none') {
    const terms = [...new Set([...sepCols].map((j) => columnTerms[j]))];
    const what =
      sep.kind === 'complete'
        ? 'complete separation: the predictors split events from non-events perfectly'
        : `quasi-complete separation: ${sep.determinedRows} of ${n} rows are predicted perfectly`;
    warnings.push(
      warning(
        sep.kind === 'complete' ? 'complete-separation' : 'quasi-separation',
        `The data show ${what}, so the maximum-likelihood estimates for ${terms.map((t) => `"${t}"`).join(', ')} do not exist (they grow without bound); the values shown for them are where the iterations stopped and have no standard errors.`,
        'Refit with the Firth method (bias-reduced, finite estimates) or a ridge penalty, or merge sparse categories.',
        terms,
      ),
    );
  } else if (!nr.converged) {
    warnings.push(
      warning(
        'not-converged',
        `The fit did not converge in ${o.maxIter} iterations.`,
        'Increase the iteration limit, or check for extreme or nearly duplicated predictors.',
      ),
    );
  }

  const beta = originalScaleBeta(prep, nr.beta);
  const A = destandardiseMap(std);
  let covariance: Float64Array | null = null;
  if (!ridge) {
    const inv = choleskyInverse(cholesky(nr.information, pk));
    const full = new Float64Array(p * p);
    keep.forEach((i, a) => keep.forEach((j, b) => (full[i * p + j] = inv[a * pk + b])));
    covariance = sandwich(A, full, p);
    if (!covariance.every(Number.isFinite)) covariance = null;
  }
  // Under separation only the columns that do not diverge keep their (limiting) Wald inference.
  const wald = covariance ? waldTable(beta, covariance, o.level) : [];
  if (sep.kind !== 'none') covariance = null;

  const profiles: ({ lower: number | null; upper: number | null } | null)[] = new Array(p).fill(null);
  if (o.profile && covariance && sep.kind === 'none') {
    keep.forEach((j, k) => {
      if (j > 0)
        profiles[j] = profileInterval(
          {
            problem,
            beta: nr.beta,
            objective: nr.objective,
            index: k,
            scale: std.scale[j],
            estimate: beta[j],
            se: wald[j]?.se ?? NaN,
          },
          o.level,
        );
    });
    // The original intercept is a coordinate only of the uncentred design: shift the columns back in place
    // (x/s = z + m/s), profile coordinate 0, then centre them again.
    const Zk = problem.X;
    const shift = (sign: 1 | -1) =>
      keep.forEach((j, k) => {
        if (j === 0) return;
        const c = sign * std.centerOverScale[j];
        for (let i = 0; i < n; i++) Zk[k * n + i] += c;
      });
    shift(1);
    try {
      const b0 = Float64Array.from(nr.beta);
      b0[0] = beta[0];
      profiles[0] = profileInterval(
        { problem, beta: b0, objective: nr.objective, index: 0, scale: 1, estimate: beta[0], se: wald[0]?.se ?? NaN },
        o.level,
      );
    } finally {
      shift(-1);
    }
  }

  const coefficients: CoefficientRow[] = columnNames.map((name, j) => {
    const w = sepCols.has(j) ? null : (wald[j] ?? null);
    const or = Math.exp(beta[j]);
    return {
      name,
      term: columnTerms[j],
      estimate: beta[j],
      se: w?.se ?? null,
      z: w?.z ?? null,
      p: w?.p ?? null,
      waldLower: w?.lower ?? null,
      waldUpper: w?.upper ?? null,
      profileLower: profiles[j]?.lower ?? null,
      profileUpper: profiles[j]?.upper ?? null,
      oddsRatio: Number.isFinite(or) ? or : Number.MAX_VALUE,
      aliased: prep.aliased[j],
    };
  });

  const kIndex = new Map(keep.map((j, k) => [j, k]));
  const terms: TermRow[] = design.termColumns.map((t) => {
    const kept = t.columns.filter((j) => kIndex.has(j)).map((j) => kIndex.get(j)!);
    if (ridge || !o.termTests || kept.length === 0)
      return { name: t.name, columns: t.columns, df: kept.length, lrChi2: null, lrP: null };
    const chi2 = constrainedStat(prep, nr, kept, o);
    return { name: t.name, columns: t.columns, df: kept.length, lrChi2: chi2, lrP: pchisqUpper(chi2, kept.length) };
  });

  const deviance = -2 * nr.logLik;
  const nullDev = nullDeviance(y);
  const modelDf = pk - 1;
  let modelLrChi2 = Math.max(0, nullDev - deviance);
  if (o.method === 'firth' && modelDf > 0)
    modelLrChi2 = constrainedStat(
      prep,
      nr,
      Array.from({ length: modelDf }, (_, k) => k + 1),
      o,
    );
  const modelLrP = modelDf > 0 ? pchisqUpper(modelLrChi2, modelDf) : 1;
  const { aic, bic } = informationCriteria(deviance, pk, n);

  let events = 0;
  for (let i = 0; i < n; i++) events += y[i];
  const nonEvents = n - events;
  const minority = Math.min(events, nonEvents);
  const parameters = pk - 1;
  const eventsPerParameter = minority / Math.max(parameters, 1);
  if (minority < parameters) {
    warnings.push(
      warning(
        'few-events',
        `There are ${minority} ${events <= nonEvents ? 'events' : 'non-events'} for ${parameters} estimated coefficients; the model cannot be estimated reliably.`,
        'Use fewer predictors (or fewer categories/knots), or the Firth or ridge method.',
      ),
    );
  } else if (eventsPerParameter < 10) {
    warnings.push(
      warning(
        'low-events-per-parameter',
        `${eventsPerParameter.toFixed(1)} ${events <= nonEvents ? 'events' : 'non-events'} per estimated coefficient (fewer than the common rule of thumb of 10); estimates may be biased away from zero and the model may be overfitted.`,
        "Consider fewer predictors, Firth's method, or a ridge penalty, and validate internally.",
      ),
    );
  }
  if (ridge) {
    warnings.push(
      warning(
        'penalised-no-inference',
        `Ridge estimates (λ = ${o.lambda.toPrecision(4)}) are shrunk towards zero on purpose, so standard errors, p-values, confidence intervals, likelihood-ratio tests and AIC/BIC are not valid and are not shown.`,
        'Use bootstrap validation to judge the model, or refit with maximum likelihood or Firth for an inference table.',
      ),
    );
  }

  return {
    method: o.method,
    lambda: ridge ? o.lambda : 0,
    level: o.level,
    converged: nr.converged,
    iterations: nr.iterations,
    coefficients,
    terms,
    deviance,
    nullDeviance: nullDev,
    logLik: nr.logLik,
    aic: ridge ? null : aic,
    bic: ridge ? null : bic,
    modelLrChi2: ridge ? null : modelLrChi2,
    modelDf,
    modelLrP: ridge ? null : modelLrP,
    nUsed: n,
    nDropped: design.nDropped,
    droppedByColumn: design.droppedByColumn,
    events,
    nonEvents,
    parameters,
    eventsPerParameter,
    covariance: covariance ? Array.from(covariance) : null,
    recipe: design.recipe,
    warnings,
  };
}
