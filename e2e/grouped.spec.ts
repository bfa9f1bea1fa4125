import { execFileSync } from 'node:child_process';
import { generateSsiWardMonths } from '../src/engine/demo';
import { runAnalysis, subgroupStep } from '../src/engine/workflow';
import { toCsv } from './helpers';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

const demo = generateSsiWardMonths();
const fmt = (v: number) => v.toFixed(4).replace('-', '−');

test('a table of counts: the invented ward-by-month demo is fitted per case and says how it counted', async ({
  page,
}) => {
  test.setTimeout(120_000);
  const { record } = await runAnalysis(demo.dataset, { spec: demo.spec });
  await page.goto('/');
  await page.getByRole('button', { name: /Infections by ward and month/ }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 30_000 });
  // the engine's numbers in Node, per case (the table written out one row per operation)
  for (const c of record.fit.coefficients)
    await expect(table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`)).toHaveText(fmt(c.estimate));
  const summary = page.getByTestId('fit-summary');
  await expect(summary).toContainText(`${record.fit.nUsed.toLocaleString('en')} cases from 140 of 144 rows`);
  await expect(page.getByTestId('layout-note')).toContainText('Outcome layout: events and trials per row');
  await expect(page.getByTestId('layout-note')).toContainText('grouped');
  await expect(page.getByTestId('layout-note')).toContainText('Goodness of fit by covariate pattern');
  await expectNoSidewaysScroll(page);
  await shot(page, 'grouped-01-model', true);

  // The PDF says how the table was counted: cases, both deviances, fit by covariate pattern.
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  await download.saveAs('/tmp/shots/grouped-summary.pdf');
  const text = execFileSync('pdftotext', ['-enc', 'UTF-8', '/tmp/shots/grouped-summary.pdf', '-']).toString('utf8');
  expect(text).toContain('Cases used');
  expect(text).toMatch(/3,145 from 140 of 144\s+rows/);
  expect(text).toContain('out of the trials "operations"');
  expect(text).toContain('Fit by covariate pattern');

  // Performance by ward on the table of counts: per case, as the engine's one path gives it in Node.
  await page.getByRole('button', { name: 'Subgroups', exact: true }).click();
  await page.getByTestId('subgroup-column').selectOption('ward');
  await page.getByTestId('subgroup-run').click();
  const sub = page.getByTestId('subgroup-table');
  await expect(sub).toBeVisible({ timeout: 30_000 });
  const { scores } = await runAnalysis(demo.dataset, { spec: demo.spec });
  const node = subgroupStep(demo.dataset, record, scores, { column: 'ward', threshold: null });
  expect(node.rows.map((r) => r.label)).toEqual(['Alder', 'Birch', 'Cedar', 'Damson', 'Elder', 'Fir']);
  for (const r of node.rows) {
    const cells = sub.locator(`tr[data-group="${r.label}"] td`);
    await expect(cells.nth(0)).toHaveText(r.n.toLocaleString('en-GB'));
    await expect(cells.nth(1)).toHaveText(String(r.events));
  }
  await shot(page, 'grouped-02-subgroups-ward', true);

  await page.getByRole('button', { name: 'Data & roles' }).click();
  await expect(page.getByTestId('outcome-layout')).toHaveValue('events-trials');
  await expect(page.getByTestId('events-column')).toHaveValue('infections');
  await expect(page.getByTestId('counts-column')).toHaveValue('operations');
  await shot(page, 'grouped-03-roles', true);
});

test('an opened table of counts is proposed as events and trials; a bad row is named', async ({ page }) => {
  test.setTimeout(120_000);
  const csv = toCsv(demo.dataset);
  await page.goto('/');
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'ward-months.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(page.getByTestId('source')).toContainText('ward-months.csv');
  await expect(page.getByTestId('outcome-layout')).toHaveValue('events-trials');
  await expect(page.getByTestId('events-column')).toHaveValue('infections');
  await expect(page.getByTestId('counts-column')).toHaveValue('operations');
  await expect(page.getByText(/looks like counts/).first()).toBeVisible();
  for (const name of ['ward', 'wound_class', 'month']) await page.getByRole('checkbox', { name, exact: true }).check();
  await page.getByLabel('Reference level of ward').selectOption('Alder');
  await page.getByLabel('Reference level of wound_class').selectOption('clean');
  await page.getByRole('button', { name: 'Fit the model' }).click();
  const table = page.getByTestId('odds-table');
  await expect(table).toBeVisible({ timeout: 30_000 });
  const { record } = await runAnalysis(demo.dataset, { spec: demo.spec });
  for (const c of record.fit.coefficients)
    await expect(table.locator(`tr[data-name="${c.name}"] td[data-col="estimate"]`)).toHaveText(fmt(c.estimate));

  // events above trials in spreadsheet row 5 (data row 4): the fit refuses and names the row and columns
  const lines = csv.split('\n');
  const header = lines[0].split(',');
  const cells = lines[4].split(',');
  cells[header.indexOf('infections')] = String(Number(cells[header.indexOf('operations')]) + 3);
  lines[4] = cells.join(',');
  await page.getByRole('button', { name: 'Data & roles' }).click();
  await page
    .getByTestId('file-input')
    .setInputFiles({ name: 'ward-months-bad.csv', mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n')) });
  await expect(page.getByTestId('source')).toContainText('ward-months-bad.csv');
  // one row breaks "events never above trials", so no layout is proposed: the user chooses it
  await expect(page.getByTestId('outcome-layout')).toHaveValue('binary');
  await page.getByTestId('outcome-layout').selectOption('events-trials');
  await page.getByTestId('events-column').selectOption('infections');
  await page.getByTestId('counts-column').selectOption('operations');
  for (const name of ['ward', 'wound_class', 'month']) await page.getByRole('checkbox', { name, exact: true }).check();
  await shot(page, 'grouped-04-chosen-by-hand');
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByText(/Row 5: \d+ events in "infections" but only \d+ trials in "operations"/)).toBeVisible({
    timeout: 30_000,
  });
  await shot(page, 'grouped-05-bad-row');
});
