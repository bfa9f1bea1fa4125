import { cholesky, choleskySolve, type Cholesky } from '../numerics/linalg';
import { activeShards, rowShards, setActiveShards, type RowShards } from '../numerics/rowShards';
import { objectiveEvaluator, type LogisticProblem } from './newton';

/**
 * Profile limits and constrained fits without full refits (profileLimits.ts and termTests.ts use these first and
 * fall back to the refits when they do not converge).
 *
 * Both solve their equations by chord-Newton steps whose matrix is the information at the full fit (factorised
 * once per coordinate), started from the one-step constrained estimate that matrix gives; every step costs one
 * fused pass over the rows (objective and score). The fixed point is the exact solution of the same equations the
 * refits solve, so only the speed of convergence depends on the matrix. When the steps contract slowly (the
 * information has changed much since the fit: small samples, limits far out), the matrix is recomputed at the
 * current point: an exact Newton step, and chord steps with it from there.
 */

/** Information at β̂ in the coordinates of `problem` (row-major, penalty included), and its objective there. */
export interface ChordBase {
  problem: LogisticProblem;
  beta: Float64Array;
  objective: number;
  H: Float64Array;
}

/** The points of a coefficient's two profile limits (standardised coordinates), by kept coordinate. */
export type ProfileTraces = Map<number, { lower: Float64Array; upper: Float64Array }>;

/** What a solver asks for: the objective and score at b, or the information (penalty included) at b. */
export type ChordRequest = { kind: 'at'; b: Float64Array } | { kind: 'information'; b: Float64Array };
type Evaluation = { obj: number; g: Float64Array };
/**
 * A solve written as a generator: each pass over the rows it needs is a request (yield), answered by the driver
 * (runChordSolvers), so that several solves can share one pass. Its return value is the solve's result.
 */
export type ChordSolver<T> = Generator<ChordRequest, T, Evaluation | Float64Array>;

function* at(b: Float64Array): Generator<ChordRequest, Evaluation, Evaluation | Float64Array> {
  return (yield { kind: 'at', b }) as Evaluation;
}

function* information(b: Float64Array): Generator<ChordRequest, Float64Array, Evaluation | Float64Array> {
  return (yield { kind: 'information', b }) as Float64Array;
}

/**
 * Solves sharing passes: at most this many step together, each pass evaluating all of their points (the SIMD
 * kernels take every point on each block of rows while it is in cache, wasmPasses.ts; fewer, larger passes also
 * mean fewer hand-overs to a row pool's helpers). 8 rather than 4: the full record at 10⁵ × 50 2.7–2.9 → 2.6 s
 * (2026-12-05). The width never changes a result: each solver sees the numbers it would see alone.
 */
export const SOLVE_WIDTH = 8;

/**
 * The width for rounds shared with row shards (runStepsAsync): every round there waits for messages between
 * workers (about 5 ms a round in Chromium, measured 2026-12-05), so fewer, wider rounds. With 8 the single file's
 * fit at 10⁵ × 50 took 2.2 s on 2 threads against 1.8 s on one; with 16, 1.6 s against 1.7 s.
 */
export const SHARD_SOLVE_WIDTH = 16;

/**
 * Runs solvers in lockstep, `width` at a time in the order given (a finished one is replaced by the next at once):
 * every round evaluates the points all active solvers ask for in one pass (objectiveEvaluator atMany), so each
 * solver sees exactly the numbers it would see alone and its result does not depend on the width or on the
 * other solvers. An information request is answered at once (one pass at its point unless that was the last point
 * evaluated alone, then X'WX). `onDone(i, result)` is called as solver i finishes (progress, follow-up work).
 */
export function runChordSolvers<T>(
  problem: LogisticProblem,
  solvers: ((N: number) => ChordSolver<T>)[],
  width = SOLVE_WIDTH,
  onDone?: (i: number, result: T) => void,
): T[] {
  const ev = objectiveEvaluator(problem);
  try {
    const rounds = lockstep(ev, solvers, width, onDone);
    let r = rounds.next();
    while (!r.done) {
      const points = r.value;
      r = rounds.next(
        points.length === 1 ? { evals: [ev.at(points[0])], alone: true } : { evals: ev.atMany(points), alone: false },
      );
    }
    return r.value;
  } finally {
    ev.release();
  }
}

