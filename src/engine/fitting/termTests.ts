import type { FitOptions, TermRow } from '../core/model';
import { pchisqUpper } from '../numerics/distributions';
import {
  chordBatch,
  chordConstrainedObjective,
  constrainedSolver,
  runSteps,
  traceStart,
  type ChordSteps,
  type ProfileTraces,
} from './chordSolve';
import { newtonLogistic, type NewtonResult } from './newton';
import { caseTotal, type PreparedFit } from './prepareFit';
import { limitFromStarts, neutralStart } from './separation';

/**
 * 2N·(objective with the given kept columns fixed at 0 − objective at the fit). When the fit is `separated`, `nr`
 * is its limit (fitToLimit) and the refit is taken to its limit too, from the intercept-only fit (neutralStart) and
 * from the fit, keeping the lower (limitFromStarts): from the diverged fit alone the refit can stay stuck where
 * fitted risks are 0 or 1 on the wrong side. The statistic is then the limiting one, between 0 and the null
 * deviance (the neutral start begins at the null deviance and Newton with step-halving only goes down).
 * Otherwise the constrained optimum is first solved by chord-Newton steps from the one-step estimate on the fit's
 * information (chordSolve.ts; a single held coefficient starts on its profile trace when `traces` has it), and
 * refitted only when that does not converge (or always when `exact`).
 */
function constrainedStat(
  prep: PreparedFit,
  nr: NewtonResult,
  zero: number[],
  o: FitOptions,
  separated: boolean,
  exact = false,
  traces?: ProfileTraces,
) {
  if (!separated && !exact) {
    const trace = zero.length === 1 ? traces?.get(zero[0]) : undefined;
    const start = trace ? traceStart(nr.beta, zero[0], trace.lower, trace.upper) : null;
    const obj = chordConstrainedObjective(
      { problem: prep.problem, beta: nr.beta, objective: nr.objective, H: nr.information },
      zero,
      start ?? undefined,
    );
    if (obj !== null) return Math.max(0, 2 * caseTotal(prep.problem) * (obj - nr.objective));
  }
  const fixed = new Uint8Array(prep.problem.p);
  for (const k of zero) fixed[k] = 1;
  const tol = Math.min(o.tol, 1e-12);
  const start = Float64Array.from(nr.beta);
  for (const k of zero) start[k] = 0;
  let r: NewtonResult;
  if (separated) {
    const neutral = neutralStart(prep.problem, fixed, new Float64Array(prep.problem.p));
    r = limitFromStarts({ ...prep.problem, fixed }, [neutral, start], tol);
  } else {
    r = newtonLogistic(
      { ...prep.problem, fixed, start },
      { tol, maxIter: Math.max(o.maxIter, 100), information: false },
    );
  }
  return Math.max(0, 2 * caseTotal(prep.problem) * (r.objective - nr.objective));
}

/**
 * Likelihood-ratio test of every term (its kept columns fixed at 0, one constrained refit each); with
 * `run` false (ridge, or term tests off) the rows carry only the degrees of freedom. For Firth fits the statistic
 * is the penalised-likelihood ratio (the penalty keeps the full model's information, Heinze & Schemper 2002);
 * under separation (`separated`, ML) it is the limiting deviance difference.
 */
export function termTests(...args: Parameters<typeof termTestSteps>): TermRow[] {
  return runSteps(termTestSteps(...args));
}

/** termTests as steps that yield their round of chord solves (fit.ts fitSteps). */
export function* termTestSteps(
  prep: PreparedFit,
  nr: NewtonResult,
  o: FitOptions,
  run: boolean,
  separated = false,
  /** Called after each term's refit (progress). */
  step?: () => void,
  exact = false,
  traces?: ProfileTraces,
): ChordSteps<TermRow[]> {
  const kIndex = new Map(prep.keep.map((j, k) => [j, k]));
  const terms = prep.design.termColumns.map((t) => ({
    t,
    kept: t.columns.filter((j) => kIndex.has(j)).map((j) => kIndex.get(j)!),
  }));
  const tested = run ? terms.filter((x) => x.kept.length > 0) : [];
  const chi2 = new Map<(typeof terms)[number], number>();
  if (!separated && !exact) {
    // The constrained optima by chord solves sharing passes (runChordSolvers); a solve that does not converge is
    // refitted as it finishes.
    const base = { problem: prep.problem, beta: nr.beta, objective: nr.objective, H: nr.information };
    const N = caseTotal(prep.problem);
    yield chordBatch(
      prep.problem,
      tested.map((x) => {
        const trace = x.kept.length === 1 ? traces?.get(x.kept[0]) : undefined;
        const start = trace ? traceStart(nr.beta, x.kept[0], trace.lower, trace.upper) : null;
        return (n: number) => constrainedSolver(base, x.kept, n, start ?? undefined);
      }),
      (i, obj) => {
        const x = tested[i];
        chi2.set(
          x,
          obj !== null ? Math.max(0, 2 * N * (obj - nr.objective)) : constrainedStat(prep, nr, x.kept, o, false, true),
        );
        step?.();
      },
    );
  } else
    for (const x of tested) {
      chi2.set(x, constrainedStat(prep, nr, x.kept, o, separated, exact, traces));
      step?.();
    }
  return terms.map((x) => {
    const { t, kept } = x;
    const c = chi2.get(x);
    if (c === undefined) return { name: t.name, columns: t.columns, df: kept.length, lrChi2: null, lrP: null };
    return { name: t.name, columns: t.columns, df: kept.length, lrChi2: c, lrP: pchisqUpper(c, kept.length) };
  });
}

/**
 * The whole-model likelihood-ratio test on pk − 1 df: null deviance − deviance for ML (the limiting deviance under
 * separation) and ridge; for Firth the penalised-likelihood ratio, every non-intercept column fixed at 0.
 */
export function modelTest(
  prep: PreparedFit,
  nr: NewtonResult,
  o: FitOptions,
  nullDev: number,
  deviance: number,
  exact = false,
) {
  const modelDf = prep.keep.length - 1;
  let modelLrChi2 = Math.max(0, nullDev - deviance);
  if (o.method === 'firth' && modelDf > 0) {
    const all = Array.from({ length: modelDf }, (_, k) => k + 1);
    modelLrChi2 = constrainedStat(prep, nr, all, o, false, exact);
  }
  return { modelDf, modelLrChi2, modelLrP: modelDf > 0 ? pchisqUpper(modelLrChi2, modelDf) : 1 };
}
