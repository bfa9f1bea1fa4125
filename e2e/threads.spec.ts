import { fit } from '../src/engine/fitting/fit';
import { faultLogCsv } from './helpers';
import { importText } from '../src/io';
import { expect, shot, test } from './guard';

test('a fit of 32 768 rows or more runs on the helper threads and gives the one-thread numbers', async ({ page }) => {
  const csv = faultLogCsv(40_000, 21);
  await page.goto('/');
  expect(await page.evaluate(() => crossOriginIsolated)).toBe(true);
  const cores = await page.evaluate(() => navigator.hardwareConcurrency);
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'big.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(page.getByText('40,000 rows × 4 columns')).toBeVisible({ timeout: 30_000 });
  await page.getByLabel('Outcome (yes/no)').selectOption('fault');
  for (const name of ['dose', 'age', 'shift']) await page.getByRole('checkbox', { name }).check();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 60_000 });
  if (cores > 1) await expect(page.getByTestId('fit-threads')).toContainText(`${Math.min(8, cores)} threads`);

  // The engine in Node, on this one thread: the same numbers to the last printed digit (in fact to the last bit).
  const imported = await importText(csv, { delimiter: ',' });
  const ref = fit(imported.dataset, {
    outcome: 'fault',
    event: 'yes',
    terms: ['dose', 'age', 'shift'].map((column) => ({ type: 'main' as const, column })),
  });
  for (const c of ref.coefficients) {
    await expect(table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`)).toHaveText(
      c.estimate.toFixed(4).replace('-', '−'),
    );
  }
  await shot(page, '40-threads');
});
