import { FulcraError, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { linearPredictorFromRecipe } from '../design/design';
import { fit, fitAsync } from '../fitting/fit';
import { designColumnCount } from '../fitting/memoryBudget';
import { oddsRatio } from '../fitting/oddsRatio';
import { sumCrossEntropy } from '../numerics/loss';
import type { LongRunHooks } from '../penalised/crossValidation';
import { fitPipeline, type Pipeline } from '../validation/pipeline';
import { alphaOf, type AnalysisRequest, type LambdaRule } from './request';

/**
 * The seconds profile-likelihood limits and term tests take on one thread, from their passes over the rows: every
 * limit and every term's constrained fit is solved by chord-Newton steps from the fit's information
 * (fitting/chordSolve.ts), one pass over the rows per step, two points per load of X. A pass costs about
 * 7·10⁻⁹ s per row (the row maths: one e^x, a division; the log once per block of rows) plus 3.5·10⁻¹⁰ s per design
 * cell with the WebAssembly SIMD kernels, the row maths included (wasmPasses.ts; measured 2026-12-05 in lockstep
 * rounds of 8, one thread: 7.4 ms a point at 10⁶ × 2, 13.1 ms at 10⁶ × 21, 2.4–2.9 ms at 10⁵ × 51; before the row
 * maths were SIMD, 1.2·10⁻⁸ and 5·10⁻¹⁰). A host without them gives the same record, at two to three times the time.
 * Passes per limit fall as the rows grow, since the profile log-likelihood is closer to its quadratic: measured on
 * the 2-core development machine on the seeded synthetic files (src/cli/bench/synth.ts), 2.8 per limit at
 * 10⁵ × 50 (2026-12-04) and 2.0 at 10⁶ × 20 (84 points for 42 limits, 2026-12-05; 3.0 s on one thread); taken as 3
 * up to 10⁵ rows, 2 from 10⁶, in between linear in log₁₀ n. Term tests: 3.3 passes per term at 10⁵ × 50 and 4.0 at
 * 10⁶ × 20 (80 points and 2 information passes for 20 terms, 3.5 s on one thread; the constrained fits lie further
 * from the estimate as the rows grow), taken as 4. A Firth pass also takes X'WX and the hat values, about p/2 passes
 * more.
 */
const PASS_ROW_S = 7e-9;
const PASS_CELL_S = 3.5e-10;
const PASSES_PER_TERM = 4;

/** Passes per profile limit at n rows (see above). */
function passesPerLimit(n: number): number {
  return 3 - Math.min(1, Math.max(0, Math.log10(n) - 5));
}

export function inferenceSeconds(
  n: number,
  p: number,
  terms: number,
  firth = false,
): { profile: number; termTests: number } {
  const pass = n * (PASS_ROW_S + p * PASS_CELL_S) * (firth ? 1 + p / 2 : 1);
  return { profile: 2 * p * passesPerLimit(n) * pass, termTests: terms * PASSES_PER_TERM * pass };
}

/**
 * Profile limits, and term tests, are computed when each is estimated to take at most this long on one thread
 * (estimated at 10⁵ rows × 50 columns 0.76 s and 0.50 s, at 10⁶ × 20 1.2 s and 1.15 s, at 10⁶ × 40 3.5 s and
 * 3.4 s; measured 2026-12-05 on the development machine's two threads with the SIMD row maths: the profile limits
 * at 10⁶ × 40 2.7 s, so at this budget's edge, about 10⁶ × 44, they take about 3 s there), else skipped with a
 * notice. At 10⁶ rows the edge was about 34 columns before the row maths were SIMD.
 * The rule depends only on the data's size, never on the threads at hand, so every host gives the same record.
 */
export const INFERENCE_BUDGET_S = 4;

/** How λ of a penalised fit was set, with the cross-validation path when it was chosen by CV. */
export interface LambdaRecord {
  rule: LambdaRule | 'fixed';
  alpha: number;
  chosen: number;
  /** λ with the lowest CV error and by the one-standard-error rule (null for a fixed λ). */
  lambdaMin: number | null;
  lambda1se: number | null;
  folds: number | null;
  path: { lambda: number; cvError: number; cvSe: number; nonzero: number }[];
}

export interface FitStep {
  /** ML, Firth and ridge with their inference record; lasso and elastic net in the same shape, inference null. */
  fit: FitResult;
  lambda: LambdaRecord | null;
  /** Notices of the method decisions (large data, penalised inference) and of λ selection. */
  warnings: EngineWarning[];
}

/** The model-building procedure of a request as a Pipeline (what bootstrap and repeated CV re-run). */
export function pipelineOf(data: Dataset, r: AnalysisRequest): Pipeline {
  const alpha = alphaOf(r);
  const fixedRidge = r.method === 'ridge' && typeof r.lambda === 'number';
  const { level, maxIter } = r;
  return {
    data,
    spec: r.spec,
    fitOptions: fixedRidge
      ? { method: 'ridge', lambda: r.lambda as number, level, profile: false, maxIter }
      : { method: r.method === 'firth' ? 'firth' : 'ml', level, profile: r.profile, maxIter },
    penalty:
      alpha !== null && !fixedRidge
        ? { alpha, lambda: r.lambda, folds: r.folds, criterion: 'deviance', nLambda: 100 }
        : null,
    seed: r.seed,
  };
}

/** Profile intervals and term tests only where they take seconds, not minutes; a notice for each one skipped. */
export function largeDataPlan(
  data: Dataset,
  r: AnalysisRequest,
): { profile: boolean; termTests: boolean; warnings: EngineWarning[] } {
  const cost = inferenceSeconds(data.nRows, designColumnCount(data, r.spec), r.spec.terms.length, r.method === 'firth');
  const profile = r.profile && cost.profile <= INFERENCE_BUDGET_S;
  const termTests = r.termTests && cost.termTests <= INFERENCE_BUDGET_S;
  const rows = data.nRows.toLocaleString('en');
  const warnings: EngineWarning[] = [];
  if (!profile && r.profile) {
    warnings.push(
      warning(
        'large-data-wald-only',
        `With ${rows} rows, profile-likelihood intervals were not computed ` +
          `(they would take over ${INFERENCE_BUDGET_S} s of computing); ` +
          'the Wald intervals shown agree closely with them at this sample size.',
        'Fit a random sample of rows if you need profile-likelihood intervals.',
      ),
    );
  }
  if (!termTests && r.termTests) {
    warnings.push(
      warning(
        'large-data-no-term-tests',
        `With ${rows} rows, the likelihood-ratio test of each term was not computed (they would take over ` +
          `${INFERENCE_BUDGET_S} s of computing).`,
        'Use the Wald p-values, or fit a random sample of rows for the term tests.',
      ),
    );
  }
  return { profile, termTests, warnings };
}

/**
 * Decides the method and fits it: maximum likelihood, Firth and fixed-λ ridge by fit(); ridge, lasso and
 * elastic net with λ by cross-validation (or a fixed λ) by the penalised pipeline (glmnet's objective,
 * Friedman, Hastie & Tibshirani 2010). Ridge is then refitted by fit() at the chosen λ; lasso and elastic-net
 * estimates go into the FitResult shape with no inference (see penalisedRecord).
 */
export async function fitStep(data: Dataset, r: AnalysisRequest, hooks?: LongRunHooks): Promise<FitStep> {
  const plan = largeDataPlan(data, r);
  const warnings = [...plan.warnings];
  const { level, maxIter } = r;
  if (r.method === 'ml' || r.method === 'firth') {
    // fitAsync: profile limits and term tests share their passes with row shards when the host installed any
    const f = await fitAsync(
      data,
      r.spec,
      { method: r.method, level, maxIter, profile: plan.profile, termTests: plan.termTests },
      hooks?.onProgress,
    );
    return { fit: f, lambda: null, warnings };
  }
  const noInference = { level, maxIter, profile: false, termTests: false };
  if (r.method === 'ridge' && typeof r.lambda === 'number') {
    const f = fit(data, r.spec, { method: 'ridge', lambda: r.lambda, ...noInference });
    return { fit: f, lambda: { ...FIXED, alpha: 0, chosen: r.lambda }, warnings };
  }
  const pf = await fitPipeline(pipelineOf(data, r), hooks);
  const cv = pf.cv;
  const lambda: LambdaRecord = cv
    ? {
        rule: r.lambda as LambdaRule,
        alpha: cv.alpha,
        chosen: pf.lambda,
        lambdaMin: cv.path[cv.indexMin].lambda,
        lambda1se: cv.path[cv.index1se].lambda,
        folds: cv.folds,
        path: cv.path.map((p) => ({ lambda: p.lambda, cvError: p.error, cvSe: p.se, nonzero: p.nonzero })),
      }
    : { ...FIXED, alpha: alphaOf(r)!, chosen: pf.lambda };
  warnings.push(...pf.warnings);
  if (r.method === 'ridge') {
    const f = fit(data, r.spec, { method: 'ridge', lambda: pf.lambda, ...noInference });
    return { fit: f, lambda, warnings };
  }
  // Only the record's shape (design, counts, recipe): the default iteration limit, not the request's.
  const base = fit(data, r.spec, { method: 'ml', level, profile: false, termTests: false });
  const estimates = pf.coefficients.map((c) => c.estimate);
  warnings.push(
    warning(
      'penalised-no-inference',
      'Penalised estimates are shrunk towards zero on purpose, so no valid confidence intervals or p-values ' +
        'exist for them.',
      'Use bootstrap validation to judge the model; use the standard or Firth fit if you need intervals.',
    ),
  );
  return { fit: penalisedRecord(base, estimates, data, pf.lambda, alphaOf(r)!), lambda, warnings };
}

const FIXED = { rule: 'fixed' as const, lambdaMin: null, lambda1se: null, folds: null, path: [] };

/**
 * A lasso / elastic-net fit in the FitResult shape of the unpenalised fit `base` (same design, counts and
 * recipe): the penalised estimates, no inference (SEs, p-values, CIs, LR tests, AIC/BIC null), and the
 * deviance and log-likelihood at the penalised estimate (the stable cross-entropy of numerics/loss).
 */
export function penalisedRecord(
  base: FitResult,
  beta: number[],
  data: Dataset,
  lambda: number,
  alpha: number,
): FitResult {
  const d = linearPredictorFromRecipe(base.recipe, beta, data);
  if (!d.y) throw new FulcraError('no-outcome', `The outcome column "${base.recipe.outcome}" is missing.`);
  const logLik = -sumCrossEntropy(d.eta, d.y, d.weights ?? undefined);
  const nonzero = beta.slice(1).filter((b) => b !== 0).length;
  const none = { se: null, z: null, p: null, waldLower: null, waldUpper: null, profileLower: null, profileUpper: null };
  return {
    ...base,
    method: alpha === 1 ? 'lasso' : alpha === 0 ? 'ridge' : 'elastic-net',
    alpha,
    lambda,
    coefficients: base.coefficients.map((c, j) => ({
      ...c,
      estimate: beta[j],
      oddsRatio: oddsRatio(beta[j]),
      ...none,
    })),
    terms: base.terms.map((t) => ({ ...t, lrChi2: null, lrP: null })),
    deviance: -2 * logLik,
    logLik,
    aic: null,
    bic: null,
    modelLrChi2: null,
    modelDf: nonzero,
    modelLrP: null,
    covariance: null,
    warnings: base.warnings.filter((w) => w.code !== 'complete-separation' && w.code !== 'quasi-separation'),
  };
}
