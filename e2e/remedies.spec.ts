import { expect, shot, test } from './guard';

test('separation is explained in plain words and Firth is one click away', async ({ page }) => {
  const rows = ['dose\tresponse'];
  for (let i = 1; i <= 40; i++) rows.push(`${i}\t${i > 20 ? 'yes' : 'no'}`);
  await page.goto('/');
  await page.getByLabel(/Or paste cells copied from a spreadsheet/).fill(rows.join('\n'));
  await page.getByRole('button', { name: 'Use pasted cells' }).click();
  await page.getByLabel('Outcome (yes/no)').selectOption('response');
  await page.getByRole('checkbox', { name: 'dose' }).check();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  const notice = page.locator('.notice[data-code="complete-separation"]');
  await expect(notice).toBeVisible({ timeout: 30_000 });
  await expect(notice).toContainText('dose');
  await shot(page, '30-separation');
  await notice.getByRole('button', { name: /Refit with Firth/ }).click();
  await expect(page.getByTestId('fit-summary')).toContainText('Firth penalised likelihood', { timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).toContainText('profile likelihood');
  await shot(page, '31-firth');
});

test('the complete-case fit can be set beside a fit pooled over multiple imputations', async ({ page }) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Fit again with multiple imputation' }).click();
  const table = page.getByTestId('imputed-table');
  await expect(table).toBeVisible({ timeout: 60_000 });
  await expect(table).toContainText('Pooled over 10 imputations');
  await expect(table).toContainText('bmi: 37 by pmm');
  await table.scrollIntoViewIfNeeded();
  await shot(page, '32-imputed');
});
