/**
 * Child process of `npm run bench`: loads one synthetic data set from its float64 files, times Fulcra's
 * logistic fit (the same newtonLogistic the worker runs) and prints one JSON line. Run in its own process
 * so that its peak RSS measures the fit alone. Arguments: JSON of FitChildArgs.
 */
import { resourceUsage } from 'node:process';
import { newtonLogistic } from '../../engine/newton';
import { createPool } from './pool';
import { readBin } from './synth';
import { SOLVERS, type SolverName } from './solvers';

export interface FitChildArgs {
  xBin: string;
  yBin: string;
  n: number;
  p: number;
  solver: SolverName;
  tol: number;
  repeats: number;
  /** Also compute the tightly converged reference (full Newton steps from the estimate until no decrease). */
  polish: boolean;
  /** Threads for the prototype's row passes (worker_threads pool when > 1; started before the timer). */
  threads?: number;
}

export interface FitChildResult {
  solver: SolverName;
  seconds: number[];
  /** Process CPU seconds (user + system) of each repeat. */
  cpuSeconds: number[];
  iterations: number;
  converged: boolean;
  beta: number[];
  tight?: number[];
  /** Peak resident set size of this process (bytes) and the size of the float64 design incl. intercept. */
  maxRssBytes: number;
  /** RSS just before the data were allocated (the Node + tsx runtime), to report what data + fit add. */
  baselineRssBytes: number;
  designBytes: number;
}

async function main(): Promise<void> {
  const a = JSON.parse(process.argv[2]) as FitChildArgs;
  const { n, p } = a;
  const q = p + 1;
  const threads = a.threads ?? 1;
  const baselineRssBytes = process.memoryUsage.rss();
  const X = threads > 1 ? new Float64Array(new SharedArrayBuffer(n * q * 8)) : new Float64Array(n * q);
  X.fill(1, 0, n);
  readBin(a.xBin, X.subarray(n));
  const y = threads > 1 ? new Float64Array(new SharedArrayBuffer(n * 8)) : new Float64Array(n);
  readBin(a.yBin, y);
  const pool = threads > 1 ? await createPool(X, n, q, y, threads) : undefined;
  const solve = SOLVERS[a.solver];
  const seconds: number[] = [], cpuSeconds: number[] = [];
  let last: { beta: Float64Array; iterations: number; converged: boolean } | undefined;
  for (let r = 0; r < a.repeats; r++) {
    const c0 = process.cpuUsage();
    const t0 = process.hrtime.bigint();
    last = solve({ X, n, p: q, y }, a.tol, pool);
    seconds.push(Number(process.hrtime.bigint() - t0) / 1e9);
    const c = process.cpuUsage(c0);
    cpuSeconds.push((c.user + c.system) / 1e6);
  }
  const out: FitChildResult = {
    solver: a.solver, seconds, cpuSeconds, iterations: last!.iterations, converged: last!.converged, beta: Array.from(last!.beta),
    maxRssBytes: resourceUsage().maxRSS * 1024, baselineRssBytes, designBytes: n * q * 8,
  };
  if (a.polish) {
    const t = newtonLogistic({ X, n, p: q, y, start: last!.beta }, { tol: 1e-300, maxIter: 3 });
    out.tight = Array.from(t.beta);
  }
  await pool?.close();
  process.stdout.write(JSON.stringify(out) + '\n');
}

void main();
