import { generateDemo } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { likelihoodRatioCi } from '../src/engine/evaluation/threshold';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

test('demo → fitted odds ratios equal the engine run in Node → threshold → score a case', async ({ page }) => {
  await page.goto('/');
  await shot(page, '00-start');
  await expectNoSidewaysScroll(page);
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 30_000 });
  await shot(page, '01-model');
  await expectNoSidewaysScroll(page);
  await shot(page, '01-model-full', true);

  const demo = generateDemo('ssi');
  const ref = fit(demo.dataset, demo.spec, { method: 'ml', level: 0.95, profile: true });
  for (const c of ref.coefficients) {
    const cell = table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`);
    await expect(cell).toHaveText(c.estimate.toFixed(4).replace('-', '−'));
  }

  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  await expect(page.getByText('Predicted risk against one predictor')).toBeVisible();
  await page.waitForTimeout(500);
  await shot(page, '02-shape');
  await expectNoSidewaysScroll(page);

  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  await expect(page.getByTestId('metrics')).toBeVisible();
  await shot(page, '03-performance');
  await expectNoSidewaysScroll(page);

  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  const tp = page.getByTestId('tp');
  await expect(tp).toBeVisible();
  const before = await tp.textContent();
  const slider = page.getByRole('slider');
  await slider.focus();
  await slider.fill('0.4');
  await expect(page.getByTestId('cutoff-value')).toHaveText('40.0%');
  await expect(tp).not.toHaveText(before ?? '');
  // LR+ and its log-method interval as the engine gives them for the counts on the page.
  const countOf = async (id: string) => Number((await page.getByTestId(id).textContent())!.replace(/[^0-9]/g, ''));
  const [a, b, c, d] = [await countOf('tp'), await countOf('fp'), await countOf('fn'), await countOf('tn')];
  const ci = likelihoodRatioCi(a, a + c, b, b + d)!;
  const lrRow = page.getByTestId('lr-pos').locator('xpath=..');
  await expect(page.getByTestId('lr-pos')).toHaveText((a / (a + c) / (b / (b + d))).toFixed(2));
  await expect(lrRow).toContainText(`${ci.lower.toFixed(2)} to ${ci.upper.toFixed(2)}`);
  await shot(page, '04-cutoff');
  await expectNoSidewaysScroll(page);

  await page.getByRole('button', { name: 'Score & validate' }).click();
  await page.getByRole('button', { name: 'Predict the risk' }).click();
  await expect(page.getByTestId('score-result')).toContainText('Predicted risk');
  await shot(page, '05-score');
  await expectNoSidewaysScroll(page);

  await page.getByRole('button', { name: 'Data & roles' }).click();
  const grid = page.getByRole('grid', { name: 'Data rows' });
  await expect(grid).toBeVisible();
  // Spreadsheet row numbers: the header is row 1, so the demo's first data row is row 2.
  const first = grid.getByRole('row').nth(1);
  const c0 = demo.dataset.columns[0];
  const cell = c0.kind === 'numeric' ? String(c0.values[0]) : c0.levels[c0.codes[0]];
  await expect(first.getByRole('rowheader')).toHaveText('2');
  await expect(first.getByRole('gridcell').first()).toHaveText(cell);
  await expect(grid.getByRole('row').nth(2).getByRole('rowheader')).toHaveText('3');
  await shot(page, '06-data');
  await expectNoSidewaysScroll(page);
  await shot(page, '06-data-full', true);
});
