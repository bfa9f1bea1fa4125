import { expect, expectNoSidewaysScroll, shot, test } from './guard';

/** The tops of the header's visible items: one line when they all sit within a few pixels of each other. */
async function headerRows(page: import('@playwright/test').Page): Promise<number> {
  const tops = await page.locator('header.top > *:visible, header.top .workspace-bar > *:visible').evaluateAll((els) =>
    els.map((e) => {
      const r = e.getBoundingClientRect();
      return r.top + r.height / 2;
    }),
  );
  const rows: number[] = [];
  for (const t of tops.sort((a, b) => a - b)) if (!rows.some((r) => Math.abs(r - t) < 8)) rows.push(t);
  return rows.length;
}

test('the header stays on one line from 1280 px up, and the page stays usable at 1024 px', async ({ page }) => {
  await page.setViewportSize({ width: 1440, height: 800 });
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('autosaved')).toBeVisible({ timeout: 10_000 });
  expect(await headerRows(page)).toBe(1);
  await expect(page.locator('header.top .invented')).toBeVisible();
  await shot(page, '50-header-1440');

  await page.setViewportSize({ width: 1280, height: 800 });
  expect(await headerRows(page)).toBe(1);
  await expect(page.locator('header.top .invented')).toBeVisible();
  await expect(page.getByTestId('source')).toHaveAttribute('title', /surgical-site infections/);
  await shot(page, '51-header-1280');

  await page.setViewportSize({ width: 1024, height: 768 });
  await expectNoSidewaysScroll(page);
  await expect(page.getByRole('button', { name: 'Save workspace as a file' })).toBeInViewport();
  await expect(page.locator('header.top .local')).toBeInViewport();
  await shot(page, '52-header-1024');
});
