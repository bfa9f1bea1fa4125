/**
 * Row passes of a large logistic fit split into fixed chunks of rows, optionally spread over a pool of threads.
 *
 * Every full-data pass (η, loss, residuals and X'r in one go; or X'WX) is computed as one partial sum per chunk of
 * CHUNK_ROWS rows, and the partials are added in chunk order. The chunks do not depend on the number of threads,
 * so a fit gives bit-for-bit the same numbers on one thread, on two, or on eight, in Node and in the page.
 *
 * A pool is a host's business (worker_threads in Node: src/cli/nodeRowPool.ts; Web Workers inside the engine
 * worker: src/worker/rowPoolBrowser.ts). It needs SharedArrayBuffer, so the arrays a pass touches must live in
 * shared memory: `allocF64` hands out shared arrays while a pool is installed, and a pass whose arrays are not
 * shared simply runs on this thread. Synchronisation is by Atomics on a shared counter (allowed in workers and in
 * Node; never on a page's main thread, where the engine does not run).
 */
import { FulcraError } from '../core/data';
import { influenceRows, type InfluenceBlock } from './influenceKernel';
import { accumulateXtWX, logisticRows, logisticRowsOne, logisticRowsPair, ROW_BLOCK } from './kernels';
import { standardise, standardiseColumn, type Standardised } from './standardise';
import {
  createWasmDesign,
  WASM_XTWX_ROWS,
  wasmInformation,
  wasmLogisticRows,
  wasmLogisticRowsAll,
  wasmUsable,
  type WasmLayout,
} from './wasmPasses';

/** Groups of blocks in a subsample pass (fixed, so that the sums do not depend on the number of threads). */
const BLOCK_GROUPS = 4;

/** Seconds without any helper finishing after which a pooled pass gives up. */
const HELPER_TIMEOUT_S = 120;

/**
 * Rows per chunk (a multiple of the kernels' row blocks, 256 and 512). Small enough that the chunks of a fit of
 * 10⁵ rows split evenly over two threads (13 chunks: 6 and 7; with 32 768-row chunks one thread took 2 of 4 and
 * the other 1 plus a sliver, so a pass on 2 threads took 0.65 of one thread's time instead of 0.5), large enough
 * that the per-chunk partial sums cost nothing beside the pass.
 */
export const CHUNK_ROWS = 8_192;

/**
 * Rows from which a pool shares the passes: below, one pass takes less than a millisecond and the hand-over to the
 * helpers would cost more than it saves. Only where the chunks run changes, not their sums, so not the numbers.
 */
export const POOL_MIN_ROWS = 32_768;

/** One full-data pass, as sent to the pool's helpers (typed arrays over SharedArrayBuffers; beta is copied). */
export interface RowJob {
  op: 'logistic' | 'information' | 'logisticMany' | 'influence' | 'standardise';
  X: Float64Array;
  n: number;
  p: number;
  /** Rows per chunk (CHUNK_ROWS for full-data passes). */
  chunkRows: number;
  /** logistic: outcome, optional case weights and offset, the coefficients; fills eta and w over all rows. */
  y?: Float64Array;
  c?: Float64Array;
  offset?: Float64Array;
  beta?: Float64Array;
  eta?: Float64Array;
  /**
   * logisticMany: m coefficient vectors (m·p, vector q at q·p), taken in pairs (an odd last one alone);
   * only the losses (partLoss K·m) and scores (partG K·m·p, chunk k's vector q at (k·m + q)·p) come out.
   */
  betas?: Float64Array;
  m?: number;
  /** information on a row subsample: starts of blocks of `blockRows` rows; chunk k takes blocks [k·chunkRows, …). */
  blocks?: Int32Array;
  blockRows?: number;
  /** logistic: written (case weight × μ(1 − μ)); information: read; logisticMany: not used. */
  w?: Float64Array;
  /**
   * Per-chunk partials: loss (length K) and X'r (K·p) for 'logistic'; X'WX (K·p·p, row-major, both triangles) for
   * 'information'.
   */
  partLoss: Float64Array;
  partG: Float64Array;
  partH?: Float64Array;
  /** influence: one block of rows of the influence measures (every array in it shared), rows split by chunk. */
  influence?: InfluenceBlock;
  /** standardise: chunk k is design column k + 1; its centre, scale, centre/scale go to [0, p), [p, 2p), [2p, 3p). */
  moments?: Float64Array;
  /** Shared Int32Array(2): helpers that finished, and helpers that failed. */
  done: Int32Array;
  /** X's WebAssembly memory when it has one (allocDesign): the logistic passes then use the SIMD kernels. */
  wasm?: WasmLayout;
}

