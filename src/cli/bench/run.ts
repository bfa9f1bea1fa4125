import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import type { FitChildArgs, FitChildResult } from './fitChild';
import type { SynthFiles } from './synth';
import { ONE_THREAD } from './report';

const here = join(process.cwd(), 'src', 'cli', 'bench');

/** One timed fit: Fulcra or a reference library. */
export interface FitTiming {
  who: string;
  library: string;
  seconds: number[];
  cpuSeconds: number[];
  median: number;
  iterations: number | null;
  beta: number[];
  /** max_j |β_j − β*_j| / |β*_j| against the tightly converged β*. */
  gap: number | null;
  maxRssBytes?: number;
  /** Peak RSS minus the RSS of the runtime before the data were loaded. */
  addedRssBytes?: number;
  notes: string[];
}

export const median = (v: number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
};

export const maxRelGap = (b: number[], ref: number[]): number => {
  let g = 0;
  for (let j = 0; j < ref.length; j++) g = Math.max(g, Math.abs(b[j] - ref[j]) / Math.max(Math.abs(ref[j]), 1e-300));
  return g;
};

/** Threads the reference libraries may use: stated in the output; the caller's settings win. */
export function referenceThreads(): Record<string, string> {
  const cores = String(availableParallelism());
  return {
    OPENBLAS_NUM_THREADS: process.env.OPENBLAS_NUM_THREADS ?? cores,
    OMP_NUM_THREADS: process.env.OMP_NUM_THREADS ?? cores,
  };
}

/** What a reference script (reference/sklearn_fit.py, reference/glm_fit.R) prints as its last line. */
interface ReferenceResult {
  library: string;
  seconds: number[];
  cpuSeconds: number[];
  iterations: number;
  beta: number[];
  /** sklearn only: the BLAS libraries and their thread counts, and the first line of each warning. */
  threads?: string[];
  warnings?: string[];
  /** R only. */
  converged?: boolean;
}

/** Runs a child that prints one JSON line last; the caller names the shape it prints. */
export function runJson<T>(
  cmd: string,
  args: string[],
  env?: Record<string, string>,
): { ok: true; value: T } | { ok: false; error: string } {
  const r = spawnSync(cmd, args, { encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, ...env } });
  if (r.error) return { ok: false, error: String(r.error.message) };
  if (r.status !== 0)
    return { ok: false, error: (r.stderr || r.stdout || `exit ${r.status}`).trim().split('\n').slice(-3).join(' | ') };
  const line = r.stdout.trim().split('\n').pop() ?? '';
  try {
    return { ok: true, value: JSON.parse(line) as T };
  } catch {
    return { ok: false, error: `unreadable output: ${line.slice(0, 200)}` };
  }
}

/** Times the engine in a child process on `threads` threads (1: no pool). */
export function fulcraFit(
  f: SynthFiles,
  threads: number,
  repeats: number,
  polish: boolean,
): { timing: FitTiming; tight?: number[] } | { error: string } {
  const args: FitChildArgs = { xBin: f.xBin, yBin: f.yBin, n: f.n, p: f.p, tol: 1e-10, repeats, polish, threads };
  const r = runJson<FitChildResult>(process.execPath, [
    '--import',
    'tsx',
    join(here, 'fitChild.ts'),
    JSON.stringify(args),
  ]);
  if (!r.ok) return { error: r.error };
  const v = r.value;
  return {
    timing: {
      who: threads === 1 ? ONE_THREAD : 'Fulcra engine',
      library:
        'Fulcra newtonLogistic (src/engine/fitting/newton.ts, tol 1e-10), Node, ' +
        (threads === 1
          ? '1 thread'
          : `${threads} threads (worker_threads row pool, src/cli/nodeRowPool.ts, started before the timer)`),
      seconds: v.seconds,
      cpuSeconds: v.cpuSeconds,
      median: median(v.seconds),
      iterations: v.iterations,
      beta: v.beta,
      gap: null,
      maxRssBytes: v.maxRssBytes,
      addedRssBytes: v.maxRssBytes - v.baselineRssBytes,
      notes: [
        v.converged ? '' : 'not converged',
        `${threads} thread${threads === 1 ? '' : 's'}; peak RSS ${(v.maxRssBytes / 2 ** 20).toFixed(0)} MiB ` +
          `(runtime ${(v.baselineRssBytes / 2 ** 20).toFixed(0)} MiB before data) = ` +
          `${(v.maxRssBytes / v.designBytes).toFixed(2)} × design; ` +
          `data + fit ${((v.maxRssBytes - v.baselineRssBytes) / v.designBytes).toFixed(2)} × design`,
      ].filter(Boolean),
    },
    tight: v.tight,
  };
}

export function sklearnFit(
  f: SynthFiles,
  solver: 'newton-cholesky' | 'lbfgs',
  repeats: number,
): FitTiming | { error: string } {
  const py = '/usr/bin/python3';
  if (!existsSync(py)) return { error: `${py} not found` };
  const r = runJson<ReferenceResult>(
    py,
    [
      join(here, 'reference', 'sklearn_fit.py'),
      f.xBin,
      f.yBin,
      String(f.n),
      String(f.p),
      solver,
      '1e-10',
      String(repeats),
    ],
    referenceThreads(),
  );
  if (!r.ok) return { error: r.error };
  const v = r.value;
  return {
    who: `sklearn ${solver}`,
    library: `${v.library}; BLAS ${(v.threads ?? []).join(', ')}`,
    seconds: v.seconds,
    cpuSeconds: v.cpuSeconds,
    median: median(v.seconds),
    iterations: v.iterations,
    beta: v.beta,
    gap: null,
    notes: v.warnings ?? [],
  };
}

export function glmFit(f: SynthFiles, repeats: number): FitTiming | { error: string } {
  const r = runJson<ReferenceResult>(
    'Rscript',
    [join(here, 'reference', 'glm_fit.R'), f.xBin, f.yBin, String(f.n), String(f.p), '1e-10', String(repeats)],
    referenceThreads(),
  );
  if (!r.ok) return { error: r.error };
  const v = r.value;
  return {
    who: 'R glm.fit',
    library: `${v.library} (LINPACK QR, no multithreaded BLAS in the IRLS loop)`,
    seconds: v.seconds,
    cpuSeconds: v.cpuSeconds,
    median: median(v.seconds),
    iterations: v.iterations,
    beta: v.beta,
    gap: null,
    notes: v.converged ? [] : ['not converged'],
  };
}
