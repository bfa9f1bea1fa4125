import { execFileSync } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { generateDemo } from '../src/engine/demo';
import { ssiMonitoringChange } from '../src/engine/demo/ssiMonitoring';
import { fit } from '../src/engine/fitting/fit';
import { createModelFile, modelFileToJson } from '../src/io/export/modelFile';
import { expect, shot, test } from './guard';

const { ward, fromLabel } = ssiMonitoringChange;

async function download(page: import('@playwright/test').Page, click: () => Promise<void>): Promise<Buffer> {
  const [d] = await Promise.all([page.waitForEvent('download'), click()]);
  return readFileSync((await d.path())!);
}

test('the invented year shows the built-in deterioration and names the ward; a saved model monitors it', async ({
  page,
}) => {
  test.setTimeout(180_000);
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });
  const nav = page.getByRole('navigation', { name: 'Workbench views' });

  // A model file saved now, to open later through "Open model".
  await nav.getByRole('button', { name: 'Score & validate' }).click();
  const modelJson = await download(page, () =>
    page.getByRole('button', { name: 'Save the model file (JSON)' }).click(),
  );

  await nav.getByRole('button', { name: 'Monitor later cases' }).click();
  await page.getByRole('button', { name: /invented monitoring year/ }).click();
  const result = page.getByTestId('monitor-result');
  await expect(result).toBeVisible({ timeout: 90_000 });
  await expect(page.getByTestId('monitor-file')).toContainText(/invented/i);
  await expect(result).toContainText('Model: the current fit');

  // At the default target run length, the chart on the changed ward's own cases signals after the change.
  await expect(page.getByTestId('arl-deteriorate')).toContainText('in-control average run length of 5,000 cases');
  const own = page.getByTestId('unit-signal-list').locator('tbody tr', { hasText: 'deterioration' });
  await expect(own.filter({ hasText: ward }).first()).toBeVisible();
  const ownDates = await own.filter({ hasText: ward }).locator('td:nth-child(3)').allTextContents();
  expect(ownDates.length).toBeGreaterThan(0);
  expect(ownDates.every((d) => d >= fromLabel)).toBe(true);

  // The target in-control run length is the user's: changing it puts the result out of date until run again.
  await page.getByLabel('Target in-control ARL (cases)').fill('2000');
  await expect(page.getByTestId('monitor-stale')).toBeVisible();
  await page.getByTestId('monitor-stale').getByRole('button', { name: 'Monitor again' }).click();
  await expect(page.getByTestId('monitor-stale')).toHaveCount(0, { timeout: 90_000 });
  await expect(page.getByTestId('arl-deteriorate')).toContainText('in-control average run length of 2,000 cases');

  // The deterioration chart signals after the date from which one ward's odds were tripled.
  const worse = page.getByTestId('signal-list').locator('tr', { hasText: 'deterioration' });
  await expect(worse.first()).toBeVisible();
  const dates = await worse.locator('td:nth-child(2)').allTextContents();
  expect(dates.some((d) => d >= fromLabel)).toBe(true);
  // The funnel names the ward as outside its limits.
  await expect(page.getByTestId('funnel-outliers')).toContainText(ward);
  await expect(page.locator('[data-testid="funnel-unit"][data-flag="above-outer"]')).toContainText(ward);
  await expect(page.getByTestId('monitor-cautions')).toContainText('not proof of worse care');
  await expect(page.getByTestId('arl-deteriorate')).toContainText(/achieved [\d,]+ by the Markov chain/);

  const units = (
    await download(page, () => page.getByRole('button', { name: 'Download the unit table (CSV)' }).click())
  )
    .toString('utf8')
    .split('\r\n');
  expect(units[0]).toMatch(/^unit,cases,observed,expected,O\/E,/);
  expect(units.find((l) => l.startsWith(`${ward},`))).toMatch(/,above-outer$/);

  await page.getByRole('button', { name: 'Recalibrate on the latest periods' }).click();
  await expect(page.getByTestId('recalibration')).toContainText(/new intercept .*slope/);
  await shot(page, 'monitoring-view', true);

  // The model-summary PDF carries the monitoring section (rendered for review with pdftoppm).
  await nav.getByRole('button', { name: 'Score & validate' }).click();
  const pdf = await download(page, () =>
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  );
  writeFileSync('/tmp/shots/monitoring-summary.pdf', pdf);
  const text = execFileSync('pdftotext', ['-enc', 'UTF-8', '/tmp/shots/monitoring-summary.pdf', '-'], {
    encoding: 'utf8',
  });
  expect(text).toContain('Monitoring with the model');
  expect(text).toContain('Cautions on monitoring');

  // The saved model, opened through "Open model", monitors the same file: the old result goes out of date first.
  await nav.getByRole('button', { name: 'Monitor later cases' }).click();
  await page
    .getByTestId('open-model-input')
    .setInputFiles({ name: 'ssi.fulcra-model.json', mimeType: 'application/json', buffer: modelJson });
  await expect(page.getByTestId('opened-model')).toContainText('ssi.fulcra-model.json');
  await expect(page.getByTestId('monitor-stale')).toBeVisible();
  const oe = await page.getByTestId('monitor-overall').locator('tr').nth(2).textContent();
  await page.getByRole('button', { name: 'Monitor', exact: true }).click();
  await expect(result).toContainText('model file “ssi.fulcra-model.json”', { timeout: 90_000 });
  await expect(page.getByTestId('monitor-stale')).toHaveCount(0);
  // The same model, so the same O/E as with the current fit.
  await expect(page.getByTestId('monitor-overall').locator('tr').nth(2)).toHaveText(oe!);
});

test('a model file opened on the start page monitors later cases without data and without a refit', async ({
  page,
}) => {
  test.setTimeout(120_000);
  // The model file as the page writes it (createModelFile + modelFileToJson) of the demo fitted by the engine (fit()).
  const demo = generateDemo('ssi');
  const modelJson = modelFileToJson(
    createModelFile(fit(demo.dataset, demo.spec, { profile: false }), { fulcraVersion: 'e2e', fileName: 'ssi.csv' }),
  );
  await page.goto('/');
  await page.getByTestId('open-model-input').setInputFiles({
    name: 'ward-model.fulcra-model.json',
    mimeType: 'application/json',
    buffer: Buffer.from(modelJson),
  });
  await expect(page.getByTestId('opened-model')).toContainText('ward-model.fulcra-model.json');
  await expect(page.getByRole('button', { name: 'Odds ratios' })).toBeDisabled();
  await shot(page, 'monitoring-start-opened');
  await page.getByRole('button', { name: /invented monitoring year/ }).click();
  await expect(page.getByTestId('monitor-result')).toContainText('model file “ward-model.fulcra-model.json”', {
    timeout: 90_000,
  });
  await expect(page.getByTestId('funnel-outliers')).toContainText(ward);
  await shot(page, 'monitoring-opened-model', true);
  // Without a fit there is no model summary: the monitoring report stands alone.
  const pdf = await download(page, () =>
    page.getByRole('button', { name: 'Download the monitoring report (PDF)' }).click(),
  );
  writeFileSync('/tmp/shots/monitoring-report.pdf', pdf);
  const text = execFileSync('pdftotext', ['-enc', 'UTF-8', '/tmp/shots/monitoring-report.pdf', '-'], {
    encoding: 'utf8',
  });
  expect(text).toContain('the model file "ward-model.fulcra-model.json"');
  expect(text).toContain('Cautions on monitoring');
});