/** The kernel work of chunks [k0, k1) of a job (on whichever thread runs them). */
export function runChunks(
  job: RowJob,
  k0: number,
  k1: number,
  work: Float64Array = new Float64Array(ROW_BLOCK * job.p),
  slot = 0,
): void {
  const { X, n, p, chunkRows } = job;
  // The SIMD kernels when X lives in a WebAssembly memory with a scratch slot for this thread: the same bits.
  const L = wasmUsable(job.wasm, slot) ? job.wasm : null;
  if (job.op === 'standardise') {
    const M = job.moments!;
    const [center, scale, cos] = [0, 1, 2].map((q) => M.subarray(q * p, (q + 1) * p));
    for (let k = k0; k < k1; k++) standardiseColumn(X, X, n, k + 1, center, scale, cos);
    return;
  }
  for (let k = k0; k < k1; k++) {
    if (job.blocks) {
      // A row subsample: chunk k is the group of blocks [k·chunkRows, (k + 1)·chunkRows).
      const H = job.partH!.subarray(k * p * p, (k + 1) * p * p),
        B = job.blockRows!,
        one = new Float64Array(p * p);
      H.fill(0);
      for (let q = k * chunkRows; q < Math.min(job.blocks.length, (k + 1) * chunkRows); q++) {
        const s = job.blocks[q],
          e = Math.min(n, s + B);
        if (L && e - s <= WASM_XTWX_ROWS) wasmInformation(L, slot, job.w!, s, e, one);
        else accumulateXtWX(X, n, p, job.w!, one, work, s, e);
        for (let t = 0; t < p * p; t++) H[t] += one[t];
      }
      continue;
    }
    const a = k * chunkRows,
      b = Math.min(n, a + chunkRows);
    if (job.op === 'influence') influenceRows(job.influence!, a, b, L ?? undefined, slot);
    else if (job.op === 'logisticMany' && L) {
      // every vector on each block of rows while it is in cache: X is read from memory once per pass
      const m = job.m!;
      const G = job.partG.subarray(k * m * p, (k + 1) * m * p),
        loss = job.partLoss.subarray(k * m, (k + 1) * m);
      wasmLogisticRowsAll(L, slot, job.y!, job.betas!, m, job.c, job.offset, G, loss, a, b);
    } else if (job.op === 'logisticMany') {
      const m = job.m!,
        B = job.betas!,
        loss = new Float64Array(2);
      for (let q = 0; q < m; q += 2) {
        if (q === m - 1) {
          // an odd last vector alone (the same bits as in a pair, half the work)
          const gq = job.partG.subarray((k * m + q) * p, (k * m + q + 1) * p);
          logisticRowsOne(X, n, p, job.y!, B.subarray(q * p, (q + 1) * p), job.c, job.offset, gq, loss, a, b);
          job.partLoss[k * m + q] = loss[0];
          continue;
        }
        const r = q + 1,
          gq = job.partG.subarray((k * m + q) * p, (k * m + q + 1) * p),
          gr = job.partG.subarray((k * m + r) * p, (k * m + r + 1) * p);
        logisticRowsPair(
          X,
          n,
          p,
          job.y!,
          B.subarray(q * p, (q + 1) * p),
          B.subarray(r * p, (r + 1) * p),
          job.c,
          job.offset,
          gq,
          gr,
          loss,
          a,
          b,
        );
        job.partLoss[k * m + q] = loss[0];
        job.partLoss[k * m + r] = loss[1];
      }
    } else if (job.op === 'logistic' && L) {
      const gk = job.partG.subarray(k * p, (k + 1) * p);
      job.partLoss[k] = wasmLogisticRows(L, slot, job.y!, job.beta!, job.c, job.offset, job.eta!, job.w!, gk, a, b);
    } else if (job.op === 'logistic') {
      job.partLoss[k] = logisticRows(
        X,
        n,
        p,
        job.y!,
        job.beta!,
        job.c,
        job.offset,
        job.eta!,
        undefined,
        job.w!,
        job.partG.subarray(k * p, (k + 1) * p),
        a,
        b,
      );
    } else {
      const H = job.partH!.subarray(k * p * p, (k + 1) * p * p);
      if (L && b - a <= WASM_XTWX_ROWS) wasmInformation(L, slot, job.w!, a, b, H);
      else accumulateXtWX(X, n, p, job.w!, H, work, a, b);
    }
  }
}

