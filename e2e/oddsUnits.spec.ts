import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { generateDemo } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { expect, test } from './guard';

const SHOTS = '/tmp/shots-oddsunits';
mkdirSync(SHOTS, { recursive: true });
const plain = (s: string) => Number(s.replace(/\u2212/g, '-').trim());

test('odds ratios per 10 years for age equal exp(10·β) of the engine; reference rows read 1', async ({ page }) => {
  await page.setViewportSize({ width: 1280, height: 900 });
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 30_000 });

  const demo = generateDemo('ssi');
  const ref = fit(demo.dataset, demo.spec);
  const age = ref.coefficients.find((c) => c.name === 'age')!;

  // A row per reference level of each categorical predictor, at odds ratio 1.
  const refRows = table.locator('tr[data-reference="true"]');
  await expect(refRows.first()).toBeVisible();
  const categorical = ref.recipe.terms.filter((t) => t.type === 'categorical');
  await expect(refRows).toHaveCount(categorical.length);
  for (const t of categorical) {
    if (t.type !== 'categorical') continue;
    await expect(table.locator(`tr[data-name="${t.column}=${t.reference}"] td[data-col="or"]`)).toHaveText(
      '1 (reference)',
    );
  }

  const ageOr = table.locator('tr[data-name="age"] td[data-col="or"]');
  expect(Math.abs(plain((await ageOr.textContent())!) - Math.exp(age.estimate))).toBeLessThanOrEqual(0.0005 + 1e-9);
  await page.getByTestId('odds-units').getByLabel('age: per').fill('10');
  await expect(table.locator('tr[data-name="age"] th')).toHaveText('age, per 10');
  const shown = plain((await ageOr.textContent())!);
  expect(Math.abs(shown - Math.exp(10 * age.estimate))).toBeLessThanOrEqual(0.0005 + 1e-9);
  expect(Math.abs(shown - Math.exp(age.estimate))).toBeGreaterThan(0.01);
  // The coefficient itself is unchanged.
  await expect(table.locator('tr[data-name="age"] td[data-col="estimate"]')).toHaveText(
    age.estimate.toFixed(4).replace('-', '\u2212'),
  );
  await page.screenshot({ path: `${SHOTS}/odds-per-10.png`, fullPage: true });

  // The PDF follows the page's units: its coefficient table shows the same odds ratio per 10, and the reference rows.
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const pdf = join(mkdtempSync(join(tmpdir(), 'fulcra-e2e-')), 'summary.pdf');
  await download.saveAs(pdf);
  const text = execFileSync('pdftotext', ['-layout', pdf, '-']).toString('utf8');
  const line = text.split('\n').find((l) => /^\s*age, per 10\s/.test(l));
  expect(line, 'the age row of the PDF').toBeDefined();
  expect(line).toContain((await ageOr.textContent())!.trim());
  expect(text).toMatch(/diabetes=no \(reference\)\s+—\s+—\s+1\s/);
  execFileSync('pdftoppm', ['-png', '-r', '60', pdf, `${SHOTS}/pdf`]);

  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  await expect(page.getByTestId('metrics')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('metrics').locator('[data-term="auc"]')).toContainText('coin toss');
  await page.screenshot({ path: `${SHOTS}/performance.png`, fullPage: true });

  // The unit is a page setting kept with the workspace: after a reload the table is still per 10.
  await page.waitForTimeout(1600);
  await page.reload();
  const restored = page.getByRole('status').filter({ hasText: /^Restored your work from/ });
  await expect(restored).toBeVisible({ timeout: 30_000 });
  await page.getByRole('navigation', { name: 'Workbench views' }).getByRole('button', { name: 'Odds ratios' }).click();
  await expect(page.getByTestId('odds-table').locator('tr[data-name="age"] th')).toHaveText('age, per 10', {
    timeout: 30_000,
  });
  await expect(page.getByTestId('odds-units').getByLabel('age: per')).toHaveValue('10');
});
