/**
 * Row shards: the passes of profile limits and term tests shared with helper threads that cannot share memory
 * (a page without cross-origin isolation, and the single file from file://, have no SharedArrayBuffer).
 *
 * Each helper is sent its rows of a problem once (a contiguous range of whole CHUNK_ROWS chunks: its columns of X,
 * y, case weights, offset). Per pass only the coefficient vectors go out and only each chunk's loss and score come
 * back; the caller works its own chunks meanwhile and adds all partials in chunk order. The chunks and the kernel
 * (logisticRowsPair) are those of the row pool's logisticMany (rowPool.ts), so the sums are bit-for-bit the same on
 * one thread, on a shared-memory pool, and on any number of shards.
 *
 * A pass must be awaited, so only code written for it uses shards: the chord solves' async driver
 * (chordSolve.ts runChordSolversAsync, through fitAsync). Everything else runs on the caller's thread.
 */
import { FulcraError } from '../core/data';
import {
  allocDesign,
  CHUNK_ROWS,
  chunkRange,
  POOL_MIN_ROWS,
  runChunks,
  sumVectorParts,
  wasmLayoutOf,
  type RowJob,
} from './rowPool';
import { ROW_BLOCK } from './kernels';

/** One helper as the caller sees it (a MessagePort connected to a worker: portOf). */
export interface ShardPort {
  postMessage(message: unknown, transfer: Transferable[]): void;
  /** Sets the one listener for the helper's replies. */
  listen(onReply: (data: unknown) => void): void;
}

/** A MessagePort as a ShardPort. */
export function portOf(port: MessagePort): ShardPort {
  return {
    postMessage: (message, transfer) => port.postMessage(message, transfer),
    listen: (onReply) => {
      port.onmessage = (e) => onReply(e.data);
    },
  };
}

/** The rows of one problem, as the caller holds them. */
export interface ShardProblem {
  X: Float64Array;
  n: number;
  p: number;
  y: Float64Array;
  weights?: Float64Array;
  offset?: Float64Array;
}

type LoadMessage = {
  type: 'load';
  id: number;
  /** The helper's chunks [k0, k1) of the problem; its rows start at k0·CHUNK_ROWS. */
  k0: number;
  k1: number;
  rows: number;
  p: number;
  X: Float64Array;
  y: Float64Array;
  c?: Float64Array;
  offset?: Float64Array;
};
type PassMessage = { type: 'pass'; id: number; pass: number; betas: Float64Array; m: number };
/** A constant added to columns of the held rows, as the caller adds it to its own (add[k] to column k). */
type AddMessage = { type: 'add'; id: number; add: Float64Array };
type Reply =
  | { type: 'pass'; pass: number; partLoss: Float64Array; partG: Float64Array }
  | { type: 'failed'; pass: number; message: string };

/** Seconds a pass waits for a helper before it gives up (the caller then says so). */
const HELPER_TIMEOUT_S = 120;

