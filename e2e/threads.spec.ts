import { fit } from '../src/engine/fitting/fit';
import { createRng } from '../src/engine/numerics/rng';
import { importText } from '../src/io';
import { expect, shot, test } from './guard';

/** 40 000 invented rows (seeded): at least POOL_MIN_ROWS = 32 768, so that the row pool shares the passes. */
function bigCsv(rows: number): string {
  const rng = createRng(21);
  const lines = ['dose,age,shift,fault'];
  for (let i = 0; i < rows; i++) {
    const dose = rng.normal(),
      age = 40 + 10 * rng.normal(),
      shift = rng.next() < 0.3 ? 1 : 0;
    const eta = -1.5 + 0.7 * dose + 0.02 * (age - 40) + 0.4 * shift;
    lines.push(`${dose.toFixed(3)},${age.toFixed(1)},${shift},${rng.next() < 1 / (1 + Math.exp(-eta)) ? 'yes' : 'no'}`);
  }
  return lines.join('\n');
}

test('a fit of 32 768 rows or more runs on the helper threads and gives the one-thread numbers', async ({ page }) => {
  const csv = bigCsv(40_000);
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