/**
 * Chunks [k0, k1) of thread t out of `threads` (contiguous; when uneven the later threads take one more, so the
 * caller, thread 0, also has time to hand out the work).
 */
export function chunkRange(chunks: number, threads: number, t: number): [number, number] {
  return [Math.floor((t * chunks) / threads), Math.floor(((t + 1) * chunks) / threads)];
}

/** A started pool: runs a job's chunks over this thread and the helpers, returning when all are done. */
export interface RowPool {
  /** Threads including the caller's. */
  readonly threads: number;
  run(job: RowJob, chunks: number, work: Float64Array): void;
}

let installed: RowPool | null = null;

/** Makes the engine's large fits use this pool (null: one thread). */
export function installRowPool(pool: RowPool | null): void {
  installed = pool;
}

export function rowPoolThreads(): number {
  return installed?.threads ?? 1;
}

const sharedMemory = (): boolean => typeof SharedArrayBuffer !== 'undefined';

/** A zeroed Float64Array, in shared memory when asked for and available. */
const f64 = (length: number, shared: boolean): Float64Array =>
  shared && sharedMemory() ? new Float64Array(new SharedArrayBuffer(length * 8)) : new Float64Array(length);

/** A zeroed Float64Array, in shared memory while a pool is installed (so that the pool can read it). */
export function allocF64(length: number): Float64Array {
  return f64(length, installed !== null);
}

/** Designs placed in a WebAssembly memory (allocDesign), by their buffer. */
const designs = new WeakMap<ArrayBufferLike, WasmLayout>();
let wasmWanted = true;
/** Rows from which a design goes into a WebAssembly memory (below, a pass takes microseconds either way). */
export const WASM_MIN_ROWS = 2_048;

/** Whether allocDesign may use WebAssembly memory (tests and the bench compare the two; the numbers are the same). */
export function setWasmPasses(on: boolean): void {
  wasmWanted = on;
}

/**
 * A zeroed column-major n×p design for row passes: in a WebAssembly memory with a scratch slot per pool thread when
 * the SIMD kernels can run here (wasmPasses.ts; shared while a pool is installed), else as allocF64. Either way the
 * passes give the same bits; only their speed differs.
 */
export function allocDesign(n: number, p: number): Float64Array {
  if (wasmWanted && n >= WASM_MIN_ROWS) {
    const shared = installed !== null && sharedMemory();
    const L = createWasmDesign(n, p, shared, shared ? installed!.threads : 1);
    if (L) {
      const X = new Float64Array(L.memory.buffer, 0, n * p);
      designs.set(X.buffer, L);
      return X;
    }
  }
  return allocF64(n * p);
}

/**
 * The WebAssembly layout of an n×p design in memory from allocDesign: X must start where that design starts and fit
 * in it, with no more columns (a smaller design written into a larger one's room, as the diagnostics' blocks are).
 */
export function wasmLayoutOf(X: Float64Array, n: number, p: number): WasmLayout | undefined {
  const L = designs.get(X.buffer);
  if (!L || X.byteOffset !== 0 || p > L.p || n * p > L.n * L.p) return undefined;
  return L.n === n && L.p === p ? L : { ...L, n, p };
}

