/**
 * The single file (`npm run build:single`) as a user gets it: built afresh into bench-out/single, its size (bytes
 * and gzip), and how soon it paints when opened from file:// in headless Chromium (Playwright, /usr/bin/chromium):
 * first-contentful-paint from the Performance API and the time until the app's first heading is laid out, both
 * from the page's navigation start, each the median of 3 fresh pages (a new browser context each). Also runnable
 * alone: `npx tsx src/cli/bench/singleFile.ts`.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { gzipSync } from 'node:zlib';
import type { Measurement } from './extras';
import { ensureSynth } from './synth';

const CHROMIUM = '/usr/bin/chromium';
const RUNS = 3;
const SIZE = 'single file size',
  GZIP = 'single file size, gzip',
  FCP = 'single file first contentful paint',
  HEADING = 'single file first heading';

/** One page's timings in ms from navigation start; null when the browser recorded none. */
export interface PaintRun {
  fcp: number | null;
  heading: number | null;
}

export async function singleFileBench(o: {
  out: string;
  log: (s: string) => void;
  /** The full record at this size from file:// on one thread and on all (null: not measured). */
  job?: { n: number; p: number; seed: number } | null;
}): Promise<Measurement[]> {
  const outDir = resolve(o.out, 'single');
  const file = join(outDir, 'fulcra.html');
  o.log('  vite build --mode single');
  // As `npm run build:single` (NODE_ENV=production: a test runner's NODE_ENV=test would build development React).
  const built = spawnSync(
    process.execPath,
    [resolve('node_modules/vite/bin/vite.js'), 'build', '--mode', 'single', '--outDir', outDir, '--emptyOutDir'],
    { encoding: 'utf8', env: { ...process.env, NODE_ENV: 'production' } },
  );
  if (built.status !== 0 || !existsSync(file)) {
    const why = `vite build --mode single failed: ${(built.stderr || built.stdout || '').trim().split('\n').pop()}`;
    return [SIZE, GZIP, FCP, HEADING].map((name) => failed(name, why));
  }
  const bytes = readFileSync(file);
  const gz = gzipSync(bytes, { level: 9 }).length;
  const rows: Measurement[] = [
    {
      name: SIZE,
      value: bytes.length / 1e6,
      unit: 'MB',
      detail: `${bytes.length} bytes, dist of npm run build:single (built into ${outDir})`,
    },
    {
      name: GZIP,
      value: gz / 1e6,
      unit: 'MB',
      detail: `${gz} bytes, gzip level 9 (Node zlib) of the same file`,
    },
  ];
  if (!existsSync(CHROMIUM)) {
    const why = `not run: no ${CHROMIUM}`;
    return [...rows, failed(FCP, why), failed(HEADING, why)];
  }
  o.log(`  ${RUNS} fresh pages from ${pathToFileURL(file).href}`);
  let runs: PaintRun[];
  try {
    runs = await paintRuns(pathToFileURL(file).href);
  } catch (e) {
    const why = `failed: ${e instanceof Error ? e.message.split('\n')[0] : String(e)}`;
    return [...rows, failed(FCP, why), failed(HEADING, why)];
  }
  const how = `median of ${RUNS} fresh pages (a new context each), file://, headless Chromium ${CHROMIUM}`;
  const jobs: Measurement[] = [];
  if (o.job) {
    const { n, p, seed } = o.job;
    const csv = ensureSynth(o.out, n, p, seed).csv;
    o.log(`  the full record at ${n}×${p} from file://, on one thread and on all`);
    for (const [label, query] of [
      ['one thread', '?threads=1'],
      ['all threads', ''],
    ] as const) {
      const name = `single file full record ${n}×${p}, ${label}`;
      try {
        const t = await wholeJobRun(pathToFileURL(file).href + query, csv, p);
        jobs.push({
          name,
          value: t.fitSeconds,
          unit: 's',
          detail:
            `"Fit the model" to the term tests shown (ML, profile limits and term tests, evaluation, diagnostics); ` +
            `import ${t.importSeconds.toFixed(2)} s (the file chosen by path to the data summary shown); ` +
            `${t.threads || 'no threads line'}; file://, headless Chromium ${CHROMIUM}`,
        });
      } catch (e) {
        jobs.push({
          name,
          value: NaN,
          unit: 's',
          detail: `failed: ${e instanceof Error ? e.message.split('\n')[0] : e}`,
        });
      }
    }
  }
  return [
    ...jobs,
    ...rows,
    timing(
      FCP,
      runs.map((r) => r.fcp),
      `performance 'first-contentful-paint'; ${how}`,
    ),
    timing(
      HEADING,
      runs.map((r) => r.heading),
      `the first h1–h6 laid out (box height > 0), at the next animation frame; ${how}`,
    ),
  ];
}

