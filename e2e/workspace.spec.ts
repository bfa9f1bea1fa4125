import { execFileSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { Page } from '@playwright/test';
import { expect, test } from './guard';

const SHOTS = '/tmp/shots-l';
mkdirSync(SHOTS, { recursive: true });
const shot = (page: Page, name: string, fullPage = false) =>
  page.screenshot({ path: `${SHOTS}/${name}.png`, fullPage });
const tmp = () => mkdtempSync(join(tmpdir(), 'fulcra-e2e-'));
const plain = (s: string) => s.replace(/\u2212/g, '-').trim();

async function openDemo(page: Page, url = '/') {
  await page.goto(url);
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
}

/** Term → odds-ratio text of the odds table. */
async function oddsRatios(page: Page): Promise<Record<string, string>> {
  const rows = page.getByTestId('odds-table').locator('tbody tr');
  await expect(rows.first()).toBeVisible();
  const out: Record<string, string> = {};
  for (const r of await rows.all())
    out[(await r.getAttribute('data-name'))!] = (await r.locator('td[data-col="or"]').textContent())!;
  return out;
}

test('everything set up comes back after a reload: roles, method, fit, cut-off, costs, words', async ({ page }) => {
  await openDemo(page);
  await page.getByRole('button', { name: 'Data & roles' }).click();
  await page.getByRole('checkbox', { name: 'smoker' }).uncheck();
  await page.getByRole('radio', { name: /Firth/ }).check();
  await page.getByRole('button', { name: 'Fit the model' }).click();
  await expect(page.getByTestId('fit-summary')).toContainText('Firth penalised likelihood', { timeout: 30_000 });
  await expect(page.locator('tr[data-name^="smoker"]')).toHaveCount(0);
  const before = await oddsRatios(page);

  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await page.getByLabel('Cost of a missed case').fill('20');
  const slider = page.getByRole('slider');
  await slider.fill('0.25');
  await expect(page.getByTestId('cutoff-value')).toHaveText('25.0%');
  const tp = await page.getByTestId('tp').textContent();

  await page.getByRole('navigation', { name: 'Workbench views' }).getByRole('button', { name: 'Odds ratios' }).click();
  await page.getByText('Your words for the summary').click();
  await page.getByLabel('Purpose of the model').fill('Flag patients for a wound review on day 3');
  await page.waitForTimeout(1600);
  await expect(page.getByTestId('autosaved')).toBeVisible();
  await shot(page, '01-before-reload');

  await page.reload();
  const restored = page.getByRole('status').filter({ hasText: /^Restored your work from/ });
  await expect(restored).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('fit-summary')).toContainText('Firth penalised likelihood', { timeout: 30_000 });
  expect(await oddsRatios(page)).toEqual(before);
  await expect(restored.getByRole('button', { name: 'Start afresh' })).toBeVisible();
  await shot(page, '02-restored');
  await page.getByText('Your words for the summary').click();
  await expect(page.getByLabel('Purpose of the model')).toHaveValue('Flag patients for a wound review on day 3');

  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(page.getByTestId('cutoff-value')).toHaveText('25.0%');
  await expect(page.getByLabel('Cost of a missed case')).toHaveValue('20');
  await expect(page.getByTestId('tp')).toHaveText(tp!);

  await page.getByRole('button', { name: 'Data & roles' }).click();
  await expect(page.getByRole('checkbox', { name: 'smoker' })).not.toBeChecked();
  await expect(page.getByRole('radio', { name: /Firth/ })).toBeChecked();

  // "Start afresh" forgets it: the next reload starts empty.
  await restored.getByRole('button', { name: 'Start afresh' }).click();
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  await page.reload();
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  await page.waitForTimeout(500);
  await expect(page.getByTestId('odds-table')).toHaveCount(0);
});

