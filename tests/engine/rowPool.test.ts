import { afterEach, describe, expect, it } from 'vitest';
import { startNodeRowPool } from '../../src/cli/nodeRowPool';
import { accumulateXtWX, logisticRows } from '../../src/engine/numerics/kernels';
import { newtonLogistic, type LogisticProblem } from '../../src/engine/fitting/newton';
import {
  allocF64,
  CHUNK_ROWS,
  chunkRange,
  createRowPasses,
  giveBackBuffers,
  helperRun,
  installRowPool,
  messagePool,
  POOL_MIN_ROWS,
  standardiseInPlace,
  takeBuffer,
  type RowJob,
} from '../../src/engine/numerics/rowPool';
import { createRng } from '../../src/engine/numerics/rng';
import { standardise } from '../../src/engine/numerics/standardise';
import type { Dataset } from '../../src/engine/core/data';
import type { ModelSpec } from '../../src/engine/core/model';
import { rowDiagnostics } from '../../src/engine/diagnostics';
import { fit } from '../../src/engine/fitting/fit';

afterEach(() => installRowPool(null));

/** A logistic problem with known coefficients, its arrays from allocF64 (shared while a pool is installed). */
function problem(n: number, p: number, seed: number): LogisticProblem {
  const rng = createRng(seed);
  const X = allocF64(n * p),
    y = allocF64(n);
  X.fill(1, 0, n);
  for (let k = n; k < n * p; k++) X[k] = rng.normal();
  const b = Array.from({ length: p }, (_, j) => (j === 0 ? -1 : 0.6 / j));
  for (let i = 0; i < n; i++) {
    let eta = 0;
    for (let j = 0; j < p; j++) eta += b[j] * X[j * n + i];
    y[i] = rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
  }
  return { X, n, p, y };
}

/** A pool whose helpers run their share at once, on this thread (tests the partition and the reduction). */
function inlinePool(threads: number, fail = false) {
  const work = {};
  return messagePool(
    Array.from({ length: threads - 1 }, () => ({
      postMessage: (m: unknown) => {
        const msg = m as { job: RowJob; k0: number; k1: number };
        helperRun(fail ? { ...msg, job: { ...msg.job, X: undefined as unknown as Float64Array } } : msg, work);
      },
    })),
  );
}

const fitAll = (pr: LogisticProblem) => {
  const r = newtonLogistic(pr, { tol: 1e-10 });
  return {
    beta: Array.from(r.beta),
    info: Array.from(r.information),
    ll: r.logLik,
    fitted: Array.from(r.fitted),
    it: r.iterations,
  };
};

describe('chunkRange', () => {
  it('covers every chunk once, in order, for any number of threads', () => {
    for (const chunks of [1, 2, 5, 31]) {
      for (const threads of [1, 2, 3, 8]) {
        const seen: number[] = [];
        for (let t = 0; t < threads; t++) {
          const [a, b] = chunkRange(chunks, threads, t);
          for (let k = a; k < b; k++) seen.push(k);
        }
        expect(seen).toEqual(Array.from({ length: chunks }, (_, k) => k));
      }
    }
  });
});

describe('createRowPasses (one thread, by chunks)', () => {
  const pr = problem(2 * CHUNK_ROWS + 777, 5, 11);
  const { X, n, p, y } = pr;
  const beta = Float64Array.from([0.3, -0.2, 0.1, 0.05, -0.4]);

  it('equals one straight logisticRows pass to 1e-13 (only the order of the sums differs)', () => {
    const passes = createRowPasses(X, n, p, y, undefined, undefined);
    const eta = new Float64Array(n),
      w = new Float64Array(n),
      g = new Float64Array(p);
    const loss = passes.logistic(beta, eta, w, g);
    const eta0 = new Float64Array(n),
      r0 = new Float64Array(n),
      w0 = new Float64Array(n),
      g0 = new Float64Array(p);
    const loss0 = logisticRows(X, n, p, y, beta, undefined, undefined, eta0, r0, w0, g0);
    expect(Math.abs(loss - loss0) / loss0).toBeLessThan(1e-13);
    expect(eta).toEqual(eta0);
    expect(w).toEqual(w0);
    for (let j = 0; j < p; j++) expect(Math.abs(g[j] - g0[j])).toBeLessThan(1e-11 * (1 + Math.abs(g0[j])));
    const H = passes.information(w, new Float64Array(p * p)),
      H0 = accumulateXtWX(X, n, p, w, new Float64Array(p * p));
    for (let q = 0; q < p * p; q++) expect(Math.abs(H[q] - H0[q])).toBeLessThan(1e-12 * Math.abs(H0[q]) + 1e-12);
  });

  it("sums X'WX over blocks of rows exactly as over those rows one by one", () => {
    const passes = createRowPasses(X, n, p, y, undefined, undefined);
    const w = Float64Array.from({ length: n }, (_, i) => 0.1 + (i % 13) / 20);
    const blocks = Int32Array.from([0, 1000, 40_000, n - 50]);
    const H = passes.informationOnBlocks(w, blocks, 128, new Float64Array(p * p));
    const ref = new Float64Array(p * p);
    for (const s of blocks)
      for (let i = s; i < Math.min(n, s + 128); i++)
        for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) ref[j * p + k] += w[i] * X[j * n + i] * X[k * n + i];
    for (let q = 0; q < p * p; q++) expect(Math.abs(H[q] - ref[q])).toBeLessThan(1e-12 * Math.abs(ref[q]) + 1e-12);
  });
});

