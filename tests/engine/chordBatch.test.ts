import { afterEach, describe, expect, it } from 'vitest';
import {
  constrainedSolver,
  profileBoundSolver,
  runChordSolvers,
  type ChordBase,
} from '../../src/engine/fitting/chordSolve';
import { newtonLogistic, type LogisticProblem } from '../../src/engine/fitting/newton';
import { qchisq } from '../../src/engine/numerics/distributions';
import { logisticRows, logisticRowsOne, logisticRowsPair } from '../../src/engine/numerics/kernels';
import { createRng } from '../../src/engine/numerics/rng';
import {
  allocF64,
  createRowPasses,
  helperRun,
  installRowPool,
  messagePool,
  POOL_MIN_ROWS,
  type RowJob,
} from '../../src/engine/numerics/rowPool';

// The project's own single-point kernels and solves are the reference: sharing a pass must change no bit.

afterEach(() => installRowPool(null));

function problem(n: number, p: number, seed: number, weighted = false): LogisticProblem {
  const rng = createRng(seed);
  const X = allocF64(n * p),
    y = allocF64(n);
  X.fill(1, 0, n);
  for (let k = n; k < n * p; k++) X[k] = rng.normal();
  for (let i = 0; i < n; i++) {
    let eta = -0.7;
    for (let j = 1; j < p; j++) eta += ((j % 3) - 1) * 0.5 * X[j * n + i];
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  if (!weighted) return { X, n, p, y };
  const weights = allocF64(n),
    offset = allocF64(n);
  for (let i = 0; i < n; i++) {
    weights[i] = 1 + (i % 4);
    offset[i] = ((i % 5) - 2) / 10;
  }
  return { X, n, p, y, weights, offset };
}

function inlinePool(threads: number) {
  const work = {};
  return messagePool(
    Array.from({ length: threads - 1 }, () => ({
      postMessage: (m: unknown) => helperRun(m as { job: RowJob; k0: number; k1: number }, work),
    })),
  );
}

describe('logisticRowsPair', () => {
  it('gives bit-for-bit the losses and scores of two logisticRows passes (odd p, rows not a whole block)', () => {
    for (const weighted of [false, true]) {
      const pr = problem(1333, 7, 3, weighted);
      const { X, n, p, y } = pr;
      const ba = Float64Array.from({ length: p }, (_, j) => 0.1 * j - 0.3),
        bb = Float64Array.from({ length: p }, (_, j) => (j % 2 ? 2 : -1.5));
      const ga = new Float64Array(p),
        gb = new Float64Array(p),
        loss = new Float64Array(2);
      logisticRowsPair(X, n, p, y, ba, bb, pr.weights, pr.offset, ga, gb, loss, 5, n - 3);
      for (const [b, g, l] of [
        [ba, ga, loss[0]],
        [bb, gb, loss[1]],
      ] as const) {
        const g0 = new Float64Array(p);
        const l0 = logisticRows(
          X,
          n,
          p,
          y,
          b,
          pr.weights,
          pr.offset,
          new Float64Array(n),
          undefined,
          new Float64Array(n),
          g0,
          5,
          n - 3,
        );
        expect(l).toBe(l0);
        expect(Array.from(g)).toEqual(Array.from(g0));
        // and alone (logisticRowsOne: the odd vector of a round)
        const g1 = new Float64Array(p),
          l1 = new Float64Array(1);
        logisticRowsOne(X, n, p, y, b, pr.weights, pr.offset, g1, l1, 5, n - 3);
        expect(l1[0]).toBe(l0);
        expect(Array.from(g1)).toEqual(Array.from(g0));
      }
    }
  });
});

describe('createRowPasses logisticMany', () => {
  it('equals `logistic` at each point, on one thread and on a pool of 3 (the fifth point alone)', () => {
    const n = POOL_MIN_ROWS + 5000,
      p = 5;
    const points = Array.from({ length: 5 }, (_, q) => Float64Array.from({ length: p }, (_, j) => (q - 2) * 0.1 * j));
    const B = new Float64Array(5 * p);
    points.forEach((b, q) => B.set(b, q * p));
    const serial = problem(n, p, 8, true);
    const one = createRowPasses(serial.X, n, p, serial.y, serial.weights, serial.offset);
    const losses = new Float64Array(5),
      G = new Float64Array(5 * p);
    one.logisticMany(B, 5, losses, G);
    points.forEach((b, q) => {
      const g = new Float64Array(p);
      const l = one.logistic(b, new Float64Array(n), new Float64Array(n), g);
      expect(losses[q]).toBe(l);
      expect(Array.from(G.subarray(q * p, (q + 1) * p))).toEqual(Array.from(g));
    });
    installRowPool(inlinePool(3));
    const shared = problem(n, p, 8, true);
    const pooled = createRowPasses(shared.X, n, p, shared.y, shared.weights, shared.offset);
    expect(pooled.pooled).toBe(true);
    const l3 = new Float64Array(5),
      G3 = new Float64Array(5 * p);
    pooled.logisticMany(B, 5, l3, G3);
    expect(Array.from(l3)).toEqual(Array.from(losses));
    expect(Array.from(G3)).toEqual(Array.from(G));
  });
});

describe('runChordSolvers', () => {
  it('gives every profile limit and constrained optimum the bits of its solve alone, at any width', () => {
    const pr = problem(3000, 6, 12);
    const nr = newtonLogistic(pr, { tol: 1e-12 });
    const base: ChordBase = { problem: pr, beta: nr.beta, objective: nr.objective, H: nr.information };
    const crit = qchisq(0.95, 1);
    const limits = [1, 2, 3, 4, 5].flatMap((k) => [-1, 1].map((d) => ({ k, d: d as 1 | -1 })));
    const alone = limits.map(({ k, d }) => runChordSolvers(pr, [(N) => profileBoundSolver(base, k, crit, d, N)], 1)[0]);
    expect(alone.every((b) => b !== null)).toBe(true);
    for (const width of [2, 3, 4, 7]) {
      const order: number[] = [];
      const together = runChordSolvers(
        pr,
        limits.map(
          ({ k, d }) =>
            (N: number) =>
              profileBoundSolver(base, k, crit, d, N),
        ),
        width,
        (i) => order.push(i),
      );
      expect(together.map((b) => Array.from(b!))).toEqual(alone.map((b) => Array.from(b!)));
      expect(order.slice().sort((a, b) => a - b)).toEqual(limits.map((_, i) => i));
    }
    const sets = [[1], [2, 3], [4], [5], [1, 5]];
    const objAlone = sets.map((z) => runChordSolvers(pr, [(N) => constrainedSolver(base, z, N)], 1)[0]);
    const objTogether = runChordSolvers(
      pr,
      sets.map((z) => (N: number) => constrainedSolver(base, z, N)),
      4,
    );
    expect(objTogether).toEqual(objAlone);
    // and each equals a refit with those coefficients held at 0 (newtonLogistic, 1e-12)
    sets.forEach((z, q) => {
      const fixed = new Uint8Array(6);
      for (const k of z) fixed[k] = 1;
      const start = Float64Array.from(nr.beta);
      for (const k of z) start[k] = 0;
      const refit = newtonLogistic({ ...pr, fixed, start }, { tol: 1e-13, information: false });
      expect(Math.abs(objAlone[q]! - refit.objective)).toBeLessThan(1e-12);
    });
  });
});