test('the model-summary PDF has its sections and the AUC and odds ratios the page shows', async ({ page }) => {
  await openDemo(page);
  const estimate = plain((await page.locator('tr[data-name="age"] td[data-col="estimate"]').textContent())!);
  const orAge = Number(plain((await page.locator('tr[data-name="age"] td[data-col="or"]').textContent())!));
  const orDiabetes = Number(
    plain((await page.locator('tr[data-name="diabetes=yes"] td[data-col="or"]').textContent())!),
  );
  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  const auc = plain(
    (await page.getByTestId('metrics').locator('tbody tr').first().locator('td').first().textContent())!,
  );
  expect(auc).toMatch(/^0\.\d{3}$/);

  await page.getByRole('navigation', { name: 'Workbench views' }).getByRole('button', { name: 'Odds ratios' }).click();
  await page.getByText('Your words for the summary').click();
  await page.getByLabel('Purpose of the model').fill('Flag patients for a wound review on day 3');
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const dir = tmp();
  const pdf = join(dir, download.suggestedFilename());
  expect(pdf).toMatch(/\.pdf$/);
  await download.saveAs(pdf);
  const text = plain(execFileSync('pdftotext', ['-layout', pdf, '-']).toString('utf8'));
  for (const heading of [
    'Purpose, setting and population',
    'Data and outcome',
    'Predictors and their handling',
    'Sample size',
    'Modelling method',
    'Model equation',
    'Coefficients and odds ratios',
    'Performance',
    'Decision threshold',
    'Cautions',
  ]) {
    expect(text, heading).toContain(heading);
  }
  expect(text).toContain('Flag patients for a wound review on day 3');
  expect(text).toMatch(new RegExp(`AUC \\(c-statistic\\)\\s+${auc.replace('.', '\\.')}\\b`));
  const ageLine = text.split('\n').find((l) => /^\s*age\s+-?\d/.test(l));
  expect(ageLine, 'the age line of the coefficient table').toBeDefined();
  expect(ageLine).toContain(estimate);
  // The page and the PDF both show odds ratios to 3 decimals.
  expect(ageLine).toContain(orAge.toFixed(3));
  const diabetesLine = text.split('\n').find((l) => /^\s*diabetes=yes\s+-?\d/.test(l));
  expect(diabetesLine).toContain(orDiabetes.toFixed(3));
  expect(text).toMatch(/Positive likelihood ratio\s+\d+\.\d+ \(95% CI \d+\.\d+ to \d+\.\d+, log method\)/);
  if (process.env.FULCRA_KEEP_PDF) await download.saveAs(process.env.FULCRA_KEEP_PDF);

  // -singlefile: one page, named page.png whatever the page count (pdftoppm pads page numbers to the count's width)
  execFileSync('pdftoppm', ['-r', '50', '-png', '-f', '1', '-l', '1', '-singlefile', pdf, join(dir, 'page')]);
  const png = join(dir, 'page.png');
  // A blank A4 page at 50 dpi is a ~1 KB PNG; text and tables make it many times larger.
  expect(statSync(png).size).toBeGreaterThan(15_000);
  execFileSync('pdftoppm', ['-r', '50', '-gray', '-f', '1', '-l', '1', '-singlefile', pdf, join(dir, 'gray')]);
  const pgm = readFileSync(join(dir, 'gray.pgm'));
  const header = pgm
    .subarray(0, 40)
    .toString('latin1')
    .match(/^P5\s+(\d+)\s+(\d+)\s+(\d+)\s/)!;
  const pixels = pgm.subarray(header[0].length);
  let ink = 0;
  for (const v of pixels) if (v < 200) ink++;
  expect(ink / pixels.length).toBeGreaterThan(0.02);
});

test('a workspace saved as a file, after "Start afresh", opens with the same odds ratios', async ({ page }) => {
  await openDemo(page);
  const before = await oddsRatios(page);
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Save workspace as a file' }).click(),
  ]);
  expect(download.suggestedFilename()).toMatch(/\.fulcra-workspace\.json\.gz$/);
  const file = join(tmp(), download.suggestedFilename());
  await download.saveAs(file);
  expect([...readFileSync(file).subarray(0, 2)]).toEqual([0x1f, 0x8b]);

  await page.getByRole('button', { name: 'Start afresh…' }).click();
  await shot(page, '03-start-afresh-confirm');
  await page.getByRole('button', { name: 'Yes, start afresh' }).click();
  await expect(page.getByRole('button', { name: /Surgical-site infections/ })).toBeVisible();
  await expect(page.getByTestId('odds-table')).toHaveCount(0);

  await page.getByTestId('workspace-input').setInputFiles(file);
  await expect(page.getByRole('status').filter({ hasText: /^Opened the workspace/ })).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  expect(await oddsRatios(page)).toEqual(before);
  await shot(page, '04-opened-workspace');
});

