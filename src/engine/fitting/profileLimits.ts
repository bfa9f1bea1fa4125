import { qchisq } from '../numerics/distributions';
import { columnsAdded } from '../numerics/rowShards';
import {
  chordBatch,
  profileBoundSolver,
  runSteps,
  type ChordBase,
  type ChordSteps,
  type ProfileTraces,
} from './chordSolve';
import type { NewtonResult } from './newton';
import { caseTotal, type PreparedFit } from './prepareFit';
import { profileInterval } from './profileCi';
import { limitFromStarts, neutralStart, type SeparationCheck } from './separation';

/** Profile limits of one coefficient; `lowerUnbounded` / `upperUnbounded` mark a side that runs to ∓∞ / +∞. */
export type Limits = {
  lower: number | null;
  upper: number | null;
  lowerUnbounded?: boolean;
  upperUnbounded?: boolean;
} | null;

/**
 * Runs `each(k, j)` for every kept coefficient: slopes on the standardised columns (θ = coordinate / scale), then
 * the intercept (withInterceptCoordinate).
 */
function forEachCoordinate(prep: PreparedFit, each: (k: number, j: number, shifted: boolean) => void): void {
  prep.keep.forEach((j, k) => j > 0 && each(k, j, false));
  withInterceptCoordinate(prep, () => each(0, 0, true));
}

/**
 * Runs `fn` with coordinate 0 of the problem being the intercept, which is a coordinate only of the uncentred
 * design: the standardised columns are shifted back in place (x/s = z + m/s) and centred again afterwards.
 */
function withInterceptCoordinate(prep: PreparedFit, fn: () => void): void {
  shiftColumns(prep, 1);
  try {
    fn();
  } finally {
    shiftColumns(prep, -1);
  }
}

/**
 * Shifts the standardised columns back (sign 1: x/s = z + m/s) or centres them again (sign −1), in place; row
 * shards holding the problem's rows make the same additions (the round trip is not exact, so theirs must match).
 */
function shiftColumns(prep: PreparedFit, sign: 1 | -1): void {
  const { std, keep, problem } = prep;
  const n = prep.design.n;
  const Zk = problem.X;
  const add = Float64Array.from(keep, (j) => (j === 0 ? 0 : sign * std.centerOverScale[j]));
  add.forEach((c, k) => {
    if (c !== 0) for (let i = 0; i < n; i++) Zk[k * n + i] += c;
  });
  columnsAdded(problem, add);
}

/**
 * Profile-likelihood limits of every kept coefficient on the original scale, null for aliased columns. Each limit
 * is first solved directly by chord-Newton steps on the fit's information (chordSolve.ts, one pass over the rows
 * per step); a side that does not converge that way is found by constrained refits (profileCi.ts), each stopping
 * after at most `maxIter` iterations. `step` is called after each coefficient (progress). `exact` uses the refits
 * for every side (tests and the bench compare the two). The points of both limits of each slope go into `traces`
 * (termTests starts from them).
 */
export function profileLimits(...args: Parameters<typeof profileLimitSteps>): Limits[] {
  return runSteps(profileLimitSteps(...args));
}