describe('row pool: the same numbers on any number of threads', () => {
  // n reaches the pool (≥ POOL_MIN_ROWS), spans 7 chunks and takes the subsampled-Hessian path (n > 20 000 and
  // n > 16·p²).
  const n = POOL_MIN_ROWS + 2 * CHUNK_ROWS + 123,
    p = 6;

  it('runs on the pool from POOL_MIN_ROWS rows and on this thread below (same chunks either way)', () => {
    installRowPool(inlinePool(2));
    const big = problem(n, p, 3),
      small = problem(POOL_MIN_ROWS - 1, p, 3);
    expect(createRowPasses(big.X, big.n, p, big.y, undefined, undefined).pooled).toBe(true);
    expect(createRowPasses(small.X, small.n, p, small.y, undefined, undefined).pooled).toBe(false);
  });

  it('gives bit-for-bit the fit of one thread with 2, 3 and 5 threads (helpers run inline)', () => {
    const serial = fitAll(problem(n, p, 5));
    for (const threads of [2, 3, 5]) {
      installRowPool(inlinePool(threads));
      const pooled = fitAll(problem(n, p, 5));
      installRowPool(null);
      expect(pooled).toEqual(serial);
    }
  });

  it('standardises the columns on the pool to the same bits as standardise() on this thread', () => {
    const base = problem(n, p, 11);
    base.X.fill(0, 3 * n, 4 * n); // an all-zero column keeps scale 1 and becomes 0
    for (let i = 0; i < n; i++) base.X[4 * n + i] = 1e300 * (i % 7); // a column in units of 1e300
    const want = standardise(Float64Array.from(base.X), n, p, true);
    for (const threads of [2, 3]) {
      installRowPool(inlinePool(threads));
      const X = allocF64(n * p);
      X.set(base.X);
      const got = standardiseInPlace(X, n, p);
      installRowPool(null);
      expect(got.Z).toBe(X);
      expect(Array.from(got.Z)).toEqual(Array.from(want.Z));
      expect([got.center, got.scale, got.centerOverScale].map((a) => Array.from(a))).toEqual(
        [want.center, want.scale, want.centerOverScale].map((a) => Array.from(a)),
      );
    }
  });

  it('gives bit-for-bit the per-row influence measures of one thread with 3 threads (rowDiagnostics)', () => {
    // 150 000 rows: two full diagnostics blocks and a partial one; a missing value every 997 rows, a categorical
    // predictor, DFBETAS kept (n·p under DFBETAS_MAX_CELLS).
    const N = 150_000,
      rng = createRng(31);
    const cols = ['a', 'b', 'c'].map((name) => ({
      kind: 'numeric' as const,
      name,
      values: Float64Array.from({ length: N }, (_, i) => (i % 997 === 5 && name === 'b' ? NaN : rng.normal())),
    }));
    const g = {
      kind: 'categorical' as const,
      name: 'g',
      levels: ['u', 'v', 'w'],
      codes: Int32Array.from({ length: N }, (_, i) => i % 3),
    };
    const y = Float64Array.from({ length: N }, (_, i) => {
      const eta = -0.8 + 0.7 * cols[0].values[i] - 0.4 * (cols[2].values[i] || 0) + 0.5 * g.codes[i];
      return rng.next() < 1 / (1 + Math.exp(-eta)) ? 1 : 0;
    });
    const data: Dataset = { nRows: N, columns: [...cols, g, { kind: 'numeric', name: 'y', values: y }] };
    const spec: ModelSpec = {
      outcome: 'y',
      event: '1',
      terms: ['a', 'b', 'c', 'g'].map((column) => ({ type: 'main', column })),
    };
    const f = fit(data, spec, { profile: false, termTests: false });
    const serial = rowDiagnostics(f, data);
    let posts = 0;
    const pool = inlinePool(3);
    installRowPool({
      threads: pool.threads,
      run: (job, chunks, work) => ((posts += job.op === 'influence' ? 1 : 0), pool.run(job, chunks, work)),
    });
    const pooled = rowDiagnostics(f, data);
    installRowPool(null);
    expect(posts).toBe(2); // the two full blocks; the partial one (< POOL_MIN_ROWS rows) runs on this thread
    expect(serial.dfbetas).not.toBeNull();
    // byte for byte (toEqual walks 10⁶ typed-array elements one by one: seconds)
    const bytes = (a: unknown) =>
      ArrayBuffer.isView(a) ? Buffer.from(a.buffer, a.byteOffset, a.byteLength).toString('base64') : a;
    for (const key of Object.keys(serial) as (keyof typeof serial)[])
      expect(bytes(pooled[key]), key).toEqual(bytes(serial[key]));
  });

  it('gives bit-for-bit the fit of one thread with 2 worker_threads, with case weights and an offset', async () => {
    const base = problem(n, p, 9);
    const weights = Float64Array.from({ length: n }, (_, i) => (i % 5) / 2);
    const offset = Float64Array.from({ length: n }, (_, i) => ((i % 7) - 3) / 10);
    const serial = fitAll({ ...base, weights, offset });
    const np = await startNodeRowPool(2);
    try {
      installRowPool(np.pool);
      const pr = problem(n, p, 9);
      const sw = allocF64(n),
        so = allocF64(n);
      sw.set(weights);
      so.set(offset);
      expect(pr.X.buffer).toBeInstanceOf(SharedArrayBuffer);
      expect(fitAll({ ...pr, weights: sw, offset: so })).toEqual(serial);
      // Arrays outside shared memory: the passes quietly run on this thread, with the same result.
      expect(fitAll({ ...base, weights, offset })).toEqual(serial);
    } finally {
      installRowPool(null);
      await np.close();
    }
  }, 60_000);

  it('reports a helper that fails instead of returning partial sums', () => {
    installRowPool(inlinePool(2, true));
    expect(() => newtonLogistic(problem(n, p, 3), { tol: 1e-10 })).toThrow(/helper thread failed/);
  });
});

