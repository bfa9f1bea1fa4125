import { expect, expectNoSidewaysScroll, shot, test } from './guard';

test('a categorical predictor: points with interval bars at its named levels, not a line over numbers', async ({
  page,
}) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  const section = page.locator('section', {
    has: page.getByRole('heading', { name: 'Predicted risk against one predictor' }),
  });
  await section.getByLabel('Predictor').selectOption('asa_class');
  const ticks = section.getByTestId('category-tick');
  await expect(ticks).toHaveText(['I', 'II', 'III', 'IV']);
  const plot = section.locator('figure svg').first();
  await expect(plot.locator('text', { hasText: /^−?0\.5$/ })).toHaveCount(0);
  await expect(plot.locator('circle')).toHaveCount(4);
  await expect(section.getByText(/Bars: 95% confidence interval/)).toBeVisible();
  await expect(page.locator('aside.caution')).toContainText('Not a medical device');
  await shot(page, 'shape-ssi-categorical');
  await expectNoSidewaysScroll(page);
});

test('seal demo: standardised loss surface with a ±4 SE window, a colour bar with numbers, quality cautions', async ({
  page,
}) => {
  await page.goto('/');
  await page.getByRole('button', { name: /Heat-seal failures/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  const surface = page.locator('section', { has: page.getByRole('heading', { name: 'The loss the fit minimises' }) });
  await expect(surface.getByTestId('loss-window')).toContainText('per standard deviation');
  await expect(surface.getByTestId('loss-window')).toContainText('±4 standard errors');
  await expect(surface.locator('svg text', { hasText: 'seal_temp_c (coefficient per SD)' })).toBeVisible();
  const bar = surface.getByTestId('loss-colour-bar');
  const labels = (await bar.locator('text').allTextContents()).filter((t) => /^\d+\.\d+$/.test(t));
  expect(labels.length).toBe(5);
  const values = labels.map(Number);
  expect(values[0]).toBeLessThan(values[4]);
  await expect(surface.getByText(/Darker = lower mean cross-entropy \(bar: \d/)).toBeVisible();

  const caution = page.locator('aside.caution');
  await expect(caution).toContainText('Not a validated measuring or control system');
  await expect(caution).toContainText('follow your quality system and local procedures');
  await expect(caution).not.toContainText('medical device');
  await shot(page, 'shape-seals-standardised', true);

  await surface.getByLabel('Scale').selectOption('original');
  await expect(surface.getByTestId('loss-window')).toContainText('per unit of each predictor');
  await expect(surface.locator('svg text', { hasText: 'seal_temp_c (coefficient per unit)' })).toBeVisible();
  await surface.getByLabel('Window').selectOption('path');
  await expect(surface.getByTestId('loss-window')).toContainText('from the optimiser’s start');
  await shot(page, 'shape-seals-original-path', true);

  await caution.getByLabel('Setting').selectOption('clinical');
  await expect(caution).toContainText('Not a medical device');
});
