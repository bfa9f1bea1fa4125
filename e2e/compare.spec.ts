import { execFileSync } from 'node:child_process';
import { copyFileSync } from 'node:fs';
import { generateDemo } from '../src/engine/demo';
import { compareAnalyses, runAnalysis } from '../src/engine/workflow';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

/** The same comparison computed in Node by the engine (workflow/compareStep), for the numbers the page must show. */
async function expected(drop: string[]) {
  const demo = generateDemo('ssi');
  const spec = demo.spec;
  const reduced = { ...spec, terms: spec.terms.filter((t) => t.type === 'interaction' || !drop.includes(t.column)) };
  const quick = { profile: false, termTests: false };
  const a = await runAnalysis(demo.dataset, { spec, ...quick });
  const b = await runAnalysis(demo.dataset, { spec: reduced, ...quick });
  const o = compareAnalyses(demo.dataset, { label: 'A', ...a }, { label: 'B', ...b });
  if (o.status !== 'compared') throw new Error('the demo models should share their rows');
  return o.comparison;
}

test('two fits kept and compared on the invented SSI demo: LR test, AUC difference, refusal on other rows', async ({
  page,
}) => {
  test.setTimeout(180_000);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });

  // A second fit without two predictors that have no missing values: the same rows, nested in the first.
  await page.getByRole('button', { name: 'Data & roles' }).click();
  await page.getByRole('checkbox', { name: 'diabetes', exact: true }).uncheck();
  await page.getByRole('checkbox', { name: 'prophylaxis', exact: true }).uncheck();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).not.toContainText('diabetes');

  await page.getByRole('button', { name: 'Models & comparison' }).click();
  const list = page.getByTestId('kept-models');
  await expect(list.locator('tbody tr')).toHaveCount(2);
  await expect(list.getByRole('textbox', { name: 'Name of model 1' })).toHaveValue(
    'Model 1: age, bmi, diabetes, asa_class, wound_class, duration_min, …',
  );
  await expect(list.getByRole('textbox', { name: 'Name of model 2' })).toHaveValue(
    'Model 2: age, bmi, asa_class, wound_class, duration_min, smoker',
  );
  // Renamed by the user; the name follows into the comparison.
  const name2 = list.getByRole('textbox', { name: 'Name of model 2' });
  await name2.fill('Without diabetes and prophylaxis');
  await name2.press('Enter');

  await page.getByLabel('First model (A)').selectOption('1');
  await page.getByLabel('Second model (B)').selectOption('2');
  await page.getByRole('button', { name: 'Compare models' }).click();
  const result = page.getByTestId('comparison');
  await expect(result.getByTestId('lr-test')).toBeVisible({ timeout: 30_000 });

  // Source: the engine's compareModels in Node (checked against R anova and pROC 1.18.0 roc.test in
  // tests/engine/comparison/compareModels.test.ts).
  const c = await expected(['diabetes', 'prophylaxis']);
  const lr = c.nesting.lrTest!;
  await expect(result.getByTestId('lr-test')).toContainText(
    `Likelihood-ratio test of Without diabetes and prophylaxis within Model 1`,
  );
  await expect(result.getByTestId('lr-test')).toContainText(`χ² = ${lr.chi2.toFixed(2)} on ${lr.df} df`);
  expect(lr.df).toBe(3); // diabetes (1) and prophylaxis (late, none: 2)
  const d = c.auc.difference;
  const minus = (x: number) => x.toFixed(3).replace('-', '\u2212');
  await expect(result.getByTestId('auc-difference')).toContainText(`difference ${minus(d.difference!)}`);
  await expect(result.getByTestId('auc-difference')).toContainText(`CI ${minus(d.lower!)} to ${minus(d.upper!)}`);
  await expect(result.getByTestId('reclassification')).toContainText('Who changes side of the cut-off');
  await expect(result.getByTestId('nri-caution')).toContainText('easily misread');
  await expectNoSidewaysScroll(page);
  await shot(page, 'compare-01-result', true);

  // Switching shows model 1 again without a refit: its odds ratios are back, diabetes among them.
  await list.locator('tr[data-model-id="1"]').getByRole('button', { name: 'Show' }).click();
  await expect(list.locator('tr[data-model-id="1"]')).toContainText('shown');
  await page.getByRole('button', { name: 'Odds ratios' }).click();
  await expect(page.getByTestId('odds-table')).toContainText('diabetes');
  // The settings follow the model shown (its predictors are ticked again), so its results are not out of date.
  await expect(page.getByTestId('stale-banner')).toHaveCount(0);

  // The PDF has the comparison section.
  const [download] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const path = (await download.path())!;
  copyFileSync(path, '/tmp/shots/compare-summary.pdf');
  const text = execFileSync('pdftotext', [path, '-']).toString().replace(/\s+/g, ' ');
  expect(text).toContain('Comparison of two models');
  expect(text).toContain(`χ² = ${lr.chi2.toFixed(2)} on ${lr.df} df`);
  expect(text).toContain('Who changes side of the cut-off');

  // A third fit without bmi (which has missing values) uses more rows: the comparison is refused, with the fix.
  await page.getByRole('button', { name: 'Data & roles' }).click();
  await page.getByRole('checkbox', { name: 'bmi', exact: true }).uncheck();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('odds-table')).not.toContainText('bmi', { timeout: 30_000 });
  await page.getByRole('button', { name: 'Models & comparison' }).click();
  await expect(list.locator('tbody tr')).toHaveCount(3);
  await page.getByLabel('Second model (B)').selectOption('3');
  await page.getByRole('button', { name: 'Compare models' }).click();
  const refused = result.getByTestId('comparison-refused');
  await expect(refused).toBeVisible({ timeout: 30_000 });
  await expect(refused).toContainText('The two models were fitted on different rows');
  await expect(refused).toContainText('rows only by Model 3');
  await shot(page, 'compare-02-refused', true);
  await refused.getByRole('button', { name: 'Refit both on the common rows' }).click();
  await expect(result.getByTestId('lr-test')).toBeVisible({ timeout: 60_000 });
  await expect(list.locator('tbody tr')).toHaveCount(5);
  await expect(result).toContainText(`on the same ${c.n.toLocaleString('en-GB')} rows`);
  await shot(page, 'compare-03-common-rows', true);

  // The kept models come back after a reload (the autosave keeps each model's name and request; restoring refits
  // them), and the first two can be compared again with the same numbers.
  await page.waitForTimeout(1500); // the autosave writes a second after the last change
  await page.reload();
  await expect(page.getByRole('status').filter({ hasText: /^Restored your work from/ })).toBeVisible({
    timeout: 30_000,
  });
  await page.getByRole('button', { name: 'Models & comparison' }).click();
  await expect(list.locator('tbody tr')).toHaveCount(5, { timeout: 60_000 });
  await expect(list.getByRole('textbox', { name: 'Name of model 2' })).toHaveValue('Without diabetes and prophylaxis');
  await expect(list).not.toContainText('not fitted yet', { timeout: 90_000 });
  await expect(list.locator('tr[data-model-id="5"]')).toContainText('shown');
  await page.getByRole('button', { name: 'Compare models' }).click();
  await expect(result.getByTestId('lr-test')).toContainText(`χ² = ${lr.chi2.toFixed(2)} on ${lr.df} df`, {
    timeout: 30_000,
  });
  await shot(page, 'compare-04-restored', true);
});
