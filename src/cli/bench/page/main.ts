/**
 * Minimal benchmark page: the real worker facade (src/worker/fulcra.worker.ts) through Comlink, as the app
 * uses it, plus a PerformanceObserver for main-thread long tasks. Driven by src/cli/bench/browser.ts.
 */
import * as Comlink from 'comlink';
import type { FulcraApi } from '../../../worker/fulcra.worker';

const longTasks: number[] = [];
new PerformanceObserver((list) => {
  for (const e of list.getEntries()) longTasks.push(e.duration);
}).observe({ type: 'longtask', buffered: true });

const worker = new Worker(new URL('../../../worker/fulcra.worker.ts', import.meta.url), { type: 'module' });
const api = Comlink.wrap<FulcraApi>(worker);

export interface PageResult {
  importSeconds: number;
  fitSeconds: number;
  longTasksMs: number[];
  probeSeen: boolean;
  nRows: number;
  coefficients: number[];
  /** Threads of the engine's row pool in this page (1 when the page is not cross-origin isolated). */
  threads: number;
  isolated: boolean;
  /** Whether the record has profile-likelihood limits and term tests (the size rule may skip either). */
  profiled: boolean;
  termTested: boolean;
}

async function runBench(url: string, predictors: number): Promise<PageResult> {
  const buf = await (await fetch(url)).arrayBuffer();
  // Probe: a deliberate 80 ms task must be reported, or the observer does not work in this browser.
  const end = performance.now() + 80;
  while (performance.now() < end) {
    /* busy */
  }
  await new Promise((r) => setTimeout(r, 300));
  const probeSeen = longTasks.some((d) => d >= 70);
  longTasks.length = 0;
  const t0 = performance.now();
  const summary = await api.importFile(Comlink.transfer(buf, [buf]), 'bench.csv', {}, 'bench-import');
  const t1 = performance.now();
  const spec = {
    outcome: 'y',
    event: '1',
    terms: Array.from({ length: predictors }, (_, j) => ({ type: 'main' as const, column: `x${j + 1}` })),
  };
  const view = await api.fitModel({ spec, method: 'ml', level: 0.95, alpha: 1, profile: true }, 'bench-fit');
  const t2 = performance.now();
  await new Promise((r) => setTimeout(r, 200));
  document.getElementById('status')!.textContent = 'done';
  return {
    importSeconds: (t1 - t0) / 1e3,
    fitSeconds: (t2 - t1) / 1e3,
    longTasksMs: [...longTasks],
    probeSeen,
    nRows: (summary as { nRows?: number }).nRows ?? view.rowsUsed,
    coefficients: view.fit.coefficients.map((c) => c.estimate),
    threads: view.threads,
    isolated: crossOriginIsolated,
    profiled: view.fit.coefficients.some((c) => c.profileLower !== null),
    termTested: view.fit.terms.some((t) => t.lrChi2 !== null),
  };
}

(window as unknown as { runBench: typeof runBench }).runBench = runBench;
