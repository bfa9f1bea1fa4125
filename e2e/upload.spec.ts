import { generateDemo } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { importText } from '../src/io';
import { expect, shot, test } from './guard';

/** The invented seal log written as CSV text, the way a user's spreadsheet export looks. */
function sealCsv(rows: number): string {
  const d = generateDemo('seals').dataset;
  const lines = [d.columns.map((c) => c.name).join(',')];
  for (let i = 0; i < rows; i++) {
    lines.push(d.columns.map((c) => (c.kind === 'numeric' ? String(c.values[i]) : c.levels[c.codes[i]])).join(','));
  }
  return lines.join('\n');
}

test('a CSV opened through the file input is profiled, fitted, and gives the engine’s coefficients', async ({
  page,
}) => {
  const csv = sealCsv(1500);
  await page.goto('/');
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'seals.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(page.getByTestId('source')).toContainText('seals.csv');
  await expect(page.getByText('1,500 rows × 7 columns')).toBeVisible();

  await page.getByLabel('Outcome (yes/no)').selectOption('seal_failed');
  await expect(page.getByLabel('Counts as the event')).toHaveValue('yes');
  for (const name of ['seal_temp_c', 'dwell_s', 'pressure_bar', 'film_lot']) {
    await page.getByRole('checkbox', { name }).check();
  }
  await page.getByLabel('Reference level of film_lot').selectOption('F-231');
  await expect(page.getByTestId('dropped-rows')).toHaveText('0');
  await shot(page, '10-upload-roles');
  await page.getByRole('button', { name: 'Fit the model' }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 30_000 });

  const imported = await importText(csv, { delimiter: ',' });
  const ref = fit(imported.dataset, {
    outcome: 'seal_failed',
    event: 'yes',
    terms: [
      { type: 'main', column: 'seal_temp_c' },
      { type: 'main', column: 'dwell_s' },
      { type: 'main', column: 'pressure_bar' },
      { type: 'main', column: 'film_lot', reference: 'F-231' },
    ],
  });
  for (const c of ref.coefficients) {
    await expect(table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`)).toHaveText(
      c.estimate.toFixed(4).replace('-', '−'),
    );
  }
  await shot(page, '11-upload-fit');
});

test('a penalised fit shows shrunken estimates without intervals and the chosen penalty', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Heat-seal failures/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Data & roles' }).click();
  await page.getByRole('radio', { name: 'Ridge' }).check();
  await expect(page.getByText(/settings changed since the last fit/)).toBeVisible();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await page.getByRole('button', { name: 'Odds ratios' }).click();
  await expect(page.getByTestId('odds-table')).toContainText('Penalised estimates', { timeout: 60_000 });
  await expect(page.getByTestId('fit-summary')).toContainText('Penalty λ =');
  await shot(page, '12-ridge');
  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  await expect(page.getByText('The penalty pulls the optimum towards zero.')).toBeVisible({ timeout: 20_000 });
  await shot(page, '13-ridge-loss');
});

test('bootstrap validation shows progress and can be cancelled', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  await page.getByLabel('Bootstrap resamples').fill('2000');
  await page.getByRole('button', { name: 'Run bootstrap validation' }).click();
  await expect(page.getByText(/Bootstrap validation \(2000 resamples\) — \d+ of 2000/)).toBeVisible({
    timeout: 20_000,
  });
  await shot(page, '14-bootstrap-running');
  await page.getByRole('button', { name: 'Cancel' }).click();
  await expect(page.getByTestId('validation-status')).toContainText('cancelled');
  await expect(page.getByRole('button', { name: 'Cancel' })).toHaveCount(0);
  await page.getByLabel('Bootstrap resamples').fill('20');
  await page.getByRole('button', { name: 'Run bootstrap validation' }).click();
  await expect(page.getByTestId('corrected-auc')).toBeVisible({ timeout: 60_000 });
  await shot(page, '15-bootstrap-done');
});

test('a dropped file loads; a column can be re-read as another type without losing the roles', async ({ page }) => {
  const rows = ['ward;los_days;readmitted'];
  for (let i = 0; i < 60; i++)
    rows.push(`${1 + (i % 3)};${(2 + (i % 9) * 0.5).toFixed(1).replace('.', ',')};${i % 4 === 0 ? 'yes' : 'no'}`);
  await page.goto('/');
  const text = rows.join('\n');
  await page.evaluate((content) => {
    const dt = new DataTransfer();
    dt.items.add(new File([content], 'wards.csv', { type: 'text/csv' }));
    const zone = document.querySelector('section.open')!;
    zone.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, text);
  await expect(page.getByText('60 rows × 3 columns')).toBeVisible();
  await page.getByText(/^How to read the file/).click();
  await expect(page.getByText(/semicolon-separated, decimal comma/)).toBeVisible();
  await page.getByLabel('Outcome (yes/no)').selectOption('readmitted');
  await page.getByRole('checkbox', { name: 'ward' }).check();
  await expect(page.getByLabel('Read ward as')).toHaveValue('numeric');
  await page.getByLabel('Read ward as').selectOption('categorical');
  await expect(page.getByLabel('Reference level of ward')).toBeVisible();
  await expect(page.getByRole('checkbox', { name: 'ward' })).toBeChecked();
  await expect(page.getByLabel('Outcome (yes/no)')).toHaveValue('readmitted');
  await shot(page, '16-retype');
});