/** A zeroed Int32Array, in shared memory while a pool is installed. */
export function allocI32(length: number): Int32Array {
  return new Int32Array(installed && sharedMemory() ? new SharedArrayBuffer(length * 4) : new ArrayBuffer(length * 4));
}

/**
 * Length-n working buffers kept between fits of the same size (profile limits and term tests refit the same
 * rows many times): the first write to fresh memory costs a page fault per 4 kB, which on some machines is as
 * slow as a pass over the data. Contents are NOT zeroed; only buffers every pass overwrites belong here.
 */
const spares: Float64Array[] = [];
const MAX_SPARES = 8;

export function takeBuffer(length: number, shared: boolean): Float64Array {
  const k = spares.findIndex((a) => a.length === length && a.buffer instanceof ArrayBuffer !== shared);
  return k >= 0 ? spares.splice(k, 1)[0] : f64(length, shared);
}

/** Returns buffers from takeBuffer; buffers of another length than the newest are let go. */
export function giveBackBuffers(...arrays: Float64Array[]): void {
  for (const a of arrays) {
    for (let k = spares.length - 1; k >= 0; k--) if (spares[k].length !== a.length) spares.splice(k, 1);
    if (spares.length < MAX_SPARES && !spares.includes(a)) spares.push(a);
  }
}

const isShared = (a: Float64Array | undefined): boolean =>
  !a || (sharedMemory() && a.buffer instanceof SharedArrayBuffer);

/**
 * standardise(X, n, p, true) with the columns shared out over the pool (a column is worked through by one thread, as
 * on its own, so the numbers are the same on any number of threads); on this thread when X is not shared or small.
 */
export function standardiseInPlace(X: Float64Array, n: number, p: number): Standardised {
  const pool = installed && n >= POOL_MIN_ROWS && p > 2 && isShared(X) ? installed : null;
  if (!pool) return standardise(X, n, p, true);
  const moments = f64(3 * p, true);
  moments.fill(1, p, 2 * p); // scale 1 for the intercept and for columns that are all 0
  const none = f64(0, true);
  const done = new Int32Array(new SharedArrayBuffer(8));
  pool.run(
    { op: 'standardise', X, n, p, chunkRows: n, partLoss: none, partG: none, moments, done },
    p - 1,
    new Float64Array(ROW_BLOCK * p),
  );
  return {
    Z: X,
    center: moments.slice(0, p),
    scale: moments.slice(p, 2 * p),
    centerOverScale: moments.slice(2 * p, 3 * p),
  };
}

/**
 * Runs the passes of one problem (fixed X, y, weights, offset; eta/r/w buffers given per call): on the pool when
 * one is installed, the data span at least two chunks and every array is shared; otherwise on this thread, by the
 * same chunks. `chunkRows` (a multiple of 512) may be set smaller for a row subsample, as long as it does not
 * depend on the number of threads.
 */
