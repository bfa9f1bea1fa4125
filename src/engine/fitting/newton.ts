import { FulcraError } from '../core/data';
import { valueNumber } from '../core/vectors';
import { blockedXtr } from '../numerics/kernels';
import { createRowPasses, giveBackBuffers, takeBuffer } from '../numerics/rowPool';
import { cholesky, choleskyFactorInverse, choleskyLogDet, choleskySolve } from '../numerics/linalg';
import { sigmoid } from '../numerics/loss';
import { FIRTH_NEWTON_FROM_START, firthHessianWork, firthNewtonHessian, firthNewtonPays } from './firthHessian';

export interface LogisticProblem {
  /** Column-major n×p design; the caller includes an intercept column if wanted. */
  X: Float64Array;
  n: number;
  p: number;
  /** Outcome, 0/1 (values in [0, 1] are accepted). */
  y: Float64Array;
  /** Case weights (bootstrap counts etc.), default 1. */
  weights?: Float64Array;
  /** Added to the linear predictor (e.g. calibration-in-the-large). */
  offset?: Float64Array;
  /** Length p ridge penalty per column: objective −(1/N)·loglik + ½·Σ penalty_j β_j², N = Σ weights. */
  penalty?: Float64Array;
  /** Firth/Jeffreys-prior penalty: adds ½·log det(X'WX) to the log-likelihood. */
  firth?: boolean;
  start?: Float64Array;
  /** 1 = hold the coefficient at its start value (profile likelihood, term tests); Firth keeps the full information. */
  fixed?: Uint8Array;
}

export interface NewtonOptions {
  /**
   * Converged when |ΔD|/(|D| + 0.1) < tol, D = 2·N·objective (R glm's rule on the penalised deviance),
   * and max |Δβ_j|/(1 + |β_j|) < √tol (< 100·tol after a Firth Fisher-type step, see exactNewton). Diverging
   * coefficients (separation) never converge.
   */
  tol: number;
  maxIter: number;
  recordPath?: boolean;
  /** Recompute X'WX at the final beta (default true); false saves one pass when only the optimum is needed. */
  information?: boolean;
  /**
   * Never use the subsampled-Hessian phase (tests and benchmarks compare against it); default false.
   * The result is the same optimum either way, to the convergence tolerance.
   */
  exactHessian?: boolean;
}

export interface NewtonResult {
  beta: Float64Array;
  converged: boolean;
  iterations: number;
  /** Unpenalised log-likelihood at beta. */
  logLik: number;
  /** The minimised objective: (−loglik [− ½·log det I for Firth])/N + ½·Σ penalty_j β_j². */
  objective: number;
  /**
   * Row-major p×p X'WX + N·diag(penalty) at beta (at the last iterate before it when options.information is false,
   * or when no ηᵢ changed by more than 1e-12 in the last step, so that every weight agrees to 1e-12 relative).
   */
  information: Float64Array;
  /** beta after each iteration (the start is not included) when recordPath. */
  path?: Float64Array[];
  /** Fitted probabilities. */
  fitted: Float64Array;
  /** 1 for columns the solver held at their start, being linear combinations of earlier ones at the start. */
  dropped: Uint8Array;
  /** Gradient of the penalised log-likelihood at beta (= −N·∂objective/∂β), including fixed coordinates. */
  score: Float64Array;
  /** Hat values (leverages) at beta: wᵢ·xᵢ'(X'WX)⁻¹xᵢ; only for Firth fits. */
  hat?: Float64Array;
}

export const defaultNewtonOptions: NewtonOptions = { tol: 1e-10, maxIter: 50, recordPath: false };