/** The helper's side: keeps the rows it was last sent and answers each pass with its chunks' partial sums. */
export function shardHelper(post: (reply: Reply, transfer: Transferable[]) => void): (message: unknown) => void {
  let held: LoadMessage | null = null;
  return (message) => {
    const msg = message as LoadMessage | PassMessage | AddMessage | { type: 'drop' };
    if (msg.type === 'load' || msg.type === 'drop') {
      held = msg.type === 'load' ? msg : null;
      if (held) {
        // The rows into a WebAssembly memory where the SIMD kernels can run (the same bits as without).
        const X = allocDesign(held.rows, held.p);
        if (wasmLayoutOf(X, held.rows, held.p)) {
          X.set(held.X.subarray(0, held.rows * held.p));
          held = { ...held, X };
        }
      }
      return;
    }
    if (msg.type === 'add') {
      if (!held || held.id !== msg.id) return;
      const { X, rows } = held;
      msg.add.forEach((c, k) => {
        if (c !== 0) for (let i = 0; i < rows; i++) X[k * rows + i] += c;
      });
      return;
    }
    try {
      if (!held || held.id !== msg.id) throw new Error(`rows of problem ${msg.id} were never sent`);
      const chunks = held.k1 - held.k0,
        { m } = msg,
        p = held.p;
      const job: RowJob = {
        op: 'logisticMany',
        X: held.X,
        n: held.rows,
        p,
        chunkRows: CHUNK_ROWS,
        y: held.y,
        c: held.c,
        offset: held.offset,
        betas: msg.betas,
        m,
        partLoss: new Float64Array(chunks * m),
        partG: new Float64Array(chunks * m * p),
        done: new Int32Array(2),
        wasm: wasmLayoutOf(held.X, held.rows, p),
      };
      runChunks(job, 0, chunks, new Float64Array(ROW_BLOCK * p));
      post({ type: 'pass', pass: msg.pass, partLoss: job.partLoss, partG: job.partG }, [
        job.partLoss.buffer as ArrayBuffer,
        job.partG.buffer as ArrayBuffer,
      ]);
    } catch (e) {
      post({ type: 'failed', pass: msg.pass, message: e instanceof Error ? e.message : String(e) }, []);
    }
  };
}

export interface RowShards {
  /** Threads including the caller's. */
  readonly threads: number;
  /** Whether the passes of this problem go to the shards (enough rows, and each helper holds its rows). */
  use(problem: ShardProblem): boolean;
  /**
   * The caller added add[k] to every row of column k of the problem's X in place: the helpers holding its rows do
   * the same additions, so that their rows stay bit for bit the caller's (profileLimits shifts the columns for the
   * intercept's coordinate and back, which does not give back the same bits).
   */
  added(problem: ShardProblem, add: Float64Array): void;
  /** The helpers let the rows they hold go (the steps that used them ended). */
  release(): void;
  /**
   * Losses −Σ cᵢ·loglikᵢ (losses[q]) and scores X'(c(y − μ)) (G, vector q at q·p) of m coefficient vectors: what
   * rowPool's logisticMany gives, bit for bit.
   */
  logisticMany(
    problem: ShardProblem,
    betas: Float64Array,
    m: number,
    losses: Float64Array,
    G: Float64Array,
  ): Promise<void>;
}

let installed: RowShards | null = null;
/** The shards of the steps running now (runStepsAsync), told of in-place changes to a problem's X (added). */
let active: RowShards | null = null;

/** Makes fitAsync share the chord solves' passes with these shards (null: none). */
export function installRowShards(shards: RowShards | null): void {
  installed = shards;
}

export function rowShards(): RowShards | null {
  return installed;
}

/** The shards of the steps running now, if any (another fit meanwhile keeps to its own thread). */
export function activeShards(): RowShards | null {
  return active;
}

/** Sets the shards of the steps running now (null when they end); see active. */
export function setActiveShards(shards: RowShards | null): void {
  active = shards;
}

/** The caller added add[k] to column k of the problem's X: the active shards holding its rows do the same. */
export function columnsAdded(problem: ShardProblem, add: Float64Array): void {
  active?.added(problem, add);
}