/**
 * Runs before the page's own scripts (and outside its policy): notes when a heading first has a box. Given as text,
 * not a function, so that no helper of the TypeScript runner (tsx names functions) ends up in the page.
 */
const HEADING_WATCH = `(() => {
  const seen = () => {
    const h = document.querySelector('h1, h2, h3, h4, h5, h6');
    if (!h || h.getBoundingClientRect().height === 0) return;
    observer.disconnect();
    requestAnimationFrame(() => { window.__headingAt = performance.now(); });
  };
  const observer = new MutationObserver(seen);
  observer.observe(document, { childList: true, subtree: true });
})();`;

/** Opens a page `runs` times, each in a fresh context, and reads its paint and heading times. */
export async function paintRuns(url: string, runs = RUNS): Promise<PaintRun[]> {
  const { chromium } = await import('@playwright/test');
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
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
    const out: PaintRun[] = [];
    for (let k = 0; k < runs; k++) {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
      try {
        const page = await context.newPage();
        await page.addInitScript(HEADING_WATCH);
        await page.goto(url);
        await page.waitForFunction(
          () =>
            (window as unknown as { __headingAt?: number }).__headingAt !== undefined &&
            performance.getEntriesByName('first-contentful-paint').length > 0,
          null,
          { timeout: 60_000 },
        );
        out.push(
          await page.evaluate(() => ({
            fcp: performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? null,
            heading: (window as unknown as { __headingAt?: number }).__headingAt ?? null,
          })),
        );
      } finally {
        await context.close();
      }
    }
    return out;
  } finally {
    await browser.close();
  }
}

/** The single file from `url` (file://): imports `csv`, fits y on x1..xp with the page's defaults, times both. */
export async function wholeJobRun(
  url: string,
  csv: string,
  p: number,
): Promise<{ importSeconds: number; fitSeconds: number; threads: string }> {
  const { chromium } = await import('@playwright/test');
  const browser = await chromium.launch({ executablePath: CHROMIUM, args: ['--no-sandbox', '--disable-gpu'] });
  try {
    const page = await browser.newPage({ viewport: { width: 1300, height: 1000 } });
    await page.goto(url);
    const t0 = Date.now();
    // by path: the local browser reads the file itself, as from a file dialog (a buffer would cross the protocol)
    await page.getByTestId('file-input').setInputFiles(csv);
    await page
      .getByText(/rows × \d+ columns/)
      .first()
      .waitFor({ timeout: 300_000 });
    const t1 = Date.now();
    await page.getByLabel('Outcome (yes/no)').selectOption('y');
    for (let j = 1; j <= p; j++) await page.getByRole('checkbox', { name: `x${j}`, exact: true }).check();
    const t2 = Date.now();
    await page.getByRole('button', { name: 'Fit the model' }).click();
    await page.getByRole('table', { name: 'Likelihood-ratio test per term' }).waitFor({ timeout: 600_000 });
    const t3 = Date.now();
    const line = page.getByTestId('fit-threads');
    const threads = (await line.count()) ? (await line.innerText()).trim() : '';
    return { importSeconds: (t1 - t0) / 1e3, fitSeconds: (t3 - t2) / 1e3, threads };
  } finally {
    await browser.close();
  }
}

function timing(name: string, values: (number | null)[], how: string): Measurement {
  const ok = values.filter((v): v is number => v !== null).sort((a, b) => a - b);
  if (ok.length < values.length) return failed(name, `a page recorded no time (${values.join(' / ')}); ${how}`);
  return {
    name,
    value: ok[Math.floor(ok.length / 2)],
    unit: 'ms',
    detail: `runs ${values.map((v) => v!.toFixed(0)).join(' / ')} ms; ${how}`,
  };
}

function failed(name: string, why: string): Measurement {
  return { name, value: NaN, unit: name.includes('size') ? 'MB' : 'ms', detail: why };
}

if (process.argv[1] && resolve(process.argv[1]) === resolve('src/cli/bench/singleFile.ts')) {
  const job = process.argv.includes('--quick') ? null : { n: 1e5, p: 50, seed: 20261202 };
  singleFileBench({ out: 'bench-out', log: (s) => process.stderr.write(s + '\n'), job }).then((r) =>
    process.stdout.write(JSON.stringify(r, null, 1) + '\n'),
  );
}