function validate(pr: LogisticProblem): void {
  const { X, n, p, y } = pr;
  if (!Number.isInteger(n) || n < 1) throw new FulcraError('bad-argument', `n must be a positive integer, got ${n}.`);
  if (!Number.isInteger(p) || p < 1) throw new FulcraError('bad-argument', `p must be a positive integer, got ${p}.`);
  if (X.length !== n * p) throw new FulcraError('bad-argument', `X has length ${X.length}, expected n·p = ${n * p}.`);
  if (y.length !== n) throw new FulcraError('bad-argument', `y has length ${y.length}, expected n = ${n}.`);
  for (const [name, a, len] of [
    ['weights', pr.weights, n],
    ['offset', pr.offset, n],
    ['penalty', pr.penalty, p],
    ['start', pr.start, p],
    ['fixed', pr.fixed, p],
  ] as const) {
    if (a && a.length !== len)
      throw new FulcraError('bad-argument', `${name} has length ${a.length}, expected ${len}.`);
    if (a)
      for (let i = 0; i < a.length; i++)
        if (!Number.isFinite(a[i]))
          throw new FulcraError('bad-argument', `${name}[${i}] is ${a[i]}; it must be finite.`);
  }
  for (let i = 0; i < n; i++) {
    if (!(y[i] >= 0 && y[i] <= 1))
      throw new FulcraError('bad-argument', `y[${i}] is ${y[i]}; the outcome must be 0 or 1.`);
    if (pr.weights && pr.weights[i] < 0)
      throw new FulcraError('bad-argument', `weights[${i}] is ${pr.weights[i]}; weights must be ≥ 0.`);
  }
  if (pr.penalty)
    for (let j = 0; j < p; j++)
      if (pr.penalty[j] < 0)
        throw new FulcraError('bad-argument', `penalty[${j}] is ${pr.penalty[j]}; it must be ≥ 0.`);
  // X itself is checked by the first pass over it (see createWorkspace), not by a pass of its own.
}

/**
 * A non-finite value anywhere in X makes the loss or the gradient of the first evaluation non-finite (NaN·0 and
 * ∞·0 are NaN); only then is X searched, to name the position (X's rows are not dataset rows).
 */
function checkFirstPass(pr: LogisticProblem, loss: number, g: Float64Array): void {
  let probe = loss * 0;
  for (let j = 0; j < g.length; j++) probe += g[j] * 0;
  if (probe === 0) return;
  const { X, n, p } = pr;
  for (let k = 0; k < n * p; k++) {
    if (!Number.isFinite(X[k]))
      throw new FulcraError(
        'bad-argument',
        `X has a non-finite value (${X[k]}): ${valueNumber(k % n)} of design column ${Math.floor(k / n) + 1}.`,
      );
  }
}

/** Rows above which (and above 16·p²) a fit without Firth's penalty starts with subsampled-Hessian steps. */
export const FAST_PATH_MIN_ROWS = 20_000;
/** Design columns (intercept included) from which the subsampled-Hessian start is used. */
export const FAST_PATH_MIN_COLUMNS = 5;

/** The state of one evaluation point; two of them let a trial point be evaluated without losing the current one. */
interface Slot {
  eta: Float64Array;
  /** c∘μ(1 − μ) */
  w: Float64Array;
  /** Gradient of the penalised log-likelihood: X'r − N·Pβ (Firth: + X'(h∘(½ − μ))). */
  g: Float64Array;
  /** X'WX at this point when infoValid. */
  info: Float64Array;
  infoValid: boolean;
  hat: Float64Array | null;
  ll: number;
  obj: number;
}

interface Run {
  beta: Float64Array;
  cur: Slot;
  other: Slot;
  iterations: number;
  path?: Float64Array[];
  /** The slot whose info the last Newton step used. */
  lastInfo: Slot | null;
  initialDrop: Uint8Array;
}

type Workspace = ReturnType<typeof createWorkspace>;