/** The caller's side over helpers reached by messages (`ports`, one per helper). */
export function messageShards(ports: ShardPort[]): RowShards {
  const threads = ports.length + 1;
  let nextId = 0,
    nextPass = 0;
  /** The problem whose rows the helpers hold, and its id. */
  let loaded: { problem: ShardProblem; X: Float64Array; id: number } | null = null;
  const waiting = new Map<number, { left: number; fail: (e: Error) => void; got: (t: number, r: Reply) => void }>();
  ports.forEach((port, i) => {
    port.listen((data) => {
      const r = data as Reply;
      const w = waiting.get(r.pass);
      if (!w) return;
      if (r.type === 'failed') w.fail(new Error(r.message));
      else w.got(i + 1, r);
    });
  });
  const slice = (a: Float64Array | undefined, from: number, to: number) => (a ? a.slice(from, to) : undefined);
  const load = (problem: ShardProblem) => {
    const { X, n, p } = problem;
    const K = Math.ceil(n / CHUNK_ROWS),
      id = ++nextId;
    ports.forEach((port, i) => {
      const [k0, k1] = chunkRange(K, threads, i + 1);
      const a = k0 * CHUNK_ROWS,
        b = Math.min(n, k1 * CHUNK_ROWS),
        rows = b - a;
      const Xs = new Float64Array(rows * p);
      for (let j = 0; j < p; j++) Xs.set(X.subarray(j * n + a, j * n + b), j * rows);
      const msg: LoadMessage = {
        type: 'load',
        id,
        k0,
        k1,
        rows,
        p,
        X: Xs,
        y: problem.y.slice(a, b),
        c: slice(problem.weights, a, b),
        offset: slice(problem.offset, a, b),
      };
      const transfer = [Xs.buffer, msg.y.buffer, msg.c?.buffer, msg.offset?.buffer].filter(
        (t): t is ArrayBuffer => t instanceof ArrayBuffer,
      );
      port.postMessage(msg, transfer);
    });
    loaded = { problem, X, id };
  };
  return {
    threads,
    use(problem) {
      if (problem.n < POOL_MIN_ROWS) return false;
      // the same arrays as the rows last sent (a problem's X is changed in place only around the intercept's
      // profile, whose solves do not come here)
      if (!loaded || loaded.problem !== problem || loaded.X !== problem.X) load(problem);
      return true;
    },
    release() {
      if (!loaded) return;
      loaded = null;
      for (const port of ports) port.postMessage({ type: 'drop' }, []);
    },
    added(problem, add) {
      if (!loaded || loaded.problem !== problem) return;
      for (const port of ports) port.postMessage({ type: 'add', id: loaded.id, add: Float64Array.from(add) }, []);
    },
    async logisticMany(problem, betas, m, losses, G) {
      if (!loaded || loaded.problem !== problem)
        throw new FulcraError('internal', 'Row shards were asked for a pass over rows they do not hold.');
      const { X, n, p, y } = problem;
      const K = Math.ceil(n / CHUNK_ROWS),
        pass = ++nextPass;
      const partLoss = new Float64Array(K * m),
        partG = new Float64Array(K * m * p);
      const replies = new Promise<void>((resolve, reject) => {
        const timer = setTimeout(
          () => finish(new Error(`a helper thread did not answer within ${HELPER_TIMEOUT_S} s`)),
          HELPER_TIMEOUT_S * 1000,
        );
        function finish(e?: Error) {
          clearTimeout(timer);
          waiting.delete(pass);
          if (e) reject(e);
          else resolve();
        }
        waiting.set(pass, {
          left: ports.length,
          fail: finish,
          got(t, r) {
            if (r.type !== 'pass') return;
            const [k0] = chunkRange(K, threads, t);
            partLoss.set(r.partLoss, k0 * m);
            partG.set(r.partG, k0 * m * p);
            if (--this.left === 0) finish();
          },
        });
      });
      for (const port of ports)
        port.postMessage({ type: 'pass', id: loaded.id, pass, betas: betas.slice(0, m * p), m }, []);
      // this thread's chunks while the helpers work theirs
      const [k0, k1] = chunkRange(K, threads, 0);
      runChunks(
        {
          op: 'logisticMany',
          X,
          n,
          p,
          chunkRows: CHUNK_ROWS,
          y,
          c: problem.weights,
          offset: problem.offset,
          betas,
          m,
          partLoss,
          partG,
          done: new Int32Array(2),
          wasm: wasmLayoutOf(X, n, p),
        },
        k0,
        k1,
        new Float64Array(ROW_BLOCK * p),
      );
      try {
        await replies;
      } catch (e) {
        throw new FulcraError(
          'internal',
          `A helper thread failed while summing its rows (${e instanceof Error ? e.message : String(e)}).`,
          'Reload the page; the fit then starts again.',
        );
      }
      // as rowPool's logisticMany: each vector's sums over the chunks in order
      sumVectorParts(partLoss, partG, K, m, p, losses, G);
    },
  };
}
