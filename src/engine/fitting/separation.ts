import { newtonLogistic, type LogisticProblem, type NewtonResult } from './newton';
import { warning, type EngineWarning } from '../core/warnings';

export interface SeparationCheck {
  kind: 'none' | 'complete' | 'quasi';
  /** Kept columns (indices into the fitted problem, 0 = intercept) whose original-scale coefficients diverge. */
  columns: number[];
  /** Per kept column, the side its original-scale coefficient runs off to: +1, −1, or 0 when it stays finite. */
  direction: number[];
  /** Rows whose fitted risk equals the outcome to within 1e-8. */
  determinedRows: number;
}

/** No separation, for a fit of `p` kept columns (`determined` rows at 0/1 all the same). */
export const noSeparation = (p: number, determined = 0): SeparationCheck => ({
  kind: 'none',
  columns: [],
  direction: new Array(p).fill(0),
  determinedRows: determined,
});

/** Share of the largest change below which a coefficient's change counts as the decay of a finite limit. */
const DIVERGING_SHARE = 1e-3;

/**
 * Detects complete and quasi-complete separation (Albert & Anderson 1984, Biometrika 71:1) from a maximum-likelihood
 * Newton run with recordPath: under separation the coefficients move by a roughly constant amount per iteration
 * without converging while some fitted risks reach 0 or 1. Complete: every row is determined; quasi: some are.
 * A coefficient diverges when its change over the last five iterations, in units of the linear predictor (a slope's
 * change times the largest |x| of its column in the fitted design `X`, the centred standardised kept columns; the
 * intercept's on the original scale, Δb₀ − Σ Δb_j·m_j/s_j from `centerOverScale`, indexed like the kept columns),
 * is at least 1e-3 of the largest slope change, which must exceed 0.5; a finite coefficient's changes decay
 * geometrically, a diverging one's do not.
 */
export function detectSeparation(
  fit: NewtonResult,
  y: ArrayLike<number>,
  centerOverScale?: ArrayLike<number>,
  X?: Float64Array,
): SeparationCheck {
  const n = y.length;
  const p = fit.beta.length;
  let determined = 0;
  for (let i = 0; i < n; i++) {
    const r = y[i] === 1 ? 1 - fit.fitted[i] : fit.fitted[i];
    if (r < 1e-8) determined++;
  }
  const path = fit.path ?? [];
  if (fit.converged || determined === 0 || path.length < 2) return noSeparation(p, determined);
  const a = path[Math.max(0, path.length - 6)],
    b = path[path.length - 1];
  const change = Array.from({ length: p }, (_, j) => b[j] - a[j]);
  if (centerOverScale) for (let j = 1; j < p; j++) change[0] -= change[j] * centerOverScale[j];
  // in units of the linear predictor: the largest change of any ηᵢ a column's change makes (a rare binary column
  // has a small SD, so a small change of its standardised coefficient moves its rows' η a lot)
  if (X)
    for (let j = 1; j < p; j++) {
      let m = 0;
      for (let i = 0; i < n; i++) m = Math.max(m, Math.abs(X[j * n + i]));
      change[j] *= m;
    }
  let max = 0;
  for (let j = 1; j < p; j++) max = Math.max(max, Math.abs(change[j]));
  if (!(max > 0.5)) return noSeparation(p, determined);
  const direction = change.map((d) => (Math.abs(d) >= DIVERGING_SHARE * max ? Math.sign(d) : 0));
  const columns = direction.flatMap((d, j) => (d !== 0 ? [j] : []));
  return { kind: determined === n ? 'complete' : 'quasi', columns, direction, determinedRows: determined };
}

/** Iterations per round of fitToLimit, and its cap on the rounds. */
const LIMIT_ROUND = 5,
  LIMIT_ROUNDS = 80;

/**
 * Newton from `problem.start` (exact Hessian) until it converges or, when the problem is separated, until the
 * deviance has reached its limit: rounds of LIMIT_ROUND iterations until a round changes the deviance by less
 * than 1e-13·(deviance + 0.1), i.e. until the fitted risks of the determined rows are 0 or 1 to machine precision
 * (each Newton step moves their linear predictors about one unit further, so their share of the deviance shrinks
 * geometrically), or until a round makes no progress. The deviance and objective returned are then the limiting
 * ones, to rounding.
 */