function createWorkspace(pr: LogisticProblem, N: number) {
  const { X, n, p, y, weights: c, offset, penalty, firth = false } = pr;
  const passes = createRowPasses(X, n, p, y, c, offset);
  const Lwork = new Float64Array(p * p),
    dropWork = new Uint8Array(p);
  const Linv = firth ? new Float64Array(p * p) : null,
    buf = new Float64Array(1024);
  const fr = firth ? new Float64Array(n) : null,
    fg = new Float64Array(p);
  const newSlot = (): Slot => ({
    eta: takeBuffer(n, passes.pooled),
    w: takeBuffer(n, passes.pooled),
    g: new Float64Array(p),
    info: new Float64Array(p * p),
    infoValid: false,
    hat: firth ? new Float64Array(n) : null,
    ll: 0,
    obj: 0,
  });
  const penaltyTerm = (b: ArrayLike<number>): number => {
    if (!penalty) return 0;
    let s = 0;
    for (let j = 0; j < p; j++) s += penalty[j] * b[j] * b[j];
    return 0.5 * s;
  };
  const computeInfo = (s: Slot): void => {
    passes.information(s.w, s.info);
    s.infoValid = true;
  };
  /** Fills s at b (one fused pass over X; Firth also needs X'WX, the hat values and one more X'v pass). */
  let firstPass = true;
  const evaluate = (b: Float64Array, s: Slot, withInfo: boolean): void => {
    const loss = passes.logistic(b, s.eta, s.w, s.g);
    if (firstPass) {
      checkFirstPass(pr, loss, s.g);
      firstPass = false;
    }
    s.ll = -loss;
    let obj = loss / N + penaltyTerm(b);
    if (penalty) for (let j = 0; j < p; j++) s.g[j] -= N * penalty[j] * b[j];
    s.infoValid = false;
    if (withInfo || firth) computeInfo(s);
    if (firth) {
      const hat = s.hat!,
        L = Linv!;
      const infoChol = cholesky(s.info, p, 1e-12, Lwork, dropWork);
      obj -= (0.5 * choleskyLogDet(infoChol)) / N;
      choleskyFactorInverse(infoChol, L);
      // hᵢ = wᵢ·‖L⁻¹xᵢ‖², by blocks of rows so that the columns stay in cache
      hat.fill(0);
      for (let i0 = 0; i0 < n; i0 += 1024) {
        const i1 = Math.min(n, i0 + 1024);
        for (let k = 0; k < p; k++) {
          if (infoChol.dropped[k]) continue;
          buf.fill(0, 0, i1 - i0);
          let j = 0;
          for (; j + 3 <= k; j += 4) {
            const a0 = L[k * p + j],
              a1 = L[k * p + j + 1],
              a2 = L[k * p + j + 2],
              a3 = L[k * p + j + 3];
            const o0 = j * n,
              o1 = o0 + n,
              o2 = o1 + n,
              o3 = o2 + n;
            for (let i = i0; i < i1; i++)
              buf[i - i0] += a0 * X[o0 + i] + a1 * X[o1 + i] + a2 * X[o2 + i] + a3 * X[o3 + i];
          }
          for (; j <= k; j++) {
            const a = L[k * p + j],
              oj = j * n;
            for (let i = i0; i < i1; i++) buf[i - i0] += a * X[oj + i];
          }
          for (let i = i0; i < i1; i++) hat[i] += buf[i - i0] * buf[i - i0];
        }
      }
      const f = fr!;
      for (let i = 0; i < n; i++) {
        hat[i] *= s.w[i];
        f[i] = hat[i] * (0.5 - sigmoid(s.eta[i]));
      }
      blockedXtr(X, n, p, f, fg);
      for (let j = 0; j < p; j++) s.g[j] += fg[j];
    }
    s.obj = obj;
  };
  return { newSlot, evaluate, computeInfo, passes, penaltyTerm };
}

/** Adds N·diag(penalty) to H and takes the fixed coordinates out of the step system (their row, column and U). */
function constrainSystem(
  H: Float64Array,
  U: Float64Array,
  p: number,
  N: number,
  penalty: Float64Array | undefined,
  fixed: Uint8Array | undefined,
): void {
  if (penalty) for (let j = 0; j < p; j++) H[j * p + j] += N * penalty[j];
  if (!fixed) return;
  for (let j = 0; j < p; j++) {
    if (!fixed[j]) continue;
    U[j] = 0;
    for (let k = 0; k < p; k++) {
      H[j * p + k] = 0;
      H[k * p + j] = 0;
    }
  }
}

/**
 * Step halving from run.beta along `step`: the first t = 1, ½, ¼, … (at most `halvings` tries) whose objective is
 * not above `obj` (to rounding) is evaluated into run.other (the point in `trial`); returns t, or 0 when none is.
 */
function halvingSearch(
  ws: Workspace,
  run: Run,
  step: Float64Array,
  trial: Float64Array,
  obj: number,
  halvings: number,
): number {
  let t = 1;
  for (let half = 0; half < halvings; half++) {
    for (let j = 0; j < step.length; j++) trial[j] = run.beta[j] + t * step[j];
    ws.evaluate(trial, run.other, false);
    if (run.other.obj <= obj + 1e-13 * Math.abs(obj) + 1e-300) return t;
    t *= 0.5;
  }
  return 0;
}

