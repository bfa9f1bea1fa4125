import { execFileSync } from 'node:child_process';
import { copyFileSync, readFileSync } from 'node:fs';
import { generateDemo } from '../src/engine/demo';
import { runAnalysis, subgroupStep } from '../src/engine/workflow';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

test('subgroups: per-group table and forest plot on the invented registry, bands with checked cut points, PDF', async ({
  page,
}) => {
  test.setTimeout(150_000);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });

  await page.getByRole('button', { name: 'Subgroups', exact: true }).click();
  const panel = page.getByTestId('subgroup-panel');
  await expect(panel).toBeVisible();
  // The invented registry has no ward column (src/engine/demo/ssiRegistry.ts); ASA class is its categorical column
  // with the widest spread of group sizes (class IV is small).
  await page.getByTestId('subgroup-column').selectOption('asa_class');
  await page.getByTestId('subgroup-run').click();
  const table = page.getByTestId('subgroup-table');
  await expect(table).toBeVisible({ timeout: 30_000 });

  // The same numbers as the engine's one path in Node (workflow/subgroupStep on runAnalysis of the demo's model).
  const demo = generateDemo('ssi');
  const { record, scores } = await runAnalysis(demo.dataset, { spec: demo.spec, profile: false, termTests: false });
  const node = subgroupStep(demo.dataset, record, scores, { column: 'asa_class', threshold: null });
  expect(node.rows.map((r) => r.label)).toEqual(['I', 'II', 'III', 'IV']);
  for (const r of node.rows) {
    const tr = table.locator(`tr[data-group="${r.label}"]`);
    const cells = tr.locator('td');
    await expect(cells.nth(0)).toHaveText(r.n.toLocaleString('en-GB'));
    await expect(cells.nth(1)).toHaveText(String(r.events));
    if (r.auc) await expect(cells.nth(3)).toContainText(r.auc.estimate.toFixed(3));
    else await expect(cells.nth(3)).toHaveText('—');
  }
  await expect(table.locator('tr[data-group="all rows"] th')).toHaveText('All rows');
  await expect(table.locator('thead')).toContainText(/Sensitivity at 0\.\d{3}/);

  const forest = page.getByTestId('subgroup-forest');
  await expect(forest).toBeVisible();
  await expect(forest.getByTestId('forest-row')).toHaveCount(5);
  expect(await forest.getByTestId('forest-estimate').count()).toBeGreaterThanOrEqual(10);
  await expect(page.getByTestId('subgroup-rule')).toContainText('Collins, Ogundimu & Altman 2016');
  await expect(page.getByTestId('subgroup-warnings')).toContainText('Subgroup "IV" of column "asa_class"');
  await expectNoSidewaysScroll(page);
  await shot(page, 'subgroups-01-asa', true);

  // A numeric column in bands: first cut points in the wrong order (the engine's message), then a typo, then good ones.
  await page.getByTestId('subgroup-column').selectOption('age');
  const cuts = page.getByTestId('subgroup-cuts');
  await cuts.fill('60, 40');
  await page.getByTestId('subgroup-run').click();
  const problem = page.getByTestId('subgroup-problem');
  await expect(problem).toContainText('must be in increasing order, but 40 comes after 60');
  await expect(problem).toContainText('Give them in increasing order: 40, 60.');
  await shot(page, 'subgroups-02-bad-cuts');
  await cuts.fill('40, sixty');
  await page.getByTestId('subgroup-run').click();
  await expect(problem).toContainText('“sixty” in the cut points is not a number.');
  await cuts.fill('40, 60, 80');
  await page.getByTestId('subgroup-run').click();
  await expect(problem).toBeHidden();
  await expect(table.locator('tbody th')).toHaveText(['< 40', '40 to < 60', '60 to < 80', '≥ 80', 'All rows']);
  await shot(page, 'subgroups-03-age-bands', true);

  // The CSV of the table.
  const [csv] = await Promise.all([page.waitForEvent('download'), page.getByTestId('subgroup-csv').click()]);
  const csvText = readFileSync((await csv.path())!, 'utf8');
  expect(csvText.split('\r\n')[0]).toMatch(/^column,group,definition,n,events,expected events,O\/E,/);
  expect(csvText).toContain('\r\nage,40 to < 60,age: 40 ≤ value < 60,');

  // Away and back: the engine kept the choice for this fit; the PDF prints it.
  await page.getByRole('button', { name: 'Odds ratios' }).click();
  const [download] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const path = (await download.path())!;
  copyFileSync(path, '/tmp/shots/subgroups-summary.pdf');
  const text = execFileSync('pdftotext', [path, '-']).toString().replace(/\s+/g, ' ');
  expect(text).toContain('Performance by subgroup');
  expect(text).toContain('within each group of "age" (4 groups');
  await page.getByRole('button', { name: 'Subgroups', exact: true }).click();
  await expect(page.getByTestId('subgroup-cuts')).toHaveValue('40, 60, 80');
  await expect(table.locator('tbody th')).toHaveText(['< 40', '40 to < 60', '60 to < 80', '≥ 80', 'All rows']);

  // Small bands: no events under 18.5 kg/m² (one class), 3 events at 40 or more (too small): counts and O/E only,
  // the rule says why, and the plot keeps their rows marked "not computed".
  await page.getByTestId('subgroup-column').selectOption('bmi');
  await page.getByTestId('subgroup-cuts').fill('18.5, 25, 30, 40');
  await page.getByTestId('subgroup-run').click();
  await expect(table.locator('tbody th')).toHaveText([
    '< 18.5',
    '18.5 to < 25',
    '25 to < 30',
    '30 to < 40',
    '≥ 40',
    'All rows',
  ]);
  for (const g of ['< 18.5', '≥ 40']) await expect(table.locator(`tr[data-group="${g}"] td`).nth(3)).toHaveText('—');
  const warnings = page.getByTestId('subgroup-warnings');
  await expect(warnings.locator('[data-code="subgroup-one-class"]')).toContainText('Subgroup "< 18.5" of column "bmi"');
  await expect(warnings.locator('[data-code="subgroup-too-small"]')).toContainText('fewer than 10 of a class');
  await expect(forest.getByText('not computed')).toHaveCount(4); // AUC and slope of the two small bands
  await shot(page, 'subgroups-04-small-bands', true);
});