export function fitToLimit(problem: LogisticProblem, tol: number): NewtonResult {
  let r = newtonLogistic(problem, { tol, maxIter: LIMIT_ROUND, information: false, exactHessian: true });
  let iterations = r.iterations;
  for (let round = 1; round < LIMIT_ROUNDS && !r.converged && r.iterations > 0; round++) {
    const next = newtonLogistic(
      { ...problem, start: r.beta },
      { tol, maxIter: LIMIT_ROUND, information: false, exactHessian: true },
    );
    iterations += next.iterations;
    const settled = Math.abs(next.logLik - r.logLik) <= 0.5e-13 * (-2 * next.logLik + 0.1);
    r = next;
    if (settled) break;
  }
  return { ...r, iterations };
}

/**
 * fitToLimit from each start (coordinates in `problem.fixed` as set in each), keeping the lowest limiting
 * objective. Each run's objective bounds the infimum from above, so the lower one is the nearer: a start from
 * diverged coefficients can stay stuck where the data's risks sit at 0/1 on the wrong side, and a start far from
 * them (neutralStart) where every weight has underflowed.
 */
export function limitFromStarts(problem: LogisticProblem, starts: Float64Array[], tol: number): NewtonResult {
  let best: NewtonResult | null = null;
  for (const start of starts) {
    const r = fitToLimit({ ...problem, start }, tol);
    if (best === null || r.objective < best.objective) best = r;
  }
  return best!;
}

/**
 * The start of a refit that must not inherit a diverged estimate: every free coefficient of the (centred,
 * standardised) problem at 0 except the intercept (column 0) at logit(ȳ), the intercept-only maximum, so the refit
 * begins at the null deviance and can only go down; coordinates in `fixed` at their values in `fixedValues`.
 */
export function neutralStart(
  problem: LogisticProblem,
  fixed: Uint8Array,
  fixedValues: ArrayLike<number>,
): Float64Array {
  const { y, n, p, weights: w } = problem;
  let s = 0;
  let N = 0;
  for (let i = 0; i < n; i++) {
    s += (w ? w[i] : 1) * y[i];
    N += w ? w[i] : 1;
  }
  const start = new Float64Array(p);
  start[0] = Math.log(s / (N - s));
  for (let j = 0; j < p; j++) if (fixed[j]) start[j] = fixedValues[j];
  return start;
}

/**
 * The warning for separation, naming every diverging coefficient (`columns`, original design indices, the
 * intercept included) and listing their terms, or for a fit that stopped without converging after `maxIter`
 * iterations; null when neither applies.
 */
export function separationWarning(
  sep: SeparationCheck,
  columns: Set<number>,
  design: { columnNames: string[]; columnTerms: string[] },
  n: number,
  converged: boolean,
  maxIter: number,
): EngineWarning | null {
  if (sep.kind === 'none') {
    if (converged) return null;
    return warning(
      'not-converged',
      `The fit did not converge in ${maxIter} iterations.`,
      'Raise the iteration limit (fit option maxIter: Iteration limit on the page, --max-iter in npm run fit), ' +
        'or check for extreme or nearly duplicated predictors.',
    );
  }
  const sorted = [...columns].sort((a, b) => a - b);
  const names = sorted.map((j) => `"${design.columnNames[j]}"`).join(', ');
  const terms = [...new Set(sorted.map((j) => design.columnTerms[j]))];
  const what =
    sep.kind === 'complete'
      ? 'complete separation: the predictors split events from non-events perfectly'
      : `quasi-complete separation: ${sep.determinedRows} of ${n} rows ` +
        `${sep.determinedRows === 1 ? 'is' : 'are'} predicted perfectly`;
  const others =
    sep.kind === 'complete'
      ? 'No coefficient has a Wald test (the information vanishes in the limit); '
      : 'The other coefficients keep their limiting Wald tests; ';
  return warning(
    sep.kind === 'complete' ? 'complete-separation' : 'quasi-separation',
    `The data show ${what}, so the maximum-likelihood estimates of ${names} do not exist (they grow without ` +
      'bound); the values shown for them are where the iterations stopped, with no standard errors or Wald ' +
      'tests, and their profile limits are unbounded on the side they run off to. ' +
      others +
      'the likelihood-ratio tests use the limiting deviances.',
    'Refit with the Firth method (bias-reduced, finite estimates) or a ridge penalty, or merge sparse categories.',
    terms,
  );
}