test('every plot offers SVG and PNG downloads from the keyboard', async ({ page }) => {
  await openDemo(page);
  await page.getByRole('button', { name: 'Discrimination & calibration' }).click();
  for (const title of ['ROC curve', 'Precision–recall curve', 'Calibration curve', 'Decision curve']) {
    await expect(page.getByRole('group', { name: `Save the plot: ${title}` })).toBeVisible();
  }
  const svgButton = page.getByRole('button', { name: 'Save ROC curve as SVG' });
  await page.getByRole('button', { name: 'Run bootstrap validation' }).focus();
  await page.keyboard.press('Tab');
  await expect(svgButton).toBeFocused();
  await shot(page, '05-plot-export-focus');
  const [svgDownload] = await Promise.all([page.waitForEvent('download'), page.keyboard.press('Enter')]);
  expect(svgDownload.suggestedFilename()).toMatch(/^fulcra-roc-curve-\d{4}-\d{2}-\d{2}\.svg$/);
  const svgFile = join(tmp(), svgDownload.suggestedFilename());
  await svgDownload.saveAs(svgFile);
  const svg = readFileSync(svgFile, 'utf8');
  expect(svg).toContain('<svg');
  expect(svg).toContain('xmlns="http://www.w3.org/2000/svg"');
  expect(svg).toContain('ROC curve');

  const [pngDownload] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Save Calibration curve as PNG' }).click(),
  ]);
  const pngFile = join(tmp(), pngDownload.suggestedFilename());
  await pngDownload.saveAs(pngFile);
  expect([...readFileSync(pngFile).subarray(1, 4)].map((c) => String.fromCharCode(c)).join('')).toBe('PNG');

  await page.getByRole('navigation', { name: 'Workbench views' }).getByRole('button', { name: 'Odds ratios' }).click();
  await expect(page.getByRole('group', { name: 'Save the plot: Odds ratios (forest plot)' })).toBeVisible();
  await page.getByRole('button', { name: 'Risk curve & loss' }).click();
  await expect(page.getByRole('group', { name: /Save the plot: Predicted risk against/ })).toBeVisible();
  await expect(page.getByRole('group', { name: 'Save the plot: Loss surface' })).toBeVisible();
  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(
    page.getByRole('group', { name: 'Save the plot: Expected cost per 100 cases against the cut-off' }),
  ).toBeVisible();
  await shot(page, '06-cutoff-plot-export', true);
});

test('after the engine crashes, the data grid and the odds ratios come back on their own', async ({ page }) => {
  await openDemo(page, '/?testhooks=1');
  const before = await oddsRatios(page);
  await page.evaluate(() =>
    (window as unknown as { fulcraTestHooks: { crashEngine(): Promise<void> } }).fulcraTestHooks.crashEngine(),
  );
  const notice = page.getByRole('status').filter({ hasText: /calculation engine stopped unexpectedly/ });
  await expect(notice).toContainText('were loaded into it again and the model was restored', { timeout: 30_000 });
  await expect(page.getByTestId('odds-table')).toBeVisible();
  expect(await oddsRatios(page)).toEqual(before);
  await shot(page, '07-after-crash');
  await page.getByRole('button', { name: 'Data & roles' }).click();
  const grid = page.getByRole('grid', { name: 'Data rows' });
  await expect(grid).toBeVisible();
  await expect(grid.getByRole('row').nth(2)).toBeVisible();
  await page.getByRole('button', { name: 'Cut-off & costs' }).click();
  await expect(page.getByTestId('tp')).toBeVisible();
});

test('when the browser refuses storage, one notice says so and the workspace file still saves', async ({ page }) => {
  await page.addInitScript(() => {
    Object.defineProperty(IDBFactory.prototype, 'open', {
      value() {
        throw new DOMException('The user denied permission to access the database.', 'SecurityError');
      },
    });
  });
  await openDemo(page);
  const notice = page.getByRole('alert').filter({ hasText: 'does not allow this page to store data' });
  await expect(notice).toHaveCount(1);
  await expect(notice).toContainText('Save the workspace as a file instead');
  await page.waitForTimeout(1500);
  await expect(notice).toHaveCount(1);
  await expect(page.getByTestId('autosaved')).toHaveCount(0);
  await shot(page, '08-storage-denied');
  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('button', { name: 'Save workspace as a file' }).click(),
  ]);
  const file = join(tmp(), download.suggestedFilename());
  await download.saveAs(file);
  expect(statSync(file).size).toBeGreaterThan(10_000);
});
