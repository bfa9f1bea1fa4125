import { qchisq } from '../numerics/distributions';
import { newtonLogistic, type LogisticProblem } from './newton';

export interface ProfileTarget {
  /** The full problem (design, outcome, penalty/Firth) at whose optimum `objective` was reached. */
  problem: LogisticProblem;
  /** Optimum coefficients of `problem` (warm start). */
  beta: Float64Array;
  /** Minimised objective of `problem` (newtonLogistic's objective). */
  objective: number;
  /** Coordinate of `problem` that is profiled; the parameter θ equals coordinate / `scale`. */
  index: number;
  scale: number;
  /** θ̂ and its Wald SE, for bracketing. */
  estimate: number;
  se: number;
  /** Iteration limit of each constrained refit (default 100). */
  maxIter?: number;
  /** Limits already found (chordSolve.ts), θ scale: only the other sides are searched by refits. */
  known?: { lower?: number; upper?: number };
}

/**
 * Profile-likelihood interval for one parameter θ: the two roots of f(θ) = 2N·(min_{β: θ fixed} objective − objectivê)
 * − χ²₁(level), with every other coefficient re-optimised (newtonLogistic with the coordinate fixed; for Firth the
 * penalty keeps the full-model information, Heinze & Schemper 2002). For ML this is the profile deviance
 * (Venzon & Moolgavkar 1988). Each root is found from the Wald limit by Newton's method on f, whose derivative is
 * exact by the envelope theorem (f' = −2·score_j·scale at the constrained optimum), safeguarded by bisection inside
 * a bracket; it stops when |f| < 1e-9 or the bracket is below `tol`·(1 + |θ|). A bound is null when the profile
 * never reaches the critical value (separation). Sides given in `known` are taken as they are.
 */
export function profileInterval(
  t: ProfileTarget,
  level: number,
  tol = 1e-11,
): { lower: number | null; upper: number | null } {
  const { problem, index, scale } = t;
  const p = problem.p;
  let N = problem.n;
  if (problem.weights) {
    N = 0;
    for (const w of problem.weights) N += w;
  }
  const crit = qchisq(level, 1);
  const fixed = new Uint8Array(p);
  fixed[index] = 1;
  let start: Float64Array = Float64Array.from(t.beta);
  const evalAt = (theta: number): { f: number; df: number } => {
    start[index] = theta * scale;
    const r = newtonLogistic(
      { ...problem, fixed, start },
      { tol: 1e-13, maxIter: t.maxIter ?? 100, information: false },
    );
    start = r.beta;
    return { f: 2 * N * (r.objective - t.objective) - crit, df: -2 * r.score[index] * scale };
  };
  const step0 = Number.isFinite(t.se) && t.se > 0 ? t.se : 0.1 * (1 + Math.abs(t.estimate));
  const zc = Math.sqrt(crit);
  const bound = (dir: 1 | -1): number | null => {
    start = Float64Array.from(t.beta);
    let inner = t.estimate,
      outer = NaN;
    let theta = t.estimate + dir * zc * step0;
    for (let it = 0; it < 100; it++) {
      const { f, df } = evalAt(theta);
      if (Math.abs(f) < 1e-9) return theta;
      if (f < 0) inner = theta;
      else outer = theta;
      if (!Number.isNaN(outer) && Math.abs(outer - inner) < tol * (1 + Math.abs(theta))) return 0.5 * (inner + outer);
      let next = theta - f / df;
      const outward = (next - inner) * dir > 0;
      if (Number.isNaN(outer)) {
        // No bracket yet: Newton outwards, at least a little, at most doubling the distance from the estimate.
        const far = t.estimate + 2 * (theta - t.estimate);
        if (!(df * dir > 0) || !Number.isFinite(next) || !outward || (next - far) * dir > 0) next = far;
        if (Math.abs(next - t.estimate) > 1e4 * step0) return null;
      } else if (!Number.isFinite(next) || (next - inner) * dir <= 0 || (next - outer) * dir >= 0) {
        next = 0.5 * (inner + outer);
      }
      theta = next;
    }
    return Number.isNaN(outer) ? null : 0.5 * (inner + outer);
  };
  return { lower: t.known?.lower ?? bound(-1), upper: t.known?.upper ?? bound(1) };
}
