import { mkdirSync } from 'node:fs';
import type { Page } from '@playwright/test';
import { expect, test } from './guard';

const SHOTS = '/tmp/shots-keyboard';
mkdirSync(SHOTS, { recursive: true });
const shot = (page: Page, name: string, fullPage = false) =>
  page.screenshot({ path: `${SHOTS}/${name}.png`, fullPage });

/** Tab-separated cells as copied from a spreadsheet, with one yes/no column (the outcome to propose). */
function cells(): string {
  const rows = ['age\tgrade\tsex\tdied'];
  for (let i = 0; i < 60; i++)
    rows.push(
      `${20 + ((i * 7) % 50)}\t${1 + (i % 3)}\t${i % 2 ? 'F' : 'M'}\t${i % 4 === 0 || i % 7 === 0 ? 'yes' : 'no'}`,
    );
  return rows.join('\n');
}

async function paste(page: Page) {
  await page.goto('/');
  await page.getByLabel(/Or paste cells/).fill(cells());
  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  await expect(page.getByRole('heading', { name: /60 rows × 4 columns from pasted cells/ })).toBeVisible({
    timeout: 20_000,
  });
}

test('after "Use pasted cells" focus is on the data heading; the one yes/no column is the proposed outcome', async ({
  page,
}) => {
  await paste(page);
  await expect(page.getByRole('heading', { name: /60 rows × 4 columns/ })).toBeFocused();
  await expect(page.getByText(/"died" is proposed as the outcome/)).toBeVisible();
  // Pasted cells get the type chooser with its reason, as a file does.
  await expect(page.getByLabel('Read grade as')).toHaveValue('numeric');
  await page.getByLabel('Read grade as').selectOption('categorical');
  await expect(page.getByLabel('Reference level of grade')).toBeVisible({ timeout: 20_000 });
  await expect(page.getByLabel('Read grade as')).toHaveValue('categorical');
  await shot(page, 'paste-data-view', true);
});

test('the tab order follows the page: the roles come before the fitting, on screen and in the DOM', async ({
  page,
}) => {
  await paste(page);
  const roles = page.getByRole('heading', { name: 'Roles', exact: true });
  const fitting = page.getByRole('heading', { name: 'Fitting', exact: true });
  const before = await roles.evaluate(
    (r, f) => !!(r.compareDocumentPosition(f as Node) & Node.DOCUMENT_POSITION_FOLLOWING),
    await fitting.elementHandle(),
  );
  expect(before).toBe(true);
  expect((await roles.boundingBox())!.y).toBeLessThan((await fitting.boundingBox())!.y);
  // Tabbing forward from the last role control reaches the fitting controls, never back to the roles.
  await page.getByLabel('Read sex as').focus();
  const seen: string[] = [];
  for (let i = 0; i < 40 && seen.at(-1) !== 'Fit the model'; i++) {
    await page.keyboard.press('Tab');
    seen.push(await page.evaluate(() => document.activeElement?.textContent?.trim() ?? ''));
  }
  expect(seen.at(-1)).toBe('Fit the model');
});

test('after "Fit the model" focus is on the fitted model’s heading', async ({ page }) => {
  await paste(page);
  await page.getByRole('checkbox', { name: 'age' }).check();
  await page.getByRole('checkbox', { name: 'sex' }).check();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByRole('heading', { name: 'The fitted model' })).toBeFocused({ timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).toBeVisible();
});

test('Escape cancels "Start afresh"; the safe choice "Keep my work" has the focus', async ({ page }) => {
  await paste(page);
  await page.getByRole('button', { name: 'Start afresh…' }).click();
  await expect(page.getByRole('button', { name: 'Keep my work' })).toBeFocused();
  await shot(page, 'start-afresh-confirm');
  await page.keyboard.press('Escape');
  await expect(page.getByRole('button', { name: 'Yes, start afresh' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Start afresh…' })).toBeFocused();
  await expect(page.getByRole('heading', { name: /60 rows × 4 columns/ })).toBeVisible();
  // Enter on the focused default keeps the work too.
  await page.getByRole('button', { name: 'Start afresh…' }).click();
  await page.keyboard.press('Enter');
  await expect(page.getByRole('heading', { name: /60 rows × 4 columns/ })).toBeVisible();
});

test('bootstrap progress and its Cancel sit by the button that started it', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  await page.getByLabel('Bootstrap resamples').fill('2000');
  await page.getByRole('button', { name: 'Run bootstrap validation' }).click();
  const section = page.getByRole('region', { name: 'Internal validation' });
  await expect(section.getByText(/Bootstrap validation \(2000 resamples\) — \d+ of 2000/)).toBeVisible({
    timeout: 20_000,
  });
  await expect(page.getByRole('region', { name: 'Running' })).toHaveCount(0);
  const run = await section.getByRole('button', { name: 'Run bootstrap validation' }).boundingBox();
  const cancel = section.getByRole('button', { name: 'Cancel' });
  const box = await cancel.boundingBox();
  expect(Math.abs(box!.y - run!.y)).toBeLessThan(120);
  await shot(page, 'bootstrap-by-button');
  await cancel.click();
  await expect(page.getByTestId('validation-status')).toContainText('cancelled');
});