/**
 * runChordSolvers with each round's pass shared with row shards (rowShards.ts) when they take the problem (not
 * Firth, whose objective needs the information at every point); the same numbers bit for bit, as the shards' sums
 * are the row pool's. Information requests are answered on this thread.
 */
export async function runChordSolversAsync<T>(
  problem: LogisticProblem,
  solvers: ((N: number) => ChordSolver<T>)[],
  width = SOLVE_WIDTH,
  onDone?: (i: number, result: T) => void,
  shards: RowShards | null = rowShards(),
): Promise<T[]> {
  if (!shards || problem.firth || !shards.use(problem)) return runChordSolvers(problem, solvers, width, onDone);
  const ev = objectiveEvaluator(problem);
  const p = problem.p;
  try {
    const rounds = lockstep(ev, solvers, width, onDone);
    let r = rounds.next();
    while (!r.done) {
      const points = r.value,
        m = points.length;
      const B = new Float64Array(m * p),
        losses = new Float64Array(m),
        G = new Float64Array(m * p);
      points.forEach((b, q) => B.set(b, q * p));
      await shards.logisticMany(problem, B, m, losses, G);
      r = rounds.next({ evals: ev.fromSums(points, losses, G), alone: false });
    }
    return r.value;
  } finally {
    ev.release();
  }
}

/**
 * The lockstep rounds of runChordSolvers as a generator: yields each round's points, is answered with their
 * evaluations (`alone`: the evaluator's slot now holds the single point's pass, whose weights give the information).
 */
function* lockstep<T>(
  ev: ReturnType<typeof objectiveEvaluator>,
  solvers: ((N: number) => ChordSolver<T>)[],
  width: number,
  onDone?: (i: number, result: T) => void,
): Generator<Float64Array[], T[], { evals: Evaluation[]; alone: boolean }> {
  const out: T[] = new Array(solvers.length);
  /** The point whose pass the evaluator's slot holds (its weights give the information), if any. */
  let slotAt: Float64Array | null = null;
  /** Resumes solver i with `reply` until it asks for a point (returned) or finishes (null). */
  const advance = (i: number, gen: ChordSolver<T>, reply: Evaluation | Float64Array | undefined) => {
    let r = gen.next(reply as Evaluation);
    while (!r.done && r.value.kind === 'information') {
      const b = r.value.b;
      if (!slotAt || slotAt.some((v, j) => v !== b[j])) {
        ev.at(b);
        slotAt = Float64Array.from(b);
      }
      r = gen.next(ev.information());
    }
    if (!r.done) return r.value.b;
    out[i] = r.value;
    onDone?.(i, r.value);
    return null;
  };
  const active: { i: number; gen: ChordSolver<T>; b: Float64Array }[] = [];
  let next = 0;
  const fill = () => {
    while (active.length < width && next < solvers.length) {
      const i = next++,
        gen = solvers[i](ev.N);
      const b = advance(i, gen, undefined);
      if (b) active.push({ i, gen, b });
    }
  };
  fill();
  while (active.length > 0) {
    const points = active.map((a) => a.b);
    const { evals, alone } = yield points;
    slotAt = alone ? Float64Array.from(points[0]) : null;
    const still = active.filter((a, q) => {
      const b = advance(a.i, a.gen, evals[q]);
      if (b) a.b = b;
      return b !== null;
    });
    active.splice(0, active.length, ...still);
    fill();
  }
  return out;
}

/** Steps before a solve gives up (the caller then refits). */
const MAX_STEPS = 60;
/** Matrix refreshes before a solve gives up. */
const MAX_REFRESH = 6;
/** A step counts as slow when the residual falls by less than this factor; the matrix is then recomputed. */
const SLOW = 0.2;

const factor = (H: Float64Array, p: number): Cholesky | null => {
  const ch = cholesky(H, p, 1e-12);
  return ch.dropped.some((d) => d === 1) ? null : ch;
};

/**
 * The factor of a base's information, taken once for all the solves that start from it (p³/3 each: at 500
 * columns, a factor per limit would cost more than the passes).
 */