/** profileLimits as steps that yield their rounds of chord solves (fit.ts fitSteps). */
export function* profileLimitSteps(
  prep: PreparedFit,
  nr: NewtonResult,
  beta: Float64Array,
  se: (j: number) => number,
  level: number,
  maxIter = 100,
  step?: () => void,
  exact = false,
  traces?: ProfileTraces,
): ChordSteps<Limits[]> {
  const { std, problem } = prep;
  const profiles: Limits[] = new Array(prep.design.p).fill(null);
  const target = { problem, objective: nr.objective, maxIter };
  const crit = qchisq(level, 1);
  const H = nr.information;
  /** The limits of coordinate k (column j) from its two chord solutions (null: not found, or `exact`). */
  const finish = (k: number, j: number, b: Float64Array, lo: Float64Array | null, up: Float64Array | null) => {
    const scale = j === 0 ? 1 : std.scale[j];
    const known: { lower?: number; upper?: number } = {};
    if (lo !== null) known.lower = lo[k] / scale;
    if (up !== null) known.upper = up[k] / scale;
    if (lo && up && j !== 0) traces?.set(k, { lower: lo, upper: up });
    profiles[j] = profileInterval({ ...target, beta: b, index: k, scale, estimate: beta[j], se: se(j), known }, level);
    step?.();
  };
  /** Both limits of each coordinate by chord solves sharing passes (runChordSolvers), finished as each pair is. */
  function* solveAll(coords: { k: number; j: number }[], base: ChordBase, local: boolean): ChordSteps<void> {
    if (exact) {
      for (const { k, j } of coords) finish(k, j, base.beta, null, null);
      return;
    }
    const found: (Float64Array | null | undefined)[] = [];
    yield chordBatch(
      problem,
      coords.flatMap(({ k }) => [
        (N: number) => profileBoundSolver(base, k, crit, -1, N),
        (N: number) => profileBoundSolver(base, k, crit, 1, N),
      ]),
      (i, point) => {
        found[i] = point;
        const c = i >> 1;
        if (found[2 * c] !== undefined && found[2 * c + 1] !== undefined)
          finish(coords[c].k, coords[c].j, base.beta, found[2 * c]!, found[2 * c + 1]!);
      },
      local,
    );
  }
  const slopes = prep.keep.flatMap((j, k) => (j > 0 ? [{ k, j }] : []));
  yield* solveAll(slopes, { problem, beta: nr.beta, objective: nr.objective, H }, false);
  // the intercept's coordinate (withInterceptCoordinate): its solves run where the shifted design is
  shiftColumns(prep, 1);
  try {
    const b = Float64Array.from(nr.beta);
    b[0] = beta[0];
    yield* solveAll(
      [{ k: 0, j: 0 }],
      { problem, beta: b, objective: nr.objective, H: exact ? H : shiftedInformation(prep, H) },
      false,
    );
  } finally {
    shiftColumns(prep, -1);
  }
  return profiles;
}

/**
 * The information in the coordinates of the intercept's profile (forEachCoordinate): the design there is X·T with
 * T = I + e₀c' (c_k = m_k/s_k of the kept slopes), so it is T'HT: H_ij + c_i·H_0j + H_i0·c_j + c_i·c_j·H_00.
 */
function shiftedInformation(prep: PreparedFit, H: Float64Array): Float64Array {
  const p = prep.keep.length;
  const c = Float64Array.from(prep.keep, (j) => (j > 0 ? prep.std.centerOverScale[j] : 0));
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++)
    for (let j = 0; j < p; j++) out[i * p + j] = H[i * p + j] + c[i] * H[j] + H[i * p] * c[j] + c[i] * c[j] * H[0];
  return out;
}

/** Doublings of the 0.25-unit step before a side whose profile never reaches the critical value is unbounded. */
const MAX_DOUBLINGS = 30;

/**
 * Profile-likelihood limits under separation (ML). `nr` is the limiting fit (fitToLimit). The profile deviance
 * g(c) = 2N·(limiting objective with the coordinate fixed at c − limiting objective) − χ²₁(level) is convex in c;
 * for a diverging coefficient it falls to −χ²₁(level) on the side the coefficient runs off to, so that limit is
 * unbounded and the other side has at most one root. Each constrained refit is taken to its limit from the previous
 * refit; for a diverging coefficient also afresh (neutralStart), keeping the lower (limitFromStarts), with the
 * previous refit scaled by c / c_previous (a separated fit scaled up stays separated, with wider margins). Holding a
 * finite coefficient does not change which rows are determined, so its warm start cannot stick on the wrong side.
 * A root is bracketed by doubling steps of 0.25 (standardised units) from a point inside the interval (the estimate;
 * for a diverging coefficient 0 or a point towards its divergent side) and found by the Illinois variant of regula
 * falsi to 1e-10 relative. A side whose
 * profile stays below the critical value out to 0.25·2³⁰ units is unbounded too (another column separates the data
 * whatever this coefficient is).
 */
