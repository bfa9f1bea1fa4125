import { newtonLogistic, type LogisticProblem } from '../../engine/newton';
import { fastNewtonLogistic } from './fastNewton';
import type { RowPasses } from './rowPasses';

export interface SolverOutcome {
  beta: Float64Array;
  iterations: number;
  converged: boolean;
}

/** The Fulcra fits the benchmark can time, by name. `engine` is exactly what the worker runs. */
export const SOLVERS = {
  engine: (pr: LogisticProblem, tol: number): SolverOutcome => {
    const r = newtonLogistic(pr, { tol, maxIter: 100 });
    return { beta: r.beta, iterations: r.iterations, converged: r.converged };
  },
  /** Prototype: subsampled-Hessian Newton + one exact Hessian at the end (src/cli/bench/fastNewton.ts). */
  prototype: (pr: LogisticProblem, tol: number, passes?: RowPasses): SolverOutcome => {
    const r = fastNewtonLogistic(pr.X, pr.n, pr.p, pr.y, { tol, passes });
    return { beta: r.beta, iterations: r.iterations, converged: r.converged };
  },
} satisfies Record<string, (pr: LogisticProblem, tol: number, passes?: RowPasses) => SolverOutcome>;

export type SolverName = keyof typeof SOLVERS;