const baseFactors = new WeakMap<Float64Array, Cholesky | null>();
const factorOfBase = (H: Float64Array, p: number): Cholesky | null => {
  if (!baseFactors.has(H)) baseFactors.set(H, factor(H, p));
  return baseFactors.get(H)!;
};

const dot = (a: ArrayLike<number>, b: ArrayLike<number>): number => {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += a[j] * b[j];
  return s;
};

/**
 * One profile-likelihood limit (Venzon & Moolgavkar 1988, Appl Stat 37:87): the point β where every score but
 * coordinate k's is 0 and 2N·(objective − objectivê) = crit, on side `dir` of β̂_k. Each step solves the linearised
 * system [H_{−k,·}; −2g'] Δ = [g_{−k}; −F] with H the chord matrix: Δ = a + λv, a = H⁻¹g̃ (g̃ = g with g_k = 0),
 * v = H⁻¹e_k, λ = (F/2 − g'a)/g'v. Start: β̂ + s·v/v_k with s = ±√(crit·v_k) (the Wald limit on the quadratic
 * profile trace). Converged when |F| < 1e-9 (or the step in β_k is below 1e-12 relative, at the rounding floor of
 * the deviance) and the Newton decrement of the nuisance coefficients g̃'H₋ₖ⁻¹g̃ < 1e-10, or when the last step in
 * β_k is below 1e-7 relative and 1/100 of the one before (its error is then ≈ 1e-9 at most; it is taken without
 * another pass). Returns the point (its β_k is the limit), or null when it does not converge (or lands on the
 * wrong side).
 */
export function chordProfileBound(base: ChordBase, k: number, crit: number, dir: 1 | -1): Float64Array | null {
  return runChordSolvers(base.problem, [(N) => profileBoundSolver(base, k, crit, dir, N)], 1)[0];
}

/** chordProfileBound as a solver for runChordSolvers (N: the case total, the objective's divisor). */
export function* profileBoundSolver(
  base: ChordBase,
  k: number,
  crit: number,
  dir: 1 | -1,
  N: number,
): ChordSolver<Float64Array | null> {
  const p = base.problem.p;
  {
    let ch = factorOfBase(base.H, p);
    if (!ch) return null;
    const ek = new Float64Array(p),
      v = new Float64Array(p),
      a = new Float64Array(p),
      gt = new Float64Array(p);
    ek[k] = 1;
    choleskySolve(ch, ek, v);
    if (!(v[k] > 0)) return null;
    const b = Float64Array.from(base.beta);
    const s = dir * Math.sqrt(crit * v[k]);
    for (let j = 0; j < p; j++) b[j] += (s * v[j]) / v[k];
    let lastResidual = Infinity,
      lastDk = Infinity,
      refreshes = 0,
      fresh = false;
    for (let step = 0; step < MAX_STEPS; step++) {
      const e = yield* at(b);
      const F = 2 * N * (e.obj - base.objective) - crit;
      if (!Number.isFinite(F)) return null;
      gt.set(e.g);
      gt[k] = 0;
      for (;;) {
        choleskySolve(ch, gt, a);
        const ga = dot(e.g, a),
          gv = dot(e.g, v);
        const decrement = dot(gt, a) - (a[k] * a[k]) / v[k];
        const lambda = (F / 2 - ga) / gv;
        if (!Number.isFinite(lambda)) return null;
        const dk = a[k] + lambda * v[k];
        const done = (Math.abs(F) < 1e-9 || Math.abs(dk) < 1e-12 * (1 + Math.abs(b[k]))) && decrement < 1e-10;
        const taken = Math.abs(dk) < 1e-7 * (1 + Math.abs(b[k])) && Math.abs(dk) < 1e-2 * lastDk && decrement < 1e-6;
        if (taken) for (let j = 0; j < p; j++) b[j] += a[j] + lambda * v[j];
        if (done || taken) return (b[k] - base.beta[k]) * dir > 0 ? b : null;
        const residual = Math.abs(F) + decrement;
        if (residual > SLOW * lastResidual && !fresh) {
          // slow (or no) contraction: recompute the matrix here and take this step with it
          if (++refreshes > MAX_REFRESH) return null;
          ch = factor(yield* information(b), p);
          if (!ch) return null;
          choleskySolve(ch, ek, v);
          if (!(v[k] > 0)) return null;
          fresh = true;
          continue;
        }
        fresh = false;
        lastResidual = residual;
        lastDk = Math.abs(dk);
        for (let j = 0; j < p; j++) b[j] += a[j] + lambda * v[j];
        break;
      }
    }
    return null;
  }
}