/**
 * Exact Newton iterations from run.beta (run.cur evaluated there) until converged, stuck or maxIter in total.
 * Returns whether the convergence test passed.
 */
function exactNewton(pr: LogisticProblem, N: number, ws: Workspace, run: Run, opt: NewtonOptions): boolean {
  const { n, p, penalty, fixed, firth = false } = pr;
  const U = new Float64Array(p),
    step = new Float64Array(p),
    trial = new Float64Array(p);
  const H = new Float64Array(p * p),
    Hfac = new Float64Array(p * p),
    Hdrop = new Uint8Array(p);
  // Firth: Newton steps on ℓ* (firthHessian.ts) from the start while n·p³ ≤ FIRTH_NEWTON_FROM_START, else from when
  // the Fisher-type steps (X'WX)⁻¹U* contract slowly (firthNewtonPays). The Fisher-type step also wherever that
  // Hessian is not positive definite; its linear convergence needs a tighter step rule.
  let fWork = firth && n * p ** 3 <= FIRTH_NEWTON_FROM_START ? firthHessianWork(p) : null;
  let lastFisher = Infinity;
  let first = true;
  while (run.iterations < opt.maxIter) {
    const cur = run.cur;
    if (!cur.infoValid) ws.computeInfo(cur);
    run.lastInfo = cur;
    U.set(cur.g);
    const newtonStep =
      fWork !== null && firthNewtonHessian(pr.X, n, p, cur.eta, cur.w, cur.hat!, cur.info, H, fWork, fixed);
    if (!newtonStep) H.set(cur.info);
    const stepTol = firth && !newtonStep ? opt.tol * 100 : Math.sqrt(opt.tol);
    constrainSystem(H, U, p, N, penalty, fixed);
    const hChol = cholesky(H, p, 1e-12, Hfac, Hdrop);
    if (first) for (let j = 0; j < p; j++) run.initialDrop[j] = fixed?.[j] ? 0 : Hdrop[j];
    first = false;
    choleskySolve(hChol, U, step);
    if (firth) capStep(step, FIRTH_MAX_STEP);
    let degenerate = false;
    for (let j = 0; j < p; j++) if (Hdrop[j] && !run.initialDrop[j] && !fixed?.[j]) degenerate = true;
    if (degenerate) return false; // a column lost all information during the iterations: diverging coefficients

    const obj = cur.obj,
      D = 2 * N * obj;
    const t = halvingSearch(ws, run, step, trial, obj, 40);
    let maxFull = 0,
      dec = 0;
    for (let j = 0; j < p; j++) {
      maxFull = Math.max(maxFull, Math.abs(step[j]) / (1 + Math.abs(run.beta[j])));
      dec += U[j] * step[j];
    }
    if (t < 1e-6) {
      // No real decrease possible: at the optimum up to rounding, or stuck with a large Newton step (separation).
      // run.cur is still the state at run.beta.
      return dec / (Math.abs(D) + 0.1) < Math.sqrt(opt.tol) && maxFull < Math.sqrt(stepTol);
    }
    run.beta.set(trial);
    run.cur = run.other;
    run.other = cur;
    run.iterations++;
    if (run.path) run.path.push(Float64Array.from(run.beta));
    if (firth && !fWork) {
      if (t === 1 && firthNewtonPays(maxFull / lastFisher, p)) fWork = firthHessianWork(p);
      lastFisher = t === 1 ? maxFull : Infinity;
    }
    const Dnew = 2 * N * run.cur.obj;
    if (Math.abs(Dnew - D) / (Math.abs(Dnew) + 0.1) < opt.tol && maxFull < stepTol) return true;
  }
  return false;
}

/**
 * Largest change of any coefficient in one Firth step (the step is scaled down to it, direction kept), as in
 * Heinze & Schemper's implementation (maxstep = 5): near quasi-separation ℓ* is almost flat along the separating
 * direction, and an uncapped step can land where X'WX has underflowed and no later step is accepted.
 */
const FIRTH_MAX_STEP = 5;

function capStep(step: Float64Array, cap: number): void {
  let m = 0;
  for (const s of step) m = Math.max(m, Math.abs(s));
  if (m > cap) for (let j = 0; j < step.length; j++) step[j] *= cap / m;
}