export function separatedProfileLimits(
  prep: PreparedFit,
  nr: NewtonResult,
  sep: SeparationCheck,
  level: number,
  tol: number,
): Limits[] {
  const { std, problem } = prep;
  const crit = qchisq(level, 1);
  const profiles: Limits[] = new Array(prep.design.p).fill(null);
  const N = caseTotal(problem);
  forEachCoordinate(prep, (k, j, shifted) => {
    const fixed = new Uint8Array(problem.p);
    fixed[k] = 1;
    const values = new Float64Array(problem.p);
    const estimate = shifted ? nr.beta[0] - sumShift(prep, nr.beta) : nr.beta[k];
    let last: Float64Array = Float64Array.from(nr.beta);
    last[k] = estimate;
    const s = sep.direction[k];
    const g = (c: number): number => {
      values[k] = c;
      const ratio = s !== 0 && last[k] !== 0 && c / last[k] > 0 ? c / last[k] : 1;
      const warm = last.map((b) => b * ratio);
      warm[k] = c;
      const starts = s === 0 ? [warm] : [neutralStart(problem, fixed, values), warm];
      const r = limitFromStarts({ ...problem, fixed }, starts, tol);
      last = r.beta;
      return 2 * N * (r.objective - nr.objective) - crit;
    };
    const scale = shifted ? 1 : std.scale[j];
    /** The limit on side `dir` (original scale), or Infinity when the profile never reaches the critical value. */
    const side = (dir: 1 | -1): number => {
      let inside = estimate,
        gIn = -crit;
      if (s !== 0) {
        // diverging (dir = −s): 0 is inside, or else the root lies between 0 and the divergent side
        const g0 = g(0);
        if (g0 < 0) [inside, gIn] = [0, g0];
        else {
          let outside = 0,
            gOut = g0;
          for (let m = 0; m <= MAX_DOUBLINGS; m++) {
            const c = s * 0.25 * 2 ** m,
              gc = g(c);
            if (gc < 0) return illinois(g, c, gc, outside, gOut) / scale;
            [outside, gOut] = [c, gc];
          }
          return NaN; // the profile never falls below the critical value: the fit is not at its limit
        }
      }
      for (let m = 0; m <= MAX_DOUBLINGS; m++) {
        const c = inside + dir * 0.25 * 2 ** m,
          gc = g(c);
        if (gc >= 0) return illinois(g, inside, gIn, c, gc) / scale;
        [inside, gIn] = [c, gc];
      }
      return Infinity;
    };
    const lower = s < 0 ? Infinity : side(-1),
      upper = s > 0 ? Infinity : side(1);
    profiles[j] = {
      lower: Number.isFinite(lower) ? lower : null,
      upper: Number.isFinite(upper) ? upper : null,
      lowerUnbounded: lower === Infinity,
      upperUnbounded: upper === Infinity,
    };
  });
  return profiles;
}

/** The original-scale intercept of standardised coefficients b: b₀ − Σ b_j·m_j/s_j is b₀ minus this sum. */
function sumShift(prep: PreparedFit, b: ArrayLike<number>): number {
  let t = 0;
  prep.keep.forEach((j, k) => {
    if (j > 0) t += b[k] * prep.std.centerOverScale[j];
  });
  return t;
}

/** Root of g between a (g < 0) and b (g ≥ 0) by the Illinois method, to |g| < 1e-9 or 1e-10·(1 + |c|). */
function illinois(g: (c: number) => number, a: number, ga: number, b: number, gb: number): number {
  let side = 0;
  for (let it = 0; it < 200; it++) {
    const c = (a * gb - b * ga) / (gb - ga);
    if (Math.abs(b - a) < 1e-10 * (1 + Math.abs(c))) return c;
    const gc = g(c);
    if (Math.abs(gc) < 1e-9) return c;
    if (gc < 0) {
      [a, ga] = [c, gc];
      if (side === -1) gb /= 2;
      side = -1;
    } else {
      [b, gb] = [c, gc];
      if (side === 1) ga /= 2;
      side = 1;
    }
  }
  return 0.5 * (a + b);
}
