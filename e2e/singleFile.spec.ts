import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os, { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { expect, test, type Page } from '@playwright/test';
import { generateDemo } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { faultLogCsv } from './helpers';
import { makeXlsx, type XCell } from '../tests/fixtures/bad-input/xlsxWriter';

/**
 * The single-file build (`vite build --mode single`), opened from disk the way a user opens a copy from a USB
 * stick. Built here into a temporary folder so the test never depends on a stale dist-single/.
 */
const ROOT = fileURLToPath(new URL('../', import.meta.url));
const ON_DISK = /^(file:|blob:|data:)/;
let outDir = '';
let pageUrl = '';

test.beforeAll(() => {
  test.setTimeout(240_000);
  outDir = mkdtempSync(join(tmpdir(), 'fulcra-single-'));
  execFileSync(
    'npx',
    ['vite', 'build', '--mode', 'single', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'error'],
    { cwd: ROOT, stdio: 'pipe', env: { ...process.env, NODE_ENV: 'production' } },
  );
  const file = join(outDir, 'fulcra.html');
  if (!existsSync(file)) throw new Error(`the single-file build wrote no ${file}`);
  pageUrl = pathToFileURL(file).href;
});

test.afterAll(() => {
  if (outDir) rmSync(outDir, { recursive: true, force: true });
});

/** Every request (started, failed, answered), console error and uncaught error of the page, and its workers. */
function watch(page: Page) {
  const requests: string[] = [];
  const errors: string[] = [];
  const workers: string[] = [];
  const failed: { url: string; error: string }[] = [];
  const responses: string[] = [];
  page.on('request', (r) => requests.push(r.url()));
  page.on('requestfailed', (r) => failed.push({ url: r.url(), error: r.failure()?.errorText ?? '' }));
  page.on('response', (r) => responses.push(r.url()));
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on('worker', (w) => workers.push(w.url()));
  return { requests, errors, workers, failed, responses };
}

test('is one HTML file that loads nothing but itself', () => {
  const html = readFileSync(fileURLToPath(pageUrl), 'utf8');
  const outsideOfItself = [
    ...html.replace(/<(script|style)\b[^>]*>[\s\S]*?<\/\1>/g, '').matchAll(/\b(?:src|href)\s*=\s*["']?([^"'\s>]+)/gi),
  ]
    .map((m) => m[1])
    .filter((u) => !u.startsWith('data:'));
  expect(outsideOfItself).toEqual([]);
  expect(html).toMatch(
    /<meta http-equiv="Content-Security-Policy" content="default-src 'none'; script-src 'wasm-unsafe-eval' 'sha256-/,
  );
});

test('from file:// it fits the demo in a blob worker, asking only file:/blob:/data:, logging no error', async ({
  page,
}) => {
  const seen = watch(page);
  await page.goto(pageUrl);
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 60_000 });

  const demo = generateDemo('ssi');
  const ref = fit(demo.dataset, demo.spec, { method: 'ml', level: 0.95, profile: true });
  for (const c of ref.coefficients) {
    await expect(table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`)).toHaveText(
      c.estimate.toFixed(4).replace('-', '−'),
    );
  }

  await page.getByRole('button', { name: 'Score & validate' }).click();
  await page.getByRole('button', { name: 'Predict the risk' }).click();
  await expect(page.getByTestId('score-result')).toContainText('Predicted risk');

  // The PDF is built in the worker, which in the single file runs under the page's policy (a blob: worker inherits it).
  const download = page.waitForEvent('download', { timeout: 60_000 });
  await page.getByRole('button', { name: 'Download the model summary (PDF)' }).click();
  const pdf = readFileSync(await (await download).path());
  expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');

  expect(seen.workers.length).toBeGreaterThanOrEqual(1);
  expect(
    seen.workers.every((u) => u.startsWith('blob:')),
    seen.workers.join(', '),
  ).toBe(true);
  expect(
    seen.requests.filter((u) => !ON_DISK.test(u)),
    'requests beyond file:/blob:/data:',
  ).toEqual([]);
  expect(seen.errors, 'console errors').toEqual([]);
});

test('its policy refuses connections, remote images, remote and injected scripts, and eval', async ({ page }) => {
  const seen = watch(page);
  await page.goto(pageUrl);
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  const probe = await page.evaluate(async () => {
    const refused: string[] = [];
    document.addEventListener('securitypolicyviolation', (e) => refused.push(e.effectiveDirective));
    let fetchFailed = false;
    try {
      await fetch('https://collector.example.com/upload', { method: 'POST', body: 'x' });
    } catch {
      fetchFailed = true;
    }
    new Image().src = 'https://images.example.com/pixel.png';
    const s = document.createElement('script');
    s.src = 'https://cdn.example.com/lib.js';
    document.head.append(s);
    const inline = document.createElement('script');
    inline.textContent = 'window.__inlineRan = true';
    document.head.append(inline);
    // Code given to page.evaluate itself is exempt from the policy; a string timer runs later as page code.
    (setTimeout as (code: string, ms: number) => number)('window.__evalRan = true', 0);
    await new Promise((r) => setTimeout(r, 500));
    const w = window as unknown as { __inlineRan?: boolean; __evalRan?: boolean };
    return {
      refused: [...new Set(refused)].sort(),
      fetchFailed,
      inlineRan: w.__inlineRan === true,
      evalRan: w.__evalRan === true,
    };
  });
  expect(probe.fetchFailed).toBe(true);
  expect(probe.inlineRan).toBe(false);
  expect(probe.evalRan).toBe(false);
  expect(probe.refused).toEqual(['connect-src', 'img-src', 'script-src', 'script-src-elem']);
  // Chromium reports a refused image or script as a request that failed with reason "csp" before reaching the network.
  await expect.poll(() => seen.failed.filter((f) => !ON_DISK.test(f.url)).length).toBe(2);
  expect(seen.failed.filter((f) => !ON_DISK.test(f.url)).map((f) => f.error)).toEqual(['csp', 'csp']);
  expect(
    seen.responses.filter((u) => !ON_DISK.test(u)),
    'responses from beyond file:/blob:/data:',
  ).toEqual([]);
});

test('its blob: worker inherits the policy: it can neither connect nor eval', async ({ page }) => {
  await page.goto(pageUrl);
  await expect.poll(() => page.workers().length).toBeGreaterThanOrEqual(1);
  const probe = await page.workers()[0].evaluate(async () => {
    const refused: string[] = [];
    self.addEventListener('securitypolicyviolation', (e) =>
      refused.push((e as SecurityPolicyViolationEvent).effectiveDirective),
    );
    // Without the policy a blob: fetch succeeds; a string timer is worker code (evaluate's own code is exempt).
    const blob = await fetch(URL.createObjectURL(new Blob(['x']))).then(
      () => 'fetched',
      () => 'refused',
    );
    (setTimeout as (code: string, ms: number) => number)('self.__evalRan = true', 0);
    await new Promise((r) => setTimeout(r, 300));
    return {
      blob,
      evalRan: (self as unknown as { __evalRan?: boolean }).__evalRan === true,
      refused: [...new Set(refused)].sort(),
    };
  });
  expect(probe).toEqual({ blob: 'refused', evalRan: false, refused: ['connect-src', 'script-src'] });
});

test('from file:// it imports a large Excel workbook (its unzipper starts a nested blob: worker)', async ({ page }) => {
  const seen = watch(page);
  const sheet: XCell[][] = [['case_id', 'ward', 'age', 'infected']];
  for (let i = 0; i < 20_000; i++)
    sheet.push([i + 1, `W${1 + (i % 5)}`, 40 + ((i * 7919) % 50), i % 9 === 0 ? 'yes' : 'no']);
  await page.goto(pageUrl);
  await page.getByTestId('file-input').setInputFiles({
    name: 'cases.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: Buffer.from(makeXlsx([{ name: 'Cases', rows: sheet }], true)),
  });
  await expect(page.getByText('20,000 rows × 4 columns')).toBeVisible({ timeout: 60_000 });
  expect(
    seen.requests.filter((u) => !ON_DISK.test(u)),
    'requests beyond file:/blob:/data:',
  ).toEqual([]);
  expect(seen.errors, 'console errors').toEqual([]);
});

test('from file:// its profile limits and term tests use every core and give the one-thread numbers', async ({
  browser,
}) => {
  test.setTimeout(180_000);
  const csv = Buffer.from(faultLogCsv(40_000, 22));
  /** The odds table and the term tests as shown, and the threads line, with `?threads=` set or not. */
  const run = async (query: string) => {
    const page = await browser.newPage();
    const seen = watch(page);
    await page.goto(pageUrl + query);
    expect(await page.evaluate(() => crossOriginIsolated)).toBe(false);
    await page.getByTestId('file-input').setInputFiles({ name: 'big.csv', mimeType: 'text/csv', buffer: csv });
    await expect(page.getByText('40,000 rows × 4 columns')).toBeVisible({ timeout: 60_000 });
    await page.getByLabel('Outcome (yes/no)').selectOption('fault');
    for (const name of ['dose', 'age', 'shift']) await page.getByRole('checkbox', { name }).check();
    await page.getByRole('button', { name: 'Fit the model' }).click();
    const terms = page.getByRole('table', { name: 'Likelihood-ratio test per term' });
    await expect(terms).toBeVisible({ timeout: 120_000 });
    const shown = {
      odds: await page.getByTestId('odds-table').innerText(),
      terms: await terms.innerText(),
      threads: (await page.getByTestId('fit-threads').count()) ? await page.getByTestId('fit-threads').innerText() : '',
      workers: seen.workers.length,
    };
    expect(seen.errors, 'console errors').toEqual([]);
    await page.close();
    return shown;
  };
  const one = await run('?threads=1');
  const all = await run('');
  const cores = Math.min(8, os.availableParallelism());
  expect(one.threads).toBe('');
  expect(one.workers).toBe(1);
  if (cores > 1) {
    expect(all.threads).toContain(`term tests ran on ${cores} threads`);
    expect(all.workers).toBe(cores);
  }
  expect(all.odds).toContain('1.0'); // a table of numbers, not a message
  expect(all.odds).toBe(one.odds);
  expect(all.terms).toBe(one.terms);
});

test('from file:// a large CSV is read in parts on every core, to what one thread reads', async ({ browser }) => {
  test.setTimeout(180_000);
  // Invented: about 20 MB (parts are read from 16 MB), a missing token, a text column, and a column whose one text
  // cell (row 350 002) lies in the second half, so its type and message come from a helper's part.
  const dir = mkdtempSync(join(tmpdir(), 'fulcra-parts-'));
  const file = join(dir, 'parts.csv');
  const lines = ['id,age,score,ward,late'];
  for (let i = 0; i < 400_000; i++) {
    const ward = ['north', 'south', 'ICU'][i % 3];
    const score = i % 97 === 0 ? 'NA' : ((i * 7919) % 10007) / 100;
    lines.push(`${i},${20 + (i % 70)},${score},${ward},${i === 350_000 ? 'unknown' : i % 5}`);
  }
  writeFileSync(file, lines.join('\n') + '\n');
  const run = async (query: string) => {
    const page = await browser.newPage();
    const seen = watch(page);
    await page.goto(pageUrl + query);
    await page.getByTestId('file-input').setInputFiles(file);
    await expect(page.getByText('400,000 rows × 5 columns')).toBeVisible({ timeout: 90_000 });
    // the grid fetches its visible rows from the worker after the summary shows ("…" until they arrive)
    await expect(page.getByRole('grid', { name: 'Data rows' })).not.toContainText('…');
    const shown = await page.locator('main').innerText();
    expect(seen.errors, 'console errors').toEqual([]);
    await page.close();
    return shown;
  };
  try {
    const one = await run('?threads=1');
    const all = await run('');
    expect(one).toContain('350002');
    expect(all).toBe(one);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
});
