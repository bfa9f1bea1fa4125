import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';
import { accumulateXtWX, lossGradientRows, ROW_BLOCK } from '../../engine/kernels';
import type { RowPasses } from './rowPasses';

/**
 * PROTOTYPE: RowPasses split by rows over this thread plus (threads − 1) worker_threads sharing X, y and the
 * buffers through SharedArrayBuffers; synchronised with Atomics (the same scheme works with Web Workers inside
 * the engine worker, where Atomics.wait is allowed, given cross-origin isolation for SharedArrayBuffer).
 * Each thread adds its rows' partial sums; the caller's thread sums the partials in a fixed order, so results
 * do not depend on timing.
 */
export interface PoolShared {
  X: Float64Array; y: Float64Array; n: number; p: number; threads: number;
  ctrl: Int32Array; beta: Float64Array; eta: Float64Array[]; r: Float64Array[]; w: Float64Array;
  lossPart: Float64Array; gPart: Float64Array; hPart: Float64Array;
}

export const OP_EXIT = 1, OP_LOSS_GRADIENT = 2, OP_INFORMATION = 3;

const sharedF64 = (len: number) => new Float64Array(new SharedArrayBuffer(len * 8));

export function rowRange(n: number, threads: number, t: number): [number, number] {
  const per = Math.ceil(n / threads / ROW_BLOCK) * ROW_BLOCK;
  return [Math.min(n, t * per), Math.min(n, (t + 1) * per)];
}

/** The work of thread t for the op in ctrl[2] (slot in ctrl[3]); shared with poolWorker.ts. */
export function runShare(s: PoolShared, t: number, work: Float64Array): void {
  const [a, b] = rowRange(s.n, s.threads, t);
  const op = s.ctrl[2], slot = s.ctrl[3];
  if (op === OP_LOSS_GRADIENT) {
    const g = s.gPart.subarray(t * s.p, (t + 1) * s.p);
    g.fill(0);
    s.lossPart[t] = lossGradientRows(s.X, s.n, s.p, s.y, s.beta, a, b, s.eta[slot], s.r[slot], g);
  } else if (op === OP_INFORMATION) {
    const rs = s.r[slot];
    for (let i = a; i < b; i++) { const mu = s.y[i] - rs[i]; s.w[i] = mu * (1 - mu); }
    accumulateXtWX(s.X, s.n, s.p, s.w, s.hPart.subarray(t * s.p * s.p, (t + 1) * s.p * s.p), work, a, b);
  }
}

export interface Pool extends RowPasses {
  close(): Promise<void>;
}

/** Starts the pool; X and y must live in SharedArrayBuffers. Resolves when every worker is ready. */
export async function createPool(X: Float64Array, n: number, p: number, y: Float64Array, threads: number): Promise<Pool> {
  if (!(X.buffer instanceof SharedArrayBuffer) || !(y.buffer instanceof SharedArrayBuffer)) throw new Error('createPool needs X and y in SharedArrayBuffers.');
  const s: PoolShared = {
    X, y, n, p, threads, ctrl: new Int32Array(new SharedArrayBuffer(16)), beta: sharedF64(p),
    eta: [sharedF64(n), sharedF64(n)], r: [sharedF64(n), sharedF64(n)], w: sharedF64(n),
    lossPart: sharedF64(threads), gPart: sharedF64(threads * p), hPart: sharedF64(threads * p * p),
  };
  const workers: Worker[] = [];
  await Promise.all(Array.from({ length: threads - 1 }, (_, k) => new Promise<void>((resolve, reject) => {
    // The .ts worker entry is loaded through tsx's CommonJS hook (tsx's --import hooks do not reach workers in Node 20).
    const entry = fileURLToPath(new URL('./poolWorker.ts', import.meta.url));
    const wk = new Worker(`require('tsx/cjs/api').register(); require(${JSON.stringify(entry)});`, { eval: true, workerData: { shared: s, index: k + 1 }, execArgv: [] });
    workers.push(wk);
    wk.once('message', () => resolve());
    wk.once('error', reject);
  })));
  const work = new Float64Array(ROW_BLOCK * p);
  const run = (op: number, slot: 0 | 1) => {
    s.ctrl[2] = op;
    s.ctrl[3] = slot;
    Atomics.store(s.ctrl, 1, 0);
    Atomics.add(s.ctrl, 0, 1);
    Atomics.notify(s.ctrl, 0);
    runShare(s, 0, work);
    for (;;) {
      const done = Atomics.load(s.ctrl, 1);
      if (done >= threads - 1) break;
      Atomics.wait(s.ctrl, 1, done);
    }
  };
  return {
    lossGradient(beta, slot, g) {
      s.beta.set(beta);
      run(OP_LOSS_GRADIENT, slot);
      g.fill(0);
      let loss = 0;
      for (let t = 0; t < threads; t++) {
        loss += s.lossPart[t];
        for (let j = 0; j < p; j++) g[j] += s.gPart[t * p + j];
      }
      return loss;
    },
    residuals: (slot) => s.r[slot],
    information(slot, out) {
      run(OP_INFORMATION, slot);
      out.fill(0);
      for (let t = 0; t < threads; t++) for (let k = 0; k < p * p; k++) out[k] += s.hPart[t * p * p + k];
      return out;
    },
    async close() {
      s.ctrl[2] = OP_EXIT;
      Atomics.add(s.ctrl, 0, 1);
      Atomics.notify(s.ctrl, 0);
      await Promise.all(workers.map((w) => w.terminate()));
    },
  };
}
