import { newtonLogistic, type LogisticProblem, type NewtonOptions, type NewtonResult } from './newton';

/**
 * Firth's bias-reduced logistic regression (Firth 1993, Biometrika 80:27; Heinze & Schemper 2002, Stat Med
 * 21:2409): maximises the penalised log-likelihood ℓ*(β) = ℓ(β) + ½·log det I(β), I = X'WX, with the modified
 * score U* = X'(y − μ + h∘(½ − μ)), h the hat values, as its gradient, by Newton steps on ℓ* with step-halving
 * (Hessian in firthHessian.ts; Fisher-type steps (X'WX)⁻¹U* for very large n·p³, see newtonLogistic). Estimates
 * are finite under separation. Same design conventions as newtonLogistic (column-major, intercept included by the
 * caller); SEs come from the returned information X'WX, the Fisher information at β̂ (as brglm2 reports them).
 */
export function firthLogistic(problem: LogisticProblem, options: Partial<NewtonOptions> = {}): NewtonResult {
  return newtonLogistic({ ...problem, firth: true }, options);
}

/** ℓ*(β̂) = ℓ + ½·log det I at a Firth fit: −N·objective, N = Σ weights (no ridge penalty). */
export function firthPenalisedLogLik(result: NewtonResult, problem: LogisticProblem): number {
  let N = problem.n;
  if (problem.weights) {
    N = 0;
    for (const w of problem.weights) N += w;
  }
  return -N * result.objective;
}