describe('takeBuffer / giveBackBuffers', () => {
  it('hands a returned buffer out again for the same length and kind, and a fresh one otherwise', () => {
    const a = takeBuffer(1000, false);
    giveBackBuffers(a);
    expect(takeBuffer(1000, false)).toBe(a);
    giveBackBuffers(a);
    expect(takeBuffer(1000, true)).not.toBe(a);
    expect(takeBuffer(999, false)).not.toBe(a);
  });
});

describe('a non-finite value in X', () => {
  // X is not scanned before the fit: the first pass over it must reveal any NaN or ±∞ (common practice: NaN·0 and
  // ∞·0 are NaN in IEEE 754), whatever the start, the case weight of that row, and the path (small n or large n).
  it.each([
    [NaN, 'zero start', 200],
    [Infinity, 'zero start', 200],
    [-Infinity, 'nonzero start', 200],
    [Infinity, 'zero weight on that row', 200],
    [NaN, 'zero start', 40_000],
    [-Infinity, 'nonzero start', 40_000],
  ])('%s (%s, n = %i) is reported with its position and column', (bad, how, n) => {
    const pr = problem(n, 3, 17);
    const row = n - 7,
      col = 2;
    pr.X[col * n + row] = bad;
    if (how === 'nonzero start') pr.start = Float64Array.from([0.1, -0.2, 0.3]);
    if (how === 'zero weight on that row') {
      pr.weights = new Float64Array(n).fill(1);
      pr.weights[row] = 0;
    }
    expect(() => newtonLogistic(pr, { tol: 1e-10 })).toThrow(`value number ${row + 1} of design column ${col + 1}.`);
  });
});
