import fc from 'fast-check';
import { afterEach, describe, expect, it } from 'vitest';
import { startNodeRowPool } from '../../src/cli/nodeRowPool';
import type { Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { rowDiagnostics } from '../../src/engine/diagnostics';
import { fit } from '../../src/engine/fitting/fit';
import { createRng } from '../../src/engine/numerics/rng';
import {
  allocDesign,
  allocF64,
  createRowPasses,
  installRowPool,
  runChunks,
  setWasmPasses,
  WASM_MIN_ROWS,
  wasmLayoutOf,
  type RowJob,
} from '../../src/engine/numerics/rowPool';
import { createWasmDesign, wasmPassesSupported } from '../../src/engine/numerics/wasmPasses';

afterEach(() => {
  installRowPool(null);
  setWasmPasses(true);
});

const bits = (a: ArrayLike<number>) => Array.from(a, (v) => (Object.is(v, -0) ? '-0' : v));

/** A problem of n rows and p columns (intercept first), y 0/1 or in [0, 1], from a seed. */
function problem(n: number, p: number, seed: number, fractionalY = false) {
  const rng = createRng(seed);
  const X = new Float64Array(n * p);
  X.fill(1, 0, n);
  for (let k = n; k < n * p; k++) X[k] = rng.normal() * (k % 3 === 0 ? 30 : 1);
  const y = Float64Array.from({ length: n }, () =>
    fractionalY && rng.next() < 0.1 ? rng.next() : +(rng.next() < 0.3),
  );
  return { X, y };
}

/** The same job on X as a plain array and on X in a WebAssembly memory (slot 0). */
function both(n: number, p: number, X: Float64Array, job: Omit<RowJob, 'X' | 'n' | 'p' | 'done'>) {
  const L = createWasmDesign(n, p, false, 1)!;
  const Xw = new Float64Array(L.memory.buffer, 0, n * p);
  Xw.set(X);
  const clone = (): RowJob =>
    ({
      ...job,
      n,
      p,
      done: new Int32Array(2),
      partLoss: job.partLoss.slice(),
      partG: job.partG.slice(),
      eta: job.eta?.slice(),
      w: job.w?.slice(),
    }) as RowJob;
  const js = { ...clone(), X },
    wasm = { ...clone(), X: Xw, wasm: L };
  const K = Math.ceil(n / job.chunkRows);
  runChunks(js, 0, K);
  runChunks(wasm, 0, K);
  return { js, wasm };
}

describe('the logistic passes with WebAssembly SIMD kernels (wasmPasses.ts)', () => {
  it('are available in this Node', () => {
    expect(wasmPassesSupported()).toBe(true);
  });

  it('give the losses, scores, η and weights of kernels.ts bit for bit, for any rows, weights, offset', () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 1500 }),
        fc.integer({ min: 1, max: 9 }),
        fc.integer({ min: 0, max: 1e6 }),
        fc.constantFrom('none', 'ones', 'mixed'),
        fc.boolean(),
        fc.boolean(),
        fc.constantFrom(1, 60),
        (n, p, seed, weights, withOffset, fractionalY, scale) => {
          const { X, y } = problem(n, p, seed, fractionalY);
          const c =
            weights === 'none'
              ? undefined
              : Float64Array.from({ length: n }, (_, i) => (weights === 'ones' ? 1 : [0, 1, 2.5, 0.3][i % 4]));
          const offset = withOffset ? Float64Array.from({ length: n }, (_, i) => ((i % 11) - 5) / 7) : undefined;
          const chunkRows = 512;
          const K = Math.ceil(n / chunkRows);
          // scale 60: |η| up to ~2000, past the −708 where e^−|η| is taken as 0
          const beta = Float64Array.from({ length: p }, (_, j) => scale * (j === 0 ? -0.7 : 0.3 / j));
          // one full pass: η, weights, per-chunk losses and scores
          const one = both(n, p, X, {
            op: 'logistic',
            chunkRows,
            y,
            c,
            offset,
            beta,
            eta: new Float64Array(n),
            w: new Float64Array(n),
            partLoss: new Float64Array(K),
            partG: new Float64Array(K * p),
          });
          expect(bits(one.wasm.partLoss)).toEqual(bits(one.js.partLoss));
          expect(bits(one.wasm.partG)).toEqual(bits(one.js.partG));
          expect(bits(one.wasm.eta!)).toEqual(bits(one.js.eta!));
          expect(bits(one.wasm.w!)).toEqual(bits(one.js.w!));
          // several vectors in one pass: pairs (and one alone) in kernels.ts, all on each block here (8 at a time)
          const m = fractionalY ? 11 : 3;
          const betas = Float64Array.from({ length: m * p }, (_, k) => beta[k % p] * (1 + 0.1 * Math.floor(k / p)));
          const many = both(n, p, X, {
            op: 'logisticMany',
            chunkRows,
            y,
            c,
            offset,
            betas,
            m,
            partLoss: new Float64Array(K * m),
            partG: new Float64Array(K * m * p),
          });
          expect(bits(many.wasm.partLoss)).toEqual(bits(many.js.partLoss));
          expect(bits(many.wasm.partG)).toEqual(bits(many.js.partG));
          // and the pair's first vector is the single pass's (the lockstep solvers rely on it)
          for (let k = 0; k < K; k++) expect(many.wasm.partLoss[k * m]).toBe(one.js.partLoss[k]);
        },
      ),
      { numRuns: 60, seed: 20261205 },
    );
  });

  it('are used for a design from allocDesign (from WASM_MIN_ROWS rows), and not when switched off', () => {
    const n = WASM_MIN_ROWS;
    expect(wasmLayoutOf(allocDesign(n, 3), n, 3)).toBeDefined();
    expect(wasmLayoutOf(allocDesign(n - 1, 3), n - 1, 3)).toBeUndefined();
    setWasmPasses(false);
    expect(wasmLayoutOf(allocDesign(n, 3), n, 3)).toBeUndefined();
    // a view that is not the whole design is not taken for it
    setWasmPasses(true);
    const X = allocDesign(n, 3);
    expect(wasmLayoutOf(X.subarray(n), n, 2)).toBeUndefined();
  });

  /** 40 000 rows: two numeric predictors, one far from 0, and a 3-level factor. */
  function data(): { d: Dataset; spec: ModelSpec } {
    const N = 40_000,
      rng = createRng(5);
    const a = Float64Array.from({ length: N }, () => 500 + 4 * rng.normal());
    const b = Float64Array.from({ length: N }, (_, i) => (i % 997 === 3 ? NaN : rng.normal()));
    const codes = Int32Array.from({ length: N }, (_, i) => (i * 5) % 3);
    const y = Float64Array.from({ length: N }, (_, i) => {
      const eta = -1 + 0.2 * (a[i] - 500) + 0.5 * (b[i] || 0) + 0.3 * codes[i];
      return +(rng.next() < 1 / (1 + Math.exp(-eta)));
    });
    return {
      d: {
        nRows: N,
        columns: [
          { kind: 'numeric', name: 'a', values: a },
          { kind: 'numeric', name: 'b', values: b },
          { kind: 'categorical', name: 'g', levels: ['u', 'v', 'w'], codes },
          { kind: 'numeric', name: 'y', values: y },
        ],
      },
      spec: { outcome: 'y', event: '1', terms: ['a', 'b', 'g'].map((column) => ({ type: 'main', column })) },
    };
  }

  it('give the fit, profile limits and term tests of kernels.ts bit for bit, on 1 thread and on 3', async () => {
    const { d, spec } = data();
    setWasmPasses(false);
    const plain = fit(d, spec, { profile: true, termTests: true });
    setWasmPasses(true);
    expect(fit(d, spec, { profile: true, termTests: true })).toEqual(plain);
    const np = await startNodeRowPool(3);
    try {
      installRowPool(np.pool);
      // the design now sits in a shared WebAssembly memory that the helpers instantiate the kernels on
      const probe = allocDesign(WASM_MIN_ROWS, 2);
      expect(probe.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(wasmLayoutOf(probe, WASM_MIN_ROWS, 2)?.slots).toBe(3);
      expect(fit(d, spec, { profile: true, termTests: true })).toEqual(plain);
      // Every thread really reads X through the kernels: a job whose plain X is all zeros, but whose layout is the
      // real design's, still gives the real sums on every chunk (kernels.ts would read the zeros).
      const n = 5 * 8192,
        p = 3;
      const { X, y } = problem(n, p, 11);
      const Xw = allocDesign(n, p);
      Xw.set(X);
      const ys = allocF64(n);
      ys.set(y);
      const job = (Xj: Float64Array): RowJob => ({
        op: 'logisticMany',
        X: Xj,
        n,
        p,
        chunkRows: 8192,
        y: ys,
        betas: Float64Array.from([0.2, -0.1, 0.3, 0.1, 0.1, 0.1]),
        m: 2,
        partLoss: allocF64(5 * 2),
        partG: allocF64(5 * 2 * p),
        done: new Int32Array(new SharedArrayBuffer(8)),
        wasm: wasmLayoutOf(Xw, n, p),
      });
      const real = job(Xw),
        decoy = job(allocF64(n * p));
      np.pool.run(real, 5, new Float64Array(256 * p));
      np.pool.run(decoy, 5, new Float64Array(256 * p));
      expect(bits(decoy.partG)).toEqual(bits(real.partG));
      expect(bits(decoy.partLoss)).toEqual(bits(real.partLoss));
    } finally {
      installRowPool(null);
      await np.close();
    }
  }, 60_000);

  it('give the per-row influence measures of the TypeScript loops bit for bit (V = X·C by the Xβ kernel)', () => {
    const { d, spec } = data();
    const f = fit(d, spec, { profile: false, termTests: false });
    setWasmPasses(false);
    const plain = rowDiagnostics(f, d);
    setWasmPasses(true);
    // the diagnostics' block design is in WebAssembly memory now, and smaller blocks are written into its room
    expect(wasmLayoutOf(allocDesign(40_000, 6), 1000, 6)).toBeDefined();
    expect(rowDiagnostics(f, d)).toEqual(plain);
  });

  it('fall back to kernels.ts for a thread without a slot, with the same numbers', () => {
    const n = 3000,
      p = 4;
    const { X, y } = problem(n, p, 3);
    const Xw = allocDesign(n, p);
    Xw.set(X);
    const passes = createRowPasses(Xw, n, p, y, undefined, undefined, 1024);
    const L = wasmLayoutOf(Xw, n, p)!;
    const beta = [0.1, -0.2, 0.3, 0.05];
    const job = (X: Float64Array, wasm: typeof L | undefined): RowJob => ({
      op: 'logistic',
      X,
      n,
      p,
      chunkRows: 1024,
      y,
      beta: Float64Array.from(beta),
      eta: allocF64(n),
      w: allocF64(n),
      partLoss: new Float64Array(3),
      partG: new Float64Array(3 * p),
      done: new Int32Array(2),
      wasm,
    });
    const a = job(Xw, L),
      b = job(Xw, L);
    runChunks(a, 0, 3, undefined, 0);
    runChunks(b, 0, 3, undefined, 5); // slot 5 does not exist: kernels.ts
    expect(bits(b.partG)).toEqual(bits(a.partG));
    expect(bits(b.partLoss)).toEqual(bits(a.partLoss));
    const g = new Float64Array(p);
    const loss = passes.logistic(beta, allocF64(n), allocF64(n), g);
    expect(loss).toBe(a.partLoss[0] + a.partLoss[1] + a.partLoss[2]);
  });
});
