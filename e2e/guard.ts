import { test as base, expect } from '@playwright/test';

const LOCAL = /^(http:\/\/127\.0\.0\.1(:\d+)?\/|blob:|data:)/;

/**
 * Every test: records all requests and fails if one goes beyond 127.0.0.1 / blob: / data:, and fails on
 * any console error or uncaught page error.
 */
export const test = base.extend<{ guard: void }>({
  guard: [
    async ({ page }, use) => {
      const outside: string[] = [];
      const errors: string[] = [];
      page.on('request', (r) => {
        if (!LOCAL.test(r.url())) outside.push(r.url());
      });
      page.on('console', (m) => {
        if (m.type() === 'error') errors.push(m.text());
      });
      page.on('pageerror', (e) => errors.push(String(e)));
      await use();
      expect(outside, 'requests beyond 127.0.0.1 / blob: / data:').toEqual([]);
      expect(errors, 'console errors').toEqual([]);
    },
    { auto: true },
  ],
});

export { expect };

export async function shot(page: import('@playwright/test').Page, name: string, fullPage = false): Promise<void> {
  await page.screenshot({ path: `/tmp/shots/${name}.png`, fullPage });
}

/** The page itself never scrolls sideways at 1280×800 (wide tables scroll inside their own box). */
export async function expectNoSidewaysScroll(page: import('@playwright/test').Page): Promise<void> {
  const [scroll, client] = await page.evaluate(() => [
    document.documentElement.scrollWidth,
    document.documentElement.clientWidth,
  ]);
  expect(scroll).toBeLessThanOrEqual(client);
}
