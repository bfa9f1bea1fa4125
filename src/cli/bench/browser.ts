/**
 * Browser part of `npm run bench` (also runnable alone: `npx tsx src/cli/bench/browser.ts [--quick]`): builds the
 * small page in src/cli/bench/page with `vite build` (inline config, output bench-out/page), serves it with
 * `vite preview`, and in Chromium (Playwright, /usr/bin/chromium) imports the synthetic CSV and fits the main-effects
 * model through the real worker facade, recording the times and the main-thread long tasks (PerformanceObserver
 * 'longtask'). The CSV bytes are fetched before the timer; import timing starts when they are handed to the worker.
 */
import { copyFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { build, preview } from 'vite';
import type { PageResult } from './page/main';
import type { BrowserResult } from './report';
import { ensureSynth } from './synth';

export async function browserBench(o: {
  out: string;
  n: number;
  p: number;
  seed: number;
  log: (s: string) => void;
}): Promise<BrowserResult> {
  const how =
    'vite build + vite preview of src/cli/bench/page (real worker facade via Comlink), Chromium /usr/bin/chromium ' +
    `headless; ${o.n}×${o.p} CSV fetched first, then importFile + fitModel (ML, profile limits and term tests ` +
    'asked for, as the app asks; the size rule decides: both computed at 10⁶ × 20 since 2026-12-05)';
  const base: BrowserResult = {
    n: o.n,
    p: o.p,
    importSeconds: null,
    fitSeconds: null,
    longestTaskMs: null,
    longTasks: 0,
    how,
  };
  const root = resolve('src/cli/bench/page');
  const outDir = resolve(o.out, 'page');
  const f = ensureSynth(o.out, o.n, o.p, o.seed);
  await build({
    root,
    configFile: false,
    base: './',
    logLevel: 'warn',
    build: { outDir, emptyOutDir: true },
    worker: { format: 'es' },
  });
  copyFileSync(f.csv, join(outDir, 'bench.csv'));
  // The same cross-origin isolation headers as the app's preview, so that the engine worker starts its row pool.
  const headers = { 'Cross-Origin-Opener-Policy': 'same-origin', 'Cross-Origin-Embedder-Policy': 'require-corp' };
  const server = await preview({
    root,
    configFile: false,
    logLevel: 'warn',
    build: { outDir },
    preview: { host: '127.0.0.1', port: 4190, strictPort: false, headers },
  });
  const { chromium } = await import('@playwright/test');
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--no-first-run',
    ],
  });
  try {
    const page = await browser.newPage();
    const url = server.resolvedUrls?.local[0] ?? 'http://127.0.0.1:4190/';
    await page.goto(url);
    await page.waitForFunction(() => 'runBench' in window);
    o.log(`  page ${url}`);
    const r = await page.evaluate(
      ([p]) =>
        (window as unknown as { runBench: (u: string, p: number) => Promise<PageResult> }).runBench('./bench.csv', p),
      [o.p] as const,
    );
    const inference =
      [r.profiled ? 'profile limits' : '', r.termTested ? 'term tests' : ''].filter(Boolean).join(' and ') ||
      'Wald intervals only (the size rule skipped profile limits and term tests)';
    const threads =
      `${r.threads} thread${r.threads === 1 ? '' : 's'} for the fit's row passes ` +
      `(page ${r.isolated ? '' : 'not '}cross-origin isolated)`;
    if (!r.probeSeen)
      return {
        ...base,
        how: `${how}; ${threads}`,
        importSeconds: r.importSeconds,
        fitSeconds: r.fitSeconds,
        error: 'the long-task observer missed a deliberate 80 ms probe task',
      };
    return {
      ...base,
      how: `${how}; ${threads}; long-task observer verified with an 80 ms probe`,
      importSeconds: r.importSeconds,
      fitSeconds: r.fitSeconds,
      inference,
      longestTaskMs: Math.max(0, ...r.longTasksMs),
      longTasks: r.longTasksMs.length,
    };
  } catch (e) {
    return { ...base, error: e instanceof Error ? e.message.split('\n')[0] : String(e) };
  } finally {
    await browser.close();
    await new Promise<void>((res) => server.httpServer.close(() => res()));
  }
}

if (process.argv[1] && resolve(process.argv[1]) === resolve('src/cli/bench/browser.ts')) {
  const quick = process.argv.includes('--quick');
  browserBench({
    out: 'bench-out',
    n: quick ? 1e4 : 1e6,
    p: 20,
    seed: 20261202,
    log: (s) => process.stderr.write(s + '\n'),
  }).then((r) => process.stdout.write(JSON.stringify(r, null, 1) + '\n'));
}
