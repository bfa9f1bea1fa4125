import type { NewtonResult } from './newton';
import type { PreparedFit } from './prepareFit';
import { profileInterval } from './profileCi';

type Limits = { lower: number | null; upper: number | null } | null;

/**
 * Profile-likelihood limits of every kept coefficient on the original scale (profileCi.ts), null for aliased
 * columns. Slopes are profiled on the standardised columns (θ = coordinate / scale); the original intercept is a
 * coordinate only of the uncentred design, so the columns are shifted back in place (x/s = z + m/s), coordinate 0
 * is profiled, and they are centred again. Each constrained refit stops after at most `maxIter` iterations.
 */
export function profileLimits(
  prep: PreparedFit,
  nr: NewtonResult,
  beta: Float64Array,
  se: (j: number) => number,
  level: number,
  maxIter = 100,
): Limits[] {
  const { std, keep, problem } = prep;
  const { n, p } = prep.design;
  const profiles: Limits[] = new Array(p).fill(null);
  const target = { problem, objective: nr.objective, maxIter };
  keep.forEach((j, k) => {
    if (j > 0)
      profiles[j] = profileInterval(
        { ...target, beta: nr.beta, index: k, scale: std.scale[j], estimate: beta[j], se: se(j) },
        level,
      );
  });
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
    profiles[0] = profileInterval({ ...target, beta: b0, index: 0, scale: 1, estimate: beta[0], se: se(0) }, level);
  } finally {
    shift(-1);
  }
  return profiles;
}