/** Rows per block of a subsample: contiguous runs are read at memory speed, where single rows at a stride are not. */
const SUB_BLOCK = 128;

/**
 * Large-n start: Newton steps whose Hessian X'WX is estimated on a fixed subsample of evenly spaced blocks of
 * SUB_BLOCK rows (2·p² rows, then a fixed max(10 000, 8·p², min(32·p², n/16)) once the steps are below 1e-3:
 * chord steps, linear convergence at a rate ≈ ‖I − H̃⁻¹H‖) while the gradient and the objective always use every
 * row (subsampled Newton: Roosta-Khorasani & Mahoney 2019, Math Program 174:293). The subsample's weights are
 * those of the full pass at the current point, so nothing is copied. It stops at a small relative step (cheapTol)
 * and hands over to exact Newton, which ends with the exact X'WX and the exact convergence test. Returns null when
 * the exact phase does not converge cleanly (separation, a column dropped as collinear): the caller then runs
 * exact Newton from the start.
 */
function fastNewton(pr: LogisticProblem, N: number, ws: Workspace, run: Run, opt: NewtonOptions): boolean | null {
  const { n, p, penalty, fixed, weights: c } = pr;
  const mFine = Math.max(10_000, 8 * p * p, Math.min(32 * p * p, Math.floor(n / 16))),
    mCoarse = Math.max(4_000, 2 * p * p);
  // Blocks of rows spread evenly over the data (starts ⌊k·n/count⌋); the coarse blocks are a subset of the fine ones.
  const nFine = Math.ceil(mFine / SUB_BLOCK),
    nCoarse = Math.ceil(mCoarse / SUB_BLOCK);
  const fineBlocks = ws.passes.allocInt32(nFine),
    coarseBlocks = ws.passes.allocInt32(nCoarse);
  for (let k = 0; k < nFine; k++) fineBlocks[k] = Math.floor((k * n) / nFine);
  for (let k = 0; k < nCoarse; k++) coarseBlocks[k] = fineBlocks[Math.floor((k * nFine) / nCoarse)];
  /** Σ cᵢ over the blocks' rows. */
  const weightOf = (blocks: Int32Array): number => {
    let s = 0;
    for (const a of blocks) for (let i = a; i < Math.min(n, a + SUB_BLOCK); i++) s += c ? c[i] : 1;
    return s;
  };
  const Ncoarse = weightOf(coarseBlocks),
    Nfine = weightOf(fineBlocks);
  if (!(Ncoarse > 0) || !(Nfine > 0)) return null;
  const Hs = new Float64Array(p * p),
    H = new Float64Array(p * p),
    Hfac = new Float64Array(p * p),
    Hdrop = new Uint8Array(p);
  /** The data part of the Hessian at run.beta estimated on a subsample: Σ_s cᵢwᵢxᵢxᵢ'·N/Σ_s cᵢ. */
  const subsampleHessian = (fine: boolean): void => {
    ws.passes.informationOnBlocks(run.cur.w, fine ? fineBlocks : coarseBlocks, SUB_BLOCK, Hs);
    const sc = N / (fine ? Nfine : Ncoarse);
    for (let q = 0; q < p * p; q++) Hs[q] *= sc;
  };
  const U = new Float64Array(p),
    step = new Float64Array(p),
    trial = new Float64Array(p);
  ws.evaluate(run.beta, run.cur, false);
  const budget = Math.min(30, opt.maxIter - 1);
  // Stop at 1e-2·√tol, where one exact step ends the job; for wide designs (X'WX costs more than ~6 passes) go on
  // to 1e-12, where the exact step changes η so little that its X'WX is also the information at the end.
  const cheapTol = p >= 24 ? Math.min(1e-12, 1e-2 * Math.sqrt(opt.tol)) : 1e-2 * Math.sqrt(opt.tol);
  let useFine = false,
    haveFine = false,
    lastRel = Infinity;
  while (run.iterations < budget) {
    if (!useFine) subsampleHessian(false);
    else if (!haveFine) {
      subsampleHessian(true);
      haveFine = true;
    }
    H.set(Hs);
    U.set(run.cur.g);
    constrainSystem(H, U, p, N, penalty, fixed);
    choleskySolve(cholesky(H, p, 1e-12, Hfac, Hdrop), U, step);
    const obj = run.cur.obj;
    const t = halvingSearch(ws, run, step, trial, obj, 30);
    if (t === 0) break; // the estimated Hessian gives no descent: exact Newton from here
    let maxRel = 0;
    for (let j = 0; j < p; j++) maxRel = Math.max(maxRel, Math.abs(t * step[j]) / (1 + Math.abs(run.beta[j])));
    run.beta.set(trial);
    [run.cur, run.other] = [run.other, run.cur];
    run.iterations++;
    if (run.path) run.path.push(Float64Array.from(run.beta));
    if (maxRel < cheapTol || (haveFine && maxRel > 0.5 * lastRel)) break; // converged, or at the rounding floor
    if (maxRel < 1e-3) useFine = true;
    lastRel = maxRel;
  }
  const converged = exactNewton(pr, N, ws, run, opt);
  if (!converged || run.initialDrop.some((d) => d === 1)) return null;
  return true;
}

