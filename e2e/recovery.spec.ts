import { gunzipSync } from 'node:zlib';
import type { Page } from '@playwright/test';
import { createRng } from '../src/engine/numerics/rng';
import { expect, shot, test } from './guard';

/** n invented rows (seeded) of 20 numeric predictors x1…x20 and a yes/no outcome. */
function wideCsv(n: number, p = 20): string {
  const rng = createRng(18);
  const lines = [[...Array.from({ length: p }, (_, j) => `x${j + 1}`), 'event'].join(',')];
  for (let i = 0; i < n; i++) {
    const x = Array.from({ length: p }, () => rng.normal());
    const eta = -1 + x.reduce((a, v, j) => a + (j % 4 === 0 ? 0.3 * v : 0), 0);
    lines.push([...x.map((v) => v.toFixed(3)), rng.next() < 1 / (1 + Math.exp(-eta)) ? 'yes' : 'no'].join(','));
  }
  return lines.join('\n');
}

async function loadWide(page: Page, n: number, url = '/') {
  await page.goto(url);
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'wide.csv', mimeType: 'text/csv', buffer: Buffer.from(wideCsv(n)) });
  await expect(page.getByText(`${n.toLocaleString('en')} rows × 21 columns`)).toBeVisible({ timeout: 60_000 });
  await page.getByLabel('Outcome (yes/no)').selectOption('event');
  for (let j = 1; j <= 20; j++) await page.getByRole('checkbox', { name: `x${j}`, exact: true }).check();
}

async function openSsi(page: Page) {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
}

const fitJob = (page: Page) => page.getByRole('status').filter({ hasText: /^Fitting the model/ });

test('a tampered workspace file is refused naming the field; the work on the page and in the browser stays', async ({
  page,
}) => {
  await openSsi(page);
  const odds = await page.getByTestId('odds-table').textContent();
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Save workspace as a file' }).click(),
  ]);
  const file = JSON.parse(
    gunzipSync(await (await download.createReadStream()).toArray().then(Buffer.concat)).toString(),
  );
  await page.waitForTimeout(1500); // autosave
  type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any
  const tampered: [string, (f: Json) => void, RegExp][] = [
    ['level-high', (f) => (f.workspace.extra.workbench.level = 'high'), /"workspace\.extra\.workbench\.level"/],
    [
      'no-levels',
      (f) => delete f.workspace.extra.summary.columns[0].levels,
      /"workspace\.extra\.summary\.columns\[0\]\.levels" is missing/,
    ],
    ['no-columns', (f) => delete f.workspace.extra.summary.columns, /"workspace\.extra\.summary\.columns" is missing/],
  ];
  for (const [name, tamper, field] of tampered) {
    const f = structuredClone(file);
    tamper(f);
    await page.getByTestId('workspace-input').setInputFiles({
      name: `${name}.fulcra-workspace.json`,
      mimeType: 'application/json',
      buffer: Buffer.from(JSON.stringify(f)),
    });
    const refusal = page.getByRole('alert').filter({ hasText: field });
    await expect(refusal).toBeVisible({ timeout: 20_000 });
    await expect(refusal).toContainText('Nothing was changed');
    if (name === 'level-high') await shot(page, 'recovery-tampered-refused');
    await expect(page.getByRole('status').filter({ hasText: /^Opened the workspace/ })).toHaveCount(0);
    expect(await page.getByTestId('odds-table').textContent()).toBe(odds);
    await refusal.getByRole('button', { name: /Dismiss/ }).click();
  }
  await page.reload();
  await expect(page.getByRole('status').filter({ hasText: /^Restored your work from/ })).toBeVisible({
    timeout: 30_000,
  });
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  expect(await page.getByTestId('odds-table').textContent()).toBe(odds);
});

test('roles changed while a fit runs: the result shows as out of date, also after a reload', async ({ page }) => {
  await loadWide(page, 40_000);
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(fitJob(page)).toBeVisible();
  await page
    .getByRole('button', { name: 'Data & roles' })
    .click()
    .catch(() => {});
  await page.getByRole('checkbox', { name: 'x20', exact: true }).uncheck();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 90_000 });
  await expect(page.locator('tr[data-name="x20"]')).toHaveCount(1);
  await expect(page.getByTestId('stale-banner')).toBeVisible();
  await shot(page, 'recovery-stale-after-running-fit');
  await page.waitForTimeout(1600);
  await page.reload();
  await expect(page.getByRole('status').filter({ hasText: /^Restored your work from/ })).toBeVisible({
    timeout: 60_000,
  });
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 90_000 });
  await expect(page.locator('tr[data-name="x20"]')).toHaveCount(1);
  await expect(page.getByTestId('stale-banner')).toBeVisible();
});

test('a standard fit shows its progress and Cancel stops it at once', async ({ page }) => {
  await loadWide(page, 40_000);
  await page.getByRole('button', { name: 'Fit the model' }).click();
  const job = fitJob(page);
  await expect(job).toContainText(/ — \d+ of \d+/, { timeout: 30_000 });
  await shot(page, 'recovery-fit-progress');
  const t0 = Date.now();
  await job.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByRole('status').filter({ hasText: /^The fit was cancelled/ })).toBeVisible({ timeout: 15_000 });
  expect(Date.now() - t0).toBeLessThan(10_000);
  await expect(fitJob(page)).toHaveCount(0);
  await expect(page.getByTestId('odds-table')).toHaveCount(0);
  // The engine holds the data again: a new fit runs.
  await page.getByRole('checkbox', { name: 'x20', exact: true }).uncheck();
  for (let j = 2; j <= 19; j++) await page.getByRole('checkbox', { name: `x${j}`, exact: true }).uncheck();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 60_000 });
});

test('after an engine crash at 200 000 × 20 on helper threads the page recovers (no 120 s hang), consistent', async ({
  page,
}) => {
  test.setTimeout(300_000);
  await loadWide(page, 200_000, '/?testhooks=1');
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 180_000 });
  const before = await page.getByTestId('odds-table').textContent();
  const t0 = Date.now();
  await page.evaluate(() =>
    (window as unknown as { fulcraTestHooks: { crashEngine(): Promise<void> } }).fulcraTestHooks.crashEngine(),
  );
  const notice = page.getByRole('status').filter({ hasText: /calculation engine stopped unexpectedly/ });
  await expect(notice).toContainText('the model was restored', { timeout: 60_000 });
  const took = Date.now() - t0;
  console.log(`recovery took ${took} ms`);
  // A guard against the old hang (helper threads never ended: 123 s), not the speed target: the ≤ 10 s of the
  // issue was measured at 4.5 s on an idle 2-core machine and 10.8 s with two other test runs beside it.
  expect(took).toBeLessThan(30_000);
  expect(await page.getByTestId('odds-table').textContent()).toBe(before);
  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(page.getByTestId('tp')).toBeVisible();
  await expect(page.getByText('No model has been fitted yet')).toHaveCount(0);
  await shot(page, 'recovery-after-crash-200k');
});
