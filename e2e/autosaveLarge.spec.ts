import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from '@playwright/test';
import { expect, shot, test } from './guard';

mkdirSync('/tmp/shots', { recursive: true });

const ROWS = 300_000;
const COLS = 20;

/** A 300 000 × 20 CSV (about 40 MB): an outcome y and 19 numeric predictors, from a fixed-seed generator. */
function bigCsvFile(): string {
  let state = 12345;
  const next = () => (state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32;
  const lines = [['y', ...Array.from({ length: COLS - 1 }, (_, j) => `x${j + 1}`)].join(',')];
  for (let i = 0; i < ROWS; i++) {
    const row = [next() < 0.3 ? '1' : '0'];
    for (let j = 1; j < COLS; j++) row.push((next() * 100).toFixed(3));
    lines.push(row.join(','));
  }
  const path = join(mkdtempSync(join(tmpdir(), 'fulcra-big-')), 'big.csv');
  writeFileSync(path, lines.join('\n'));
  return path;
}

/** Records the page's long tasks (main thread busy over 50 ms) from the start, before any script runs. */
async function watchLongTasks(page: Page) {
  await page.addInitScript(() => {
    const w = window as unknown as { longTasks: { start: number; duration: number }[] };
    w.longTasks = [];
    new PerformanceObserver((list) => {
      for (const e of list.getEntries()) w.longTasks.push({ start: e.startTime, duration: e.duration });
    }).observe({ type: 'longtask', buffered: true });
  });
}

/** A value from idb-keyval's store (the one the worker writes), read straight from IndexedDB. */
function stored(page: Page, key: string): Promise<unknown> {
  return page.evaluate(
    (k) =>
      new Promise((resolve, reject) => {
        const open = indexedDB.open('keyval-store');
        open.onerror = () => reject(open.error);
        open.onsuccess = () => {
          const req = open.result.transaction('keyval').objectStore('keyval').get(k);
          req.onsuccess = () => {
            const v = req.result as { columns?: { pieces: string[] }[]; dataId?: string } | undefined;
            // Only the shape crosses back: the pieces themselves stay in the page.
            resolve(v && 'columns' in v ? { dataId: v.dataId, pieces: v.columns!.map((c) => c.pieces.length) } : v);
            open.result.close();
          };
          req.onerror = () => reject(req.error);
        };
      }),
    key,
  );
}

const SUMMARY = '300,000 rows × 20 columns';

test.describe('autosave of a large data set', () => {
  test.describe.configure({ timeout: 240_000 });
  let csv = '';
  test.beforeAll(() => {
    csv = bigCsvFile();
  });

  test('keeps 300 000 × 20 without blocking the page, and brings it back after a reload', async ({ page }) => {
    await watchLongTasks(page);
    await page.goto('/');
    await page.getByTestId('file-input').setInputFiles(csv);
    await expect(page.getByText(SUMMARY)).toBeVisible({ timeout: 120_000 });
    const from = await page.evaluate(() => performance.now());
    await expect(page.getByTestId('autosaved')).toBeVisible({ timeout: 120_000 });
    const to = await page.evaluate(() => performance.now());
    const all = await page.evaluate(
      () => (window as unknown as { longTasks: { start: number; duration: number }[] }).longTasks,
    );
    const tasks = all.filter((t) => t.start + t.duration >= from && t.start <= to);
    const longest = Math.max(0, ...tasks.map((t) => t.duration));
    const longestAll = Math.max(0, ...all.map((t) => t.duration));
    console.log(
      `long tasks on the page: ${all.length} in all (longest ${Math.round(longestAll)} ms); ` +
        `save window ${Math.round(to - from)} ms, longest task in it ${Math.round(longest)} ms`,
    );
    // A guard against building or cloning the data record on the page's thread (the old autosave froze it for
    // seconds at 10^6 × 50), not a speed benchmark: the bound is generous on purpose.
    expect(longest).toBeLessThan(500);
    // The worker wrote the data in pieces (one per column at this size) under a manifest; no single big record.
    expect(await stored(page, 'fulcra:workspace:kept:manifest')).toMatchObject({ pieces: Array(COLS).fill(1) });
    expect(await stored(page, 'fulcra:workspace:data')).toBeUndefined();

    await page.reload();
    const restored = page.getByRole('status').filter({ hasText: /^Restored your work from/ });
    await expect(restored).toBeVisible({ timeout: 120_000 });
    await expect(page.getByText(SUMMARY)).toBeVisible();
    await expect(page.getByTestId('source')).toContainText('big.csv');
    await shot(page, 'autosave-large-restored');
  });

  test('storage that refuses the data: a plain notice, the file offered, and the reload says so', async ({
    page,
    baseURL,
  }) => {
    // Chromium's storage for this origin cut to 2 MB: the settings fit, the first 2.4 MB column piece does not.
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Storage.overrideQuotaForOrigin', { origin: new URL(baseURL!).origin, quotaSize: 2_000_000 });
    await page.goto('/');
    await page.getByTestId('file-input').setInputFiles(csv);
    await expect(page.getByText(SUMMARY)).toBeVisible({ timeout: 120_000 });
    const refused = page.getByRole('alert').filter({ hasText: 'could not be kept in this browser' });
    await expect(refused).toBeVisible({ timeout: 120_000 });
    await expect(refused).toContainText(
      /Your data \(big\.csv: 300,000 rows × 20 columns, \d+ MB\) could not be kept in this browser: the browser’s/,
    );
    await expect(refused).toContainText('storage for this page is full. Only the settings were kept');
    await shot(page, 'autosave-large-refused');
    const download = page.waitForEvent('download', { timeout: 120_000 });
    await refused.getByRole('button', { name: 'Save workspace as a file' }).click();
    expect((await download).suggestedFilename()).toMatch(/\.fulcra-workspace\.json\.gz$/);
    await expect(refused).toBeVisible();

    await page.reload();
    const missing = page.getByRole('status').filter({ hasText: /could not be restored/ });
    await expect(missing).toBeVisible({ timeout: 30_000 });
    await expect(missing).toContainText(
      /could not be restored: its data \(big\.csv: 300,000 rows × 20 columns, \d+ MB\) could not be kept in this/,
    );
    await expect(missing).toContainText('storage for this page is full. Only its settings were kept.');
    await expect(missing).toContainText('Open big.csv again');
    await shot(page, 'autosave-large-missing-after-reload');
  });
});

test('kept data with a piece gone: the start page says the work could not be restored', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('autosaved')).toBeVisible({ timeout: 30_000 });
  await page.evaluate(
    () =>
      new Promise<void>((resolve, reject) => {
        const open = indexedDB.open('keyval-store');
        open.onsuccess = () => {
          const st = open.result.transaction('keyval', 'readwrite').objectStore('keyval');
          const req = st.getAllKeys();
          req.onsuccess = () => {
            const piece = (req.result as string[]).find((k) => /^fulcra:workspace:kept:.*:c1:0$/.test(k));
            if (!piece) return reject(new Error('no kept piece'));
            st.delete(piece).onsuccess = () => (open.result.close(), resolve());
          };
        };
        open.onerror = () => reject(open.error);
      }),
  );
  await page.reload();
  const missing = page.getByRole('status').filter({ hasText: /could not be restored/ });
  await expect(missing).toBeVisible({ timeout: 30_000 });
  await expect(missing).toContainText(
    'could not be restored: the data kept in this browser are incomplete (part 1 of 1',
  );
  await expect(missing).toContainText('Start the invented example again');
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  await shot(page, 'autosave-piece-missing');
});