export function createRowPasses(
  X: Float64Array,
  n: number,
  p: number,
  y: Float64Array | undefined,
  c: Float64Array | undefined,
  offset: Float64Array | undefined,
  chunkRows = CHUNK_ROWS,
) {
  if (chunkRows % 512 !== 0)
    throw new FulcraError('bad-argument', `chunkRows must be a multiple of 512, got ${chunkRows}.`);
  const K = Math.max(1, Math.ceil(n / chunkRows));
  const pool = installed && K > 1 && n >= POOL_MIN_ROWS && [X, y, c, offset].every(isShared) ? installed : null;
  const alloc = (len: number) => f64(len, pool !== null);
  const partLoss = alloc(K),
    partG = alloc(K * p);
  let partH: Float64Array | null = null;
  const done = new Int32Array(pool ? new SharedArrayBuffer(8) : new ArrayBuffer(8));
  const work = new Float64Array(ROW_BLOCK * p);
  const wasm = wasmLayoutOf(X, n, p);
  /** Runs `chunks` chunks of the job, on the pool when every array it touches is shared. */
  const exec = (job: RowJob, chunks: number, shared: boolean): void => {
    if (pool && shared) pool.run(job, chunks, work);
    else runChunks(job, 0, chunks, work);
  };
  /** out = the sum of `count` partials of `size` values, in chunk order. */
  const sumParts = (parts: Float64Array, count: number, size: number, out: Float64Array): Float64Array => {
    out.fill(0, 0, size);
    for (let k = 0; k < count; k++) for (let q = 0; q < size; q++) out[q] += parts[k * size + q];
    return out;
  };
  return {
    /** Whether the passes run on a pool. */
    pooled: pool !== null,
    /** −Σ cᵢ·loglikᵢ; fills eta, w = cμ(1 − μ) and g = X'(c(y − μ)), summing the chunks in order. */
    logistic(beta: ArrayLike<number>, eta: Float64Array, w: Float64Array, g: Float64Array): number {
      if (!y) throw new FulcraError('bad-argument', 'These row passes were set up without an outcome.');
      exec(
        {
          op: 'logistic',
          X,
          n,
          p,
          chunkRows,
          y,
          c,
          offset,
          beta: Float64Array.from(beta),
          eta,
          w,
          partLoss,
          partG,
          done,
          wasm,
        },
        K,
        isShared(eta) && isShared(w),
      );
      let loss = 0;
      for (let k = 0; k < K; k++) loss += partLoss[k];
      sumParts(partG, K, p, g);
      return loss;
    },
    /**
     * The losses −Σ cᵢ·loglikᵢ (into losses[q]) and scores X'(c(y − μ)) (into G, vector q at q·p) of m coefficient
     * vectors (betas, vector q at q·p) in one pass over the rows (logisticRowsPair), each summed over the chunks in
     * order: bit-for-bit what `logistic` gives for each vector alone. No η or weights are kept.
     */
    logisticMany(betas: Float64Array, m: number, losses: Float64Array, G: Float64Array): void {
      if (!y) throw new FulcraError('bad-argument', 'These row passes were set up without an outcome.');
      const pl = alloc(K * m),
        pg = alloc(K * m * p),
        b = alloc(m * p);
      b.set(betas.subarray(0, m * p));
      exec(
        { op: 'logisticMany', X, n, p, chunkRows, y, c, offset, betas: b, m, partLoss: pl, partG: pg, done, wasm },
        K,
        true,
      );
      sumVectorParts(pl, pg, K, m, p, losses, G);
    },
    /** X'WX (row-major, both triangles) into out, summing the chunks in order. */
    information(w: Float64Array, out: Float64Array): Float64Array {
      if (K === 1)
        return wasm && wasmUsable(wasm, 0) && n <= WASM_XTWX_ROWS
          ? wasmInformation(wasm, 0, w, 0, n, out)
          : accumulateXtWX(X, n, p, w, out, work);
      partH ??= alloc(K * p * p);
      exec({ op: 'information', X, n, p, chunkRows, w, partLoss, partG, partH, done, wasm }, K, isShared(w));
      return sumParts(partH, K, p * p, out);
    },
    /**
     * Σ wᵢxᵢxᵢ' over the rows of blocks [s, s + blockRows) (a row subsample; `blocks` sorted, not overlapping),
     * in BLOCK_GROUPS fixed groups of blocks summed in order.
     */
    informationOnBlocks(w: Float64Array, blocks: Int32Array, blockRows: number, out: Float64Array): Float64Array {
      const per = Math.ceil(blocks.length / BLOCK_GROUPS),
        groups = Math.ceil(blocks.length / per);
      partH ??= alloc(K * p * p);
      const partB = groups <= K ? partH : alloc(groups * p * p);
      exec(
        { op: 'information', X, n, p, chunkRows: per, w, blocks, blockRows, partLoss, partG, partH: partB, done, wasm },
        groups,
        isShared(w) && blocks.buffer instanceof SharedArrayBuffer,
      );
      return sumParts(partB, groups, p * p, out);
    },
    /**
     * The influence measures of the rows of one block (this problem's X is the block's design; influenceRows): on
     * the pool when every array of the block is shared. Per-row results: the same bits on any number of threads.
     */
    influence(block: Omit<InfluenceBlock, 'X' | 'n' | 'p'>): void {
      const full: InfluenceBlock = { ...block, X, n, p };
      const arrays = [full.y, full.beta, full.risk, full.pearson, full.deviance, full.leverage, full.maxD, full.maxS];
      const shared =
        [...arrays, full.C ?? undefined, full.sd ?? undefined, full.dfbetas ?? undefined].every(isShared) &&
        [full.maxDJ, full.maxSJ].every((a) => sharedMemory() && a.buffer instanceof SharedArrayBuffer);
      exec({ op: 'influence', X, n, p, chunkRows, influence: full, partLoss, partG, done, wasm }, K, shared);
    },
    /** An Int32Array the pool can read. */
    allocInt32: (len: number) => new Int32Array(pool ? new SharedArrayBuffer(len * 4) : new ArrayBuffer(len * 4)),
  };
}

