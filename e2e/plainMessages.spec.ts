import { makeXlsx, type XCell } from '../tests/fixtures/bad-input/xlsxWriter';
import { expect, shot, test } from './guard';

// Invented rows (seeded by the row index), written as CSV text the way a spreadsheet export looks.
function rows(n: number, line: (i: number) => string, header: string): Buffer {
  return Buffer.from([header, ...Array.from({ length: n }, (_, i) => line(i))].join('\n'));
}

async function open(page: import('@playwright/test').Page, name: string, buffer: Buffer, mimeType = 'text/csv') {
  await page.goto('/');
  await page.getByTestId('file-input').setInputFiles({ name, mimeType, buffer });
  await expect(page.getByTestId('source')).toContainText(name);
}

async function include(page: import('@playwright/test').Page, names: string[]) {
  for (const name of names) await page.getByRole('checkbox', { name, exact: true }).check();
}

test('a constant outcome is said to have one value, not to need an event chosen', async ({ page }) => {
  await open(
    page,
    'constant.csv',
    rows(30, (i) => `no,${i % 7},${i % 5}`, 'y,x1,x2'),
  );
  await page.getByLabel('Outcome (yes/no)').selectOption('y');
  await expect(page.getByTestId('outcome-one-value')).toHaveText(
    'The outcome "y" has one value: every row with a value is "no". A risk model needs rows with and without the ' +
      'event; choose another outcome column, or check that the file holds both kinds of row.',
  );
  await shot(page, '60-constant-outcome');
});

test('a good fit with an aliased copy of a predictor shows no problem about the copy', async ({ page }) => {
  await open(
    page,
    'copy.csv',
    rows(60, (i) => `${i % 3 === 0 ? 'yes' : 'no'},${(i * 7) % 13},${(i * 7) % 13},${(i * 5) % 11}`, 'y,x1,x1copy,x2'),
  );
  await page.getByLabel('Outcome (yes/no)').selectOption('y');
  await include(page, ['x1', 'x1copy', 'x2']);
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).toContainText('x1copy');
  await page.waitForTimeout(2000); // the loss surface is asked for after the fit
  await expect(page.getByText('is aliased and has no estimate to vary')).toHaveCount(0);
});

test('a ragged file names the rows left out instead of "every one of the 1 rows"', async ({ page }) => {
  const lines = ['yes,2,3,4', 'yes,5,6,7', ...Array.from({ length: 28 }, (_, i) => `${i % 2 ? 'yes' : 'no'},${i}`)];
  await open(page, 'ragged.csv', Buffer.from(['y,a,b,c', ...lines].join('\n')));
  await page.getByLabel('Outcome (yes/no)').selectOption('y');
  await include(page, ['a', 'b', 'c']);
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(
    page.getByText('Only 2 of the 30 rows have a value in every column the model uses').first(),
  ).toBeVisible();
  await expect(page.getByText('28 rows were left out for missing values: rows 4, 5, 6').first()).toBeVisible();
  await expect(page.getByTestId('odds-table')).toHaveCount(0);
  await shot(page, '61-ragged');
});

test('±1e308 in x1 is refused naming the column and rows 5 and 9, with no fit beside it', async ({ page }) => {
  const csv = rows(
    40,
    (i) =>
      `${i % 3 === 0 ? 'yes' : 'no'},${i === 3 ? '1e308' : i === 7 ? '-1e308' : ((i * 7) % 13) + 1},${(i * 5) % 11}`,
    'y,x1,x2',
  );
  await open(page, 'extreme.csv', csv);
  await page.getByLabel('Outcome (yes/no)').selectOption('y');
  await include(page, ['x1', 'x2']);
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByText('1e+308 in row 5 and -1e+308 in row 9').first()).toBeVisible();
  await expect(page.getByTestId('odds-table')).toHaveCount(0);
  await shot(page, '62-extreme-values');
});

test('merged cells in a workbook are reported by range', async ({ page }) => {
  const sheet: XCell[][] = [['ward', 'age', 'ssi']];
  for (let i = 0; i < 20; i++) sheet.push([i % 5 === 0 ? `W${i}` : null, 30 + i, i % 3 === 0 ? 'yes' : 'no']);
  const xlsx = Buffer.from(makeXlsx([{ name: 'Audit', rows: sheet, merges: ['A2:A6', 'A7:A11'] }], true));
  await open(page, 'merged.xlsx', xlsx, 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet');
  await expect(page.getByText('A2:A6 (rows 3–6 of column A)').first()).toBeVisible();
  await shot(page, '63-merged-cells');
});
