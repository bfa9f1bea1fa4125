import { execFileSync } from 'node:child_process';
import { copyFileSync } from 'node:fs';
import { generateDemo, ssiSeededError } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { leaveRowsOut } from '../src/engine/diagnostics';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

test('influential rows: the seeded error is named, shown in the grid; a refit without it compares odds ratios', async ({
  page,
}) => {
  test.setTimeout(120_000);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });

  await page.getByRole('button', { name: 'Influential rows' }).click();
  const table = page.getByTestId('influence-table');
  await expect(table).toBeVisible({ timeout: 30_000 });
  // The invented demo's seeded data-entry error (an operation of 2880 minutes) is the top row, by spreadsheet row.
  const top = table.locator('tbody tr').first();
  await expect(top).toHaveAttribute('data-row', String(ssiSeededError.sheetRow));
  await expect(top.getByRole('rowheader')).toHaveText('1,056');
  await expect(page.getByTestId('influence-warnings')).toContainText('spreadsheet row 1056');
  await expect(page.getByTestId('influence-warnings')).toContainText(
    'row 1056 would move the odds ratio of duration_min',
  );
  await expect(page.getByTestId('influence-rules')).toContainText('leverage 2p/n');
  await expectNoSidewaysScroll(page);
  await shot(page, 'diagnostics-01-view', true);

  // A click on the row number shows that row in the data grid, marked.
  await top.getByRole('button', { name: '1,056' }).click();
  const marked = page.locator('[role="row"][data-marked="true"]');
  await expect(marked).toBeVisible({ timeout: 10_000 });
  await expect(marked.getByRole('rowheader')).toHaveText('1,056');
  await expect(marked.getByRole('gridcell').filter({ hasText: '2880' })).toHaveCount(1);
  await marked.scrollIntoViewIfNeeded();
  await shot(page, 'diagnostics-02-grid');

  // Leave it out: the refit's odds ratios beside the all-rows ones, as the engine gives them in Node.
  await page.getByRole('button', { name: 'Influential rows' }).click();
  await page.getByRole('checkbox', { name: 'Leave out row 1056' }).check();
  await page.getByTestId('refit-without').click();
  const compare = page.getByTestId('leave-out-compare');
  await expect(compare).toBeVisible({ timeout: 60_000 });
  await expect(page.getByTestId('left-out')).toContainText('Row 1,056 left out of this fit');
  const demo = generateDemo('ssi');
  const spec = demo.spec;
  const all = fit(demo.dataset, spec, { profile: false });
  const without = fit(leaveRowsOut(demo.dataset, [1056]), spec, { profile: false });
  const or = (f: typeof all) => f.coefficients.find((c) => c.name === 'duration_min')!.oddsRatio.toFixed(4);
  const row = compare.locator('tr[data-name="duration_min"]');
  await expect(row.locator('td[data-col="before"]')).toContainText(or(all));
  await expect(row.locator('td[data-col="after"]')).toContainText(or(without));
  expect(Number(or(without))).toBeGreaterThan(Number(or(all)));
  // the duration coefficient about doubles without the error (0.0030 → 0.0059 per minute)
  await expect(row.locator('td[data-col="change"]')).toContainText(/^\+(9\d|1\d\d)%$/);
  await shot(page, 'diagnostics-03-compare', true);

  // The PDF says which row was left out.
  await page.getByRole('button', { name: 'Odds ratios' }).click();
  const [download] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const path = (await download.path())!;
  copyFileSync(path, '/tmp/shots/diagnostics-summary.pdf');
  const text = execFileSync('pdftotext', [path, '-']).toString();
  expect(text).toContain('Influential rows');
  expect(text.replace(/\s+/g, ' ')).toContain('Rows left out of this fit on request: spreadsheet row 1056');
});
