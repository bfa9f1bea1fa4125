import { generateDemo, generateSsiRegistry } from '../src/engine/demo';
import { externalValidation } from '../src/engine/validation/externalValidation';
import { fit } from '../src/engine/fitting/fit';
import { importText } from '../src/io';
import { expect, shot, test } from './guard';
import { toCsv } from './helpers';

test('a file of new cases is scored and a file with outcomes validates the model externally', async ({ page }) => {
  const fresh = generateSsiRegistry(800, 99);
  const csv = toCsv(fresh.dataset);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Score & validate' }).click();

  await page
    .getByTestId('batch-input')
    .setInputFiles({ name: 'new-cases.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  const batch = page.getByTestId('batch-result');
  await expect(batch).toContainText(/of 800 rows scored/, { timeout: 30_000 });
  await expect(batch.getByRole('link', { name: /Download the scored rows/ })).toBeVisible();

  await page
    .getByLabel('Choose a file with known outcomes')
    .setInputFiles({ name: 'next-year.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  const ext = page.getByTestId('external-result');
  await expect(ext).toContainText('AUC', { timeout: 30_000 });

  const demo = generateDemo('ssi');
  const model = fit(demo.dataset, demo.spec, { profile: true });
  const ref = externalValidation(model, (await importText(csv, { delimiter: ',' })).dataset, { level: 0.95 });
  await expect(ext).toContainText(`${ref.nUsed} cases. AUC ${ref.evaluation.auc.auc!.toFixed(3)}`);
  await shot(page, '20-external');
});

test('pasted spreadsheet cells load as data', async ({ page }) => {
  await page.goto('/');
  await page
    .getByLabel(/Or paste cells copied from a spreadsheet/)
    .fill('dose\tresponse\n1\tno\n2\tno\n3\tyes\n4\tyes\n5\tno\n6\tyes\n');
  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  await expect(page.getByText('6 rows × 2 columns')).toBeVisible();
});

test('the demo can be started and fitted from the keyboard alone', async ({ page }) => {
  await page.goto('/');
  for (let i = 0; i < 10; i++) {
    await page.keyboard.press('Tab');
    const name = await page.evaluate(() => document.activeElement?.textContent ?? '');
    if (name.startsWith('Heat-seal failures')) break;
  }
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('fit-summary')).toContainText('5,000');
});

test('the grid scrolls through 1,000,000 rows, fetching only the visible window', async ({ page }) => {
  const lines = ['id_code,x,flag'];
  for (let i = 0; i < 1_000_000; i++) lines.push(`${i + 1},${(i % 997) / 10},${i % 7 === 0 ? 'yes' : 'no'}`);
  await page.goto('/');
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'big.csv', mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n')) });
  await expect(page.getByText('1,000,000 rows × 3 columns')).toBeVisible({ timeout: 60_000 });
  const grid = page.getByRole('grid', { name: 'Data rows' });
  await grid.evaluate((el) => {
    el.scrollTop = el.scrollHeight;
  });
  // The last of 1,000,000 data rows is spreadsheet row 1,000,001 (the header is row 1).
  await expect(grid.getByRole('rowheader', { name: '1,000,001' })).toBeVisible({ timeout: 10_000 });
  expect(await grid.getByRole('row').count()).toBeLessThan(100);
  await grid.evaluate((el) => {
    el.scrollTop = el.scrollHeight / 2;
  });
  await expect(grid.getByRole('rowheader', { name: /^500,/ }).first()).toBeVisible();
  await shot(page, '21-big-grid');
});

test('the model summary downloads as a PDF built on this computer', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Heat-seal failures/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  const [download] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  expect(download.suggestedFilename()).toMatch(/^fulcra-model-summary-seal_failed-\d{4}-\d{2}-\d{2}\.pdf$/);
  const path = await download.path();
  const { readFileSync } = await import('node:fs');
  expect(readFileSync(path).subarray(0, 5).toString()).toBe('%PDF-');
});