/**
 * Newton–Raphson (IRLS) for logistic regression with optional case weights, offset, ridge penalty and
 * Firth's modified score (Heinze & Schemper 2002, Stat Med 21:2409): step (X'WX + N·P)⁻¹U with
 * U = X'(c∘(y − μ) + h∘(½ − μ)) − N·Pβ (h only for Firth), halving the step while the objective
 * gets worse. Columns found to be linear combinations of earlier ones are held at their start value.
 * Firth fits take true Newton steps on ℓ* = ℓ + ½·log det X'WX instead (its Hessian from firthHessian.ts; quadratic
 * convergence) where that Hessian is positive definite: from the start while n·p³ ≤ FIRTH_NEWTON_FROM_START, else
 * once the step above converges slowly (firthNewtonPays; at large n with many events it rarely does).
 * The returned information is X'WX (+ N·P) in every case, so Firth SEs come from the Fisher information at β̂.
 * Without Firth's penalty and for n > max(20 000, 16·p²) it begins with cheap subsampled-Hessian steps (see
 * fastNewton) and always ends with exact Newton steps, the exact convergence test and the exact X'WX.
 */
export function newtonLogistic(problem: LogisticProblem, options: Partial<NewtonOptions> = {}): NewtonResult {
  validate(problem);
  const opt = { ...defaultNewtonOptions, ...options };
  if (!(opt.tol > 0)) throw new FulcraError('bad-argument', `tol must be > 0, got ${opt.tol}.`);
  if (!Number.isInteger(opt.maxIter) || opt.maxIter < 0)
    throw new FulcraError('bad-argument', `maxIter must be a non-negative integer, got ${opt.maxIter}.`);
  const { n, p, weights: c, penalty, firth = false } = problem;

  let N = n;
  if (c) {
    N = 0;
    for (let i = 0; i < n; i++) N += c[i];
  }
  if (!(N > 0)) throw new FulcraError('bad-argument', 'The case weights sum to 0; there is nothing to fit.');

  const ws = createWorkspace(problem, N);
  const newRun = (cur: Slot, other: Slot): Run => ({
    beta: problem.start ? Float64Array.from(problem.start) : new Float64Array(p),
    cur,
    other,
    iterations: 0,
    path: opt.recordPath ? [] : undefined,
    lastInfo: null,
    initialDrop: new Uint8Array(p),
  });
  let run = newRun(ws.newSlot(), ws.newSlot());
  let converged: boolean | null = null;
  // Below 5 columns X'WX costs no more than a pass, so a subsampled one saves nothing and exact Newton's quadratic
  // steps win (the calibration fits of a 10⁶-row evaluation: 5–6 passes each → 4).
  const fastPath = p >= FAST_PATH_MIN_COLUMNS && n > Math.max(FAST_PATH_MIN_ROWS, 16 * p * p);
  if (!firth && !opt.exactHessian && fastPath && opt.maxIter >= 4) {
    converged = fastNewton(problem, N, ws, run, opt);
    if (converged === null) run = newRun(run.cur, run.other);
  }
  if (converged === null) {
    ws.evaluate(run.beta, run.cur, true);
    converged = exactNewton(problem, N, ws, run, opt);
  }

  const { cur, other } = run;
  let infoSlot = cur;
  if (!cur.infoValid) {
    // The information of the previous iterate is X'WX at this beta to ≤ max|Δη| relative (∂log wᵢ/∂ηᵢ = 1 − 2μᵢ):
    // kept when that is ≤ INFO_REUSE_ETA.
    let maxDelta = Infinity;
    if (run.lastInfo === other && other.infoValid) {
      maxDelta = 0;
      for (let i = 0; i < n; i++) maxDelta = Math.max(maxDelta, Math.abs(cur.eta[i] - other.eta[i]));
    }
    if (maxDelta <= INFO_REUSE_ETA || opt.information === false) infoSlot = run.lastInfo ?? cur;
    if (infoSlot === cur) ws.computeInfo(cur);
  }
  const information = Float64Array.from(infoSlot.info);
  if (penalty) for (let j = 0; j < p; j++) information[j * p + j] += N * penalty[j];
  const fitted = new Float64Array(n);
  for (let i = 0; i < n; i++) fitted[i] = sigmoid(cur.eta[i]);
  const result: NewtonResult = {
    beta: run.beta,
    converged,
    iterations: run.iterations,
    logLik: cur.ll,
    objective: cur.obj,
    information,
    fitted,
    dropped: Uint8Array.from(run.initialDrop),
    score: Float64Array.from(cur.g),
  };
  if (run.path) result.path = run.path;
  if (firth) result.hat = Float64Array.from(cur.hat!);
  giveBackBuffers(cur.eta, cur.w, other.eta, other.w);
  return result;
}

