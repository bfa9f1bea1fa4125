import { generateDemo } from '../src/engine/demo';
import { expect, shot, test } from './guard';
import { toCsv } from './helpers';

const VIEWS = [
  'Odds ratios',
  'Risk curve & loss',
  'Discrimination & calibration',
  'Cut-off & costs',
  'Influential rows',
  'Monitor later cases',
  // last: the loop ends here, where the PDF button is
  'Score & validate',
];

async function ssi(page: import('@playwright/test').Page) {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
}

test('after a predictor is unticked every result view says it is out of date and the PDF is refused', async ({
  page,
}) => {
  await ssi(page);
  const nav = page.getByRole('navigation', { name: 'Workbench views' });
  for (const v of VIEWS) {
    await nav.getByRole('button', { name: v }).click();
    await expect(page.getByTestId('stale-banner')).toHaveCount(0);
  }
  await nav.getByRole('button', { name: 'Data & roles' }).click();
  await page.getByRole('checkbox', { name: 'bmi', exact: true }).uncheck();
  for (const v of VIEWS) {
    await nav.getByRole('button', { name: v }).click();
    await expect(page.getByTestId('stale-banner')).toBeVisible();
    if (v === 'Odds ratios') await shot(page, 'stale-odds');
    if (v === 'Cut-off & costs') await shot(page, 'stale-cutoff');
    if (v === 'Influential rows') await shot(page, 'stale-influence');
  }
  await page.getByRole('button', { name: 'Download the model summary (PDF)' }).click();
  await expect(page.getByText(/this file would describe the previous model: nothing was saved/)).toBeVisible();
  await expect(page.getByRole('button', { name: 'Refit the model' })).toBeVisible();
  await page.getByTestId('stale-banner').getByRole('button', { name: 'Refit' }).click();
  await expect(page.getByTestId('stale-banner')).toHaveCount(0, { timeout: 30_000 });
  await expect(page.getByText(/nothing was saved/)).toHaveCount(0);
  const download = page.waitForEvent('download');
  await page.getByRole('button', { name: 'Download the model summary (PDF)' }).click();
  expect((await download).suggestedFilename()).toMatch(/\.pdf$/);
});

test('Age = 500 is named as outside the data; the development file as "external" data is called out', async ({
  page,
}) => {
  await ssi(page);
  await page.getByRole('button', { name: 'Score & validate' }).click();
  const age = page.locator('.case-form label', { hasText: /^age/ }).locator('input');
  await age.fill('500');
  await expect(page.getByTestId('outside-age')).toContainText('Outside the data the model was fitted on');
  await page.getByRole('button', { name: 'Predict the risk' }).click();
  await expect(page.getByTestId('score-outside')).toContainText('age = 500');
  await shot(page, 'outside-age');
  await age.fill('-5');
  await page.getByRole('button', { name: 'Predict the risk' }).click();
  await expect(page.getByTestId('score-outside')).toContainText('age = −5');

  const cases =
    'age,bmi,diabetes,asa_class,wound_class,duration_min,prophylaxis,smoker\n' +
    '70,31,yes,III,dirty,200,none,yes\n500,31,no,I,clean,90,on time,no\n60,28,no,II,filthy,90,on time,no\n';
  await page
    .getByTestId('batch-input')
    .setInputFiles({ name: 'new.csv', mimeType: 'text/csv', buffer: Buffer.from(cases) });
  await expect(page.getByTestId('batch-result')).toContainText('2 of 3 rows scored', { timeout: 30_000 });
  await expect(page.getByTestId('batch-unknown')).toContainText('row 4, wound_class = “filthy”');
  await expect(page.getByTestId('batch-outside')).toContainText('row 3: age');
  await shot(page, 'batch-outside');

  const csv = toCsv(generateDemo('ssi').dataset);
  await page
    .getByLabel('Choose a file with known outcomes')
    .setInputFiles({ name: 'same.csv', mimeType: 'text/csv', buffer: Buffer.from(csv) });
  await expect(page.getByTestId('external-same')).toContainText('same cases the model was fitted on', {
    timeout: 30_000,
  });
  await shot(page, 'external-same');
});