/**
 * The minimised objective with the coordinates in `zero` held at 0 (a term test's constrained fit): chord steps
 * Δ = a − V_{·K}·(V_KK)⁻¹·a_K, a = H⁻¹g̃ (g̃ = g with the held coordinates 0, V = H⁻¹), i.e. H restricted to the free
 * coordinates, from `start` (its held coordinates set to 0) or else the one-step estimate β̂ − V_{·K}·(V_KK)⁻¹·β̂_K.
 * Converged when the Newton decrement g̃'Δ is below
 * 1e-11 (deviance units; the refit's own test is 1e-12 relative to the deviance); null when it does not converge or
 * a step raises the objective.
 */
export function chordConstrainedObjective(base: ChordBase, zero: number[], start?: Float64Array): number | null {
  return runChordSolvers(base.problem, [(N) => constrainedSolver(base, zero, N, start)], 1)[0];
}

/** chordConstrainedObjective as a solver for runChordSolvers (N: the case total, the objective's divisor). */
export function* constrainedSolver(
  base: ChordBase,
  zero: number[],
  N: number,
  start?: Float64Array,
): ChordSolver<number | null> {
  const { problem } = base;
  const p = problem.p,
    m = zero.length;
  {
    /** VK = H⁻¹ columns of K (p×m, column-major), MK = Cholesky of V_KK. */
    const setup = (H: Float64Array) => {
      const ch = H === base.H ? factorOfBase(H, p) : factor(H, p);
      if (!ch) return null;
      const VK = new Float64Array(p * m),
        e = new Float64Array(p);
      zero.forEach((k, c) => {
        e.fill(0);
        e[k] = 1;
        VK.set(choleskySolve(ch, e), c * p);
      });
      const VKK = new Float64Array(m * m);
      for (let r = 0; r < m; r++) for (let c = 0; c < m; c++) VKK[r * m + c] = VK[c * p + zero[r]];
      const MK = factor(VKK, m);
      return MK ? { ch, VK, MK } : null;
    };
    /** x −= V_{·K}(V_KK)⁻¹x_K (x_K becomes 0). */
    const project = (s: NonNullable<ReturnType<typeof setup>>, x: Float64Array): void => {
      const t = choleskySolve(
        s.MK,
        zero.map((k) => x[k]),
      );
      for (let c = 0; c < m; c++) for (let j = 0; j < p; j++) x[j] -= s.VK[c * p + j] * t[c];
      for (const k of zero) x[k] = 0;
    };
    let s = setup(base.H);
    if (!s) return null;
    /** A new matrix in passes over the rows: X'WX costs about p/25 of them (none for Firth, which has it anyway). */
    const refreshCost = problem.firth ? 0 : p / 25;
    const b = Float64Array.from(start ?? base.beta);
    if (start) for (const k of zero) b[k] = 0;
    else project(s, b);
    const gt = new Float64Array(p),
      d = new Float64Array(p);
    let last = Infinity,
      lastObj = Infinity,
      refreshes = 0,
      fresh = false;
    for (let step = 0; step < MAX_STEPS; step++) {
      const e = yield* at(b);
      if (!Number.isFinite(e.obj) || e.obj > lastObj + 1e-13 * Math.abs(lastObj)) return null;
      gt.set(e.g);
      for (const k of zero) gt[k] = 0;
      for (;;) {
        choleskySolve(s.ch, gt, d);
        project(s, d);
        const decrement = dot(gt, d);
        if (!(decrement >= -1e-12)) return null;
        if (decrement < 1e-11) return e.obj;
        // The next step would lower the objective by decrement/(2N) up to a relative error ≈ the chord's
        // contraction √(decrement / previous decrement): taken without a pass once that error is below 1e-10.
        const ratio = decrement / last;
        if (decrement < 1e-6 && Math.sqrt(ratio) * decrement < 1e-10) return e.obj - decrement / (2 * N);
        const chordLeft = ratio < 1 ? Math.log(1e-10 / decrement) / Math.log(ratio) : Infinity;
        if ((decrement > SLOW * last || chordLeft > 3 + refreshCost) && !fresh) {
          if (++refreshes > MAX_REFRESH) return null;
          const next = setup(yield* information(b));
          if (!next) return null;
          s = next;
          fresh = true;
          continue;
        }
        fresh = false;
        last = decrement;
        lastObj = e.obj;
        for (let j = 0; j < p; j++) b[j] += d[j];
        break;
      }
    }
    return null;
  }
}