/**
 * Largest change of any ηᵢ for which the previous iterate's X'WX is returned as the information at beta: every
 * weight wᵢ then agrees to 1e-12 relative, so every entry of X'WX does.
 */
const INFO_REUSE_ETA = 1e-12;

/**
 * The solver's own objective of `problem` at any β (one fused pass; Firth also its X'WX pass), for the profile and
 * constrained-fit solvers of chordSolve.ts: `at(b)` returns the objective and the score (gradient of the penalised
 * log-likelihood, N-scaled) at b; `information()` X'WX + N·diag(penalty) at the last b; `release()` gives the row
 * buffers back. Fixed coordinates play no part here.
 */
export function objectiveEvaluator(problem: LogisticProblem) {
  const { n, p, weights: c, penalty } = problem;
  let N = n;
  if (c) {
    N = 0;
    for (let i = 0; i < n; i++) N += c[i];
  }
  const ws = createWorkspace(problem, N);
  const slot = ws.newSlot();
  return {
    N,
    at(b: Float64Array): { obj: number; g: Float64Array } {
      ws.evaluate(b, slot, false);
      return { obj: slot.obj, g: slot.g };
    },
    information(): Float64Array {
      if (!slot.infoValid) ws.computeInfo(slot);
      const H = Float64Array.from(slot.info);
      if (penalty) for (let j = 0; j < p; j++) H[j * p + j] += N * penalty[j];
      return H;
    },
    /**
     * The objective and score at each of several points in one pass over the rows (two points per load of X:
     * rowPool.ts logisticMany), bit-for-bit what `at` gives at each; Firth's objective needs the information at
     * every point, so there the points are taken one by one.
     */
    atMany(bs: Float64Array[]): { obj: number; g: Float64Array }[] {
      if (problem.firth || bs.length === 1)
        return bs.map((b) => {
          ws.evaluate(b, slot, false);
          return { obj: slot.obj, g: Float64Array.from(slot.g) };
        });
      const m = bs.length,
        B = new Float64Array(m * p),
        losses = new Float64Array(m),
        G = new Float64Array(m * p);
      bs.forEach((b, q) => B.set(b, q * p));
      ws.passes.logisticMany(B, m, losses, G);
      return this.fromSums(bs, losses, G);
    },
    /** The objectives and scores at bs from their passes' sums (losses, G as logisticMany gives them). */
    fromSums(bs: Float64Array[], losses: Float64Array, G: Float64Array): { obj: number; g: Float64Array }[] {
      return bs.map((b, q) => {
        const g = G.subarray(q * p, (q + 1) * p);
        if (penalty) for (let j = 0; j < p; j++) g[j] -= N * penalty[j] * b[j];
        return { obj: losses[q] / N + ws.penaltyTerm(b), g };
      });
    },
    release(): void {
      giveBackBuffers(slot.eta, slot.w);
    },
  };
}
