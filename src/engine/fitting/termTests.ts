import type { FitOptions, TermRow } from '../core/model';
import { pchisqUpper } from '../numerics/distributions';
import { newtonLogistic, type NewtonResult } from './newton';
import type { PreparedFit } from './prepareFit';

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
 * Likelihood-ratio test of every term (its kept columns fixed at 0, one constrained refit each); with
 * `run` false (ridge, or term tests off) the rows carry only the degrees of freedom.
 */
export function termTests(prep: PreparedFit, nr: NewtonResult, o: FitOptions, run: boolean): TermRow[] {
  const kIndex = new Map(prep.keep.map((j, k) => [j, k]));
  return prep.design.termColumns.map((t) => {
    const kept = t.columns.filter((j) => kIndex.has(j)).map((j) => kIndex.get(j)!);
    if (!run || kept.length === 0)
      return { name: t.name, columns: t.columns, df: kept.length, lrChi2: null, lrP: null };
    const chi2 = constrainedStat(prep, nr, kept, o);
    return { name: t.name, columns: t.columns, df: kept.length, lrChi2: chi2, lrP: pchisqUpper(chi2, kept.length) };
  });
}

/**
 * The whole-model likelihood-ratio test on pk − 1 df: null deviance − deviance for ML and ridge; for Firth the
 * penalised likelihood with every non-intercept column fixed at 0.
 */
export function modelTest(prep: PreparedFit, nr: NewtonResult, o: FitOptions, nullDev: number, deviance: number) {
  const modelDf = prep.keep.length - 1;
  let modelLrChi2 = Math.max(0, nullDev - deviance);
  if (o.method === 'firth' && modelDf > 0) {
    const all = Array.from({ length: modelDf }, (_, k) => k + 1);
    modelLrChi2 = constrainedStat(prep, nr, all, o);
  }
  return { modelDf, modelLrChi2, modelLrP: modelDf > 0 ? pchisqUpper(modelLrChi2, modelDf) : 1 };
}