/**
 * A start for the fit with coordinate k at 0 on its profile trace: the quadratic through the two profile limits'
 * points and β̂ (k's coordinate is the abscissa), evaluated at 0; null when 0 lies more than 4 half-widths of the
 * interval from β̂_k (the linear one-step start is then as good).
 */
export function traceStart(
  beta: Float64Array,
  k: number,
  lower: Float64Array,
  upper: Float64Array,
): Float64Array | null {
  const c0 = beta[k],
    c1 = lower[k],
    c2 = upper[k];
  if (!(c1 < c0 && c0 < c2) || Math.abs(c0) > 2 * (c2 - c1)) return null;
  // Lagrange weights at 0
  const l0 = (c1 * c2) / ((c0 - c1) * (c0 - c2)),
    l1 = (c0 * c2) / ((c1 - c0) * (c1 - c2)),
    l2 = (c0 * c1) / ((c2 - c0) * (c2 - c1));
  const out = new Float64Array(beta.length);
  for (let j = 0; j < beta.length; j++) out[j] = l0 * beta[j] + l1 * lower[j] + l2 * upper[j];
  out[k] = 0;
  return out;
}

/**
 * A round of chord solves that a step of a fit asks its driver to run: runSteps runs it here, runStepsAsync shares
 * its passes with row shards unless `local` (the intercept's profile, solved on a design shifted in place).
 */
export interface ChordBatch {
  problem: LogisticProblem;
  solvers: ((N: number) => ChordSolver<unknown>)[];
  width: number;
  onDone?: (i: number, result: unknown) => void;
  local?: boolean;
}

/** A computation that yields its chord rounds (profile limits, term tests, a whole fit) and returns R. */
export type ChordSteps<R> = Generator<ChordBatch, R, void>;

/** A round for ChordSteps, typed by its solvers' result. */
export function chordBatch<T>(
  problem: LogisticProblem,
  solvers: ((N: number) => ChordSolver<T>)[],
  onDone?: (i: number, result: T) => void,
  local = false,
): ChordBatch {
  return { problem, solvers, width: SOLVE_WIDTH, onDone: onDone as ChordBatch['onDone'], local };
}

/** Runs the steps with every round on this thread (runChordSolvers). */
export function runSteps<R>(steps: ChordSteps<R>): R {
  try {
    let r = steps.next();
    while (!r.done) {
      const b = r.value;
      runChordSolvers(b.problem, b.solvers, b.width, b.onDone);
      r = steps.next();
    }
    return r.value;
  } finally {
    steps.return(undefined as never); // a round that threw still undoes the steps' in-place changes (finally blocks)
  }
}

/**
 * Runs the steps with each round's passes shared with `shards` (runChordSolversAsync): the same numbers. The
 * shards hold one problem's rows at a time: steps started while others use them run on this thread (runSteps).
 */
export async function runStepsAsync<R>(steps: ChordSteps<R>, shards: RowShards | null): Promise<R> {
  if (!shards || activeShards() !== null) return runSteps(steps);
  setActiveShards(shards);
  try {
    let r = steps.next();
    while (!r.done) {
      const b = r.value;
      if (b.local) runChordSolvers(b.problem, b.solvers, b.width, b.onDone);
      else await runChordSolversAsync(b.problem, b.solvers, Math.max(b.width, SHARD_SOLVE_WIDTH), b.onDone, shards);
      r = steps.next();
    }
    return r.value;
  } finally {
    steps.return(undefined as never);
    setActiveShards(null);
    shards?.release();
  }
}