/**
 * The losses (losses[q]) and scores (G, vector q at q·p) of m vectors from per-chunk partials (partLoss K·m,
 * partG K·m·p, as runChunks' logisticMany writes them), each summed over the K chunks in order: the one reduction of
 * the row pool and of row shards (rowShards.ts), so both give the same bits.
 */
export function sumVectorParts(
  partLoss: Float64Array,
  partG: Float64Array,
  K: number,
  m: number,
  p: number,
  losses: Float64Array,
  G: Float64Array,
): void {
  for (let q = 0; q < m; q++) {
    let loss = 0;
    for (let k = 0; k < K; k++) loss += partLoss[k * m + q];
    losses[q] = loss;
    const g = G.subarray(q * p, (q + 1) * p);
    g.fill(0);
    for (let k = 0; k < K; k++) for (let j = 0; j < p; j++) g[j] += partG[(k * m + q) * p + j];
  }
}

/** What a helper does with one message: its chunks of the job, then the count and a wake-up for the caller. */
export function helperRun(
  msg: { job: RowJob; k0: number; k1: number; slot?: number },
  work: { buf?: Float64Array },
): void {
  const need = ROW_BLOCK * msg.job.p;
  if (!work.buf || work.buf.length < need) work.buf = new Float64Array(need);
  try {
    runChunks(msg.job, msg.k0, msg.k1, work.buf, msg.slot ?? 0);
  } catch {
    Atomics.add(msg.job.done, 1, 1);
  } finally {
    Atomics.add(msg.job.done, 0, 1);
    Atomics.notify(msg.job.done, 0);
  }
}

/**
 * The caller's side of a pool over helpers that take messages: sends each helper its chunks, runs chunk range 0
 * here, then waits (Atomics.wait) until every helper has counted itself done.
 */
export function messagePool(helpers: { postMessage(m: unknown): void }[]): RowPool {
  const threads = helpers.length + 1;
  return {
    threads,
    run(job, chunks, work) {
      Atomics.store(job.done, 0, 0);
      Atomics.store(job.done, 1, 0);
      helpers.forEach((h, i) => {
        const [k0, k1] = chunkRange(chunks, threads, i + 1);
        h.postMessage({ job, k0, k1, slot: i + 1 });
      });
      const [k0, k1] = chunkRange(chunks, threads, 0);
      runChunks(job, k0, k1, work);
      let waited = 0,
        last = -1;
      for (;;) {
        const d = Atomics.load(job.done, 0);
        if (d >= helpers.length) break;
        if (d !== last) {
          last = d;
          waited = 0;
        }
        // A helper that never answers (killed by the host) must not hang the fit for ever.
        if (Atomics.wait(job.done, 0, d, 1000) === 'timed-out' && ++waited >= HELPER_TIMEOUT_S) {
          throw new FulcraError(
            'internal',
            `A helper thread did not finish its share of the rows within ${HELPER_TIMEOUT_S} s.`,
            'Reload the page (or rerun the command); the fit then starts again.',
          );
        }
      }
      if (Atomics.load(job.done, 1) > 0) {
        throw new FulcraError(
          'internal',
          'A helper thread failed while summing its rows.',
          'Reload the page (or rerun the command); the fit then starts again.',
        );
      }
    },
  };
}
