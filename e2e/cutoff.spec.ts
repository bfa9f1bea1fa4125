import type { Locator, Page } from '@playwright/test';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

const px = async (l: Locator) => Number(await l.getAttribute('data-px'));

async function openCutoff(page: Page, demo: RegExp) {
  await page.goto('/');
  await page.getByRole('button', { name: demo }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(page.getByTestId('risk-histogram')).toBeVisible();
}

test('the risk histogram follows the slider; coinciding cut-offs both stay visible', async ({ page }) => {
  await openCutoff(page, /Heat-seal failures/);
  const hist = page.getByTestId('risk-histogram');
  await expect(hist.getByTestId('strip-events').locator('rect').first()).toBeVisible();
  await expect(hist.getByTestId('strip-non-events').locator('rect').first()).toBeVisible();
  // Zoomed by default to where the cost changes, with the rule stated.
  await expect(page.getByTestId('zoom-rule')).toContainText('1st to the 99th percentile');
  // The export control and the table equivalent the other plots have.
  await expect(
    page.getByRole('group', { name: 'Save the plot: Predicted risk of cases with and without the event' }),
  ).toBeVisible();
  await hist.getByText('Predicted risks as numbers').click();
  await expect(hist.getByRole('columnheader', { name: 'With the event' })).toBeVisible();
  await expect(hist.getByRole('row')).toHaveCount(1 + 40 + 1);
  await hist.getByText('Predicted risks as numbers').click();
  await shot(page, 'cutoff-seals', true);
  await expectNoSidewaysScroll(page);

  // The first fit puts the cut-off on the cost-based one: the two lines coincide and both show.
  for (const plot of ['hist', 'cost']) {
    const current = page.getByTestId(`${plot}-mark-current`);
    const costBased = page.getByTestId(`${plot}-mark-cost-based`);
    // A vertical line has no width, so its height and its own label stand for "visible".
    for (const mark of [current, costBased]) {
      expect((await mark.locator('line').boundingBox())!.height).toBeGreaterThan(100);
      await expect(mark.locator('text')).toBeVisible();
    }
    expect(Math.abs((await px(current)) - (await px(costBased)))).toBeGreaterThanOrEqual(3);
    const a = (await current.locator('text').boundingBox())!;
    const b = (await costBased.locator('text').boundingBox())!;
    expect(a.y + a.height <= b.y || b.y + b.height <= a.y).toBe(true);
    expect(await current.locator('line').getAttribute('stroke-dasharray')).not.toBe(
      await costBased.locator('line').getAttribute('stroke-dasharray'),
    );
  }
  await expect(page.getByTestId('cutoff-how')).toContainText('cost-based');

  // Moving the slider moves the line on both plots.
  const before = await px(page.getByTestId('hist-mark-current'));
  const slider = page.getByRole('slider');
  await slider.focus();
  await slider.fill('0.2');
  await expect(page.getByTestId('cutoff-value')).toHaveText('20.0%');
  await expect(page.getByTestId('cutoff-how')).toContainText('set by hand');
  await expect.poll(() => px(page.getByTestId('hist-mark-current'))).toBeGreaterThan(before + 30);
  await expect(page.getByTestId('cost-mark-current').locator('text')).toHaveText(/current 20\.0%/);
  await shot(page, 'cutoff-seals-moved');

  // The user can widen the view to every cut-off from 0 to 1.
  await page.getByLabel('Show cut-offs 0–1').check();
  await expect(page.getByTestId('zoom-rule')).toHaveText('Showing every cut-off from 0 to 1.');
  await expect(page.getByTestId('cost-curve').locator('svg text', { hasText: '100%' })).toBeVisible();
  await shot(page, 'cutoff-seals-wide');
});

test('a cost of 0, −5 or nothing is refused beside the box and the costs in force stay', async ({ page }) => {
  await openCutoff(page, /Surgical-site infections/);
  const missed = page.getByRole('spinbutton', { name: /Cost of a missed case/ });
  const ratio = page.getByTestId('cost-ratio');
  const cutoff = await page.getByTestId('cutoff-value').textContent();
  for (const bad of ['0', '-5', '']) {
    await missed.fill(bad);
    await expect(missed).toHaveAttribute('aria-invalid', 'true');
    await expect(page.getByRole('alert').filter({ hasText: 'The cost in force stays 10' })).toBeVisible();
    await expect(ratio).toContainText('a missed case costs 10.0 false alarms (the last valid costs)');
    await expect(page.getByTestId('cutoff-value')).toHaveText(cutoff!);
  }
  await shot(page, 'cutoff-bad-cost');
  await missed.fill('5');
  await expect(missed).toHaveAttribute('aria-invalid', 'false');
  await expect(page.getByText('The cost in force stays')).toHaveCount(0);
  await expect(ratio).toHaveText('Only the ratio matters: a missed case costs 5.0 false alarms.');
  // The cut-off was cost-based, so it follows the new costs: 1/(1 + 5).
  await expect(page.getByTestId('cutoff-value')).toHaveText('16.7%');
  await shot(page, 'cutoff-ssi', true);
});
