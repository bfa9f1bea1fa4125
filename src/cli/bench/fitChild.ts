/**
 * Child process of `npm run bench`: loads one synthetic data set from its float64 files, times Fulcra's
 * logistic fit (the same newtonLogistic the worker runs, on `threads` threads: a row pool as the page starts
 * one) and prints one JSON line. Run in its own process so that its peak RSS measures the fit alone.
 * Arguments: JSON of FitChildArgs.
 */
import { resourceUsage } from 'node:process';
import { newtonLogistic } from '../../engine/fitting';
import { allocF64, installRowPool } from '../../engine/numerics';
import { startNodeRowPool } from '../nodeRowPool';
import { readBin } from './synth';

export interface FitChildArgs {
  xBin: string;
  yBin: string;
  n: number;
  p: number;
  tol: number;
  repeats: number;
  /** Also compute the tightly converged reference (full Newton steps from the estimate until no decrease). */
  polish: boolean;
  /** Threads for the engine's row passes (a worker_threads pool when > 1, started before the timer). */
  threads: number;
}

export interface FitChildResult {
  seconds: number[];
  /** Process CPU seconds (user + system) of each repeat. */
  cpuSeconds: number[];
  iterations: number;
  converged: boolean;
  beta: number[];
  tight?: number[];
  /** Peak resident set size of this process (bytes) and the size of the float64 design incl. intercept. */
  maxRssBytes: number;
  /** RSS just before the data were allocated (the Node + tsx runtime and the pool), to report what data + fit add. */
  baselineRssBytes: number;
  designBytes: number;
}

async function main(): Promise<void> {
  const a = JSON.parse(process.argv[2]) as FitChildArgs;
  const { n, p } = a;
  const q = p + 1;
  const pool = a.threads > 1 ? await startNodeRowPool(a.threads) : undefined;
  if (pool) installRowPool(pool.pool);
  const baselineRssBytes = process.memoryUsage.rss();
  const X = allocF64(n * q);
  X.fill(1, 0, n);
  readBin(a.xBin, X.subarray(n));
  const y = allocF64(n);
  readBin(a.yBin, y);
  const seconds: number[] = [],
    cpuSeconds: number[] = [];
  let last: ReturnType<typeof newtonLogistic> | undefined;
  for (let r = 0; r < a.repeats; r++) {
    const c0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    last = newtonLogistic({ X, n, p: q, y }, { tol: a.tol, maxIter: 100 });
    seconds.push(Number(process.hrtime.bigint() - t0) / 1e9);
    const c = process.cpuUsage(c0);
    cpuSeconds.push((c.user + c.system) / 1e6);
  }
  const out: FitChildResult = {
    seconds,
    cpuSeconds,
    iterations: last!.iterations,
    converged: last!.converged,
    beta: Array.from(last!.beta),
    maxRssBytes: resourceUsage().maxRSS * 1024,
    baselineRssBytes,
    designBytes: n * q * 8,
  };
  if (a.polish) {
    const t = newtonLogistic({ X, n, p: q, y, start: last!.beta }, { tol: 1e-300, maxIter: 3 });
    out.tight = Array.from(t.beta);
  }
  await pool?.close();
  process.stdout.write(JSON.stringify(out) + '\n');
}

void main();
