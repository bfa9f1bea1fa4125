import { execFileSync } from 'node:child_process';
import { copyFileSync, mkdirSync, readFileSync } from 'node:fs';
import { generateDemo } from '../src/engine/demo';
import { fit } from '../src/engine/fitting/fit';
import { pointsAnalysis } from '../src/engine/points';
import { riskText } from '../src/report/pointsCard';
import { expect, expectNoSidewaysScroll, shot, test } from './guard';

test('bedside points card on the invented SSI demo: build, read the tables, save the card as PDF and PNG', async ({
  page,
}) => {
  test.setTimeout(120_000);
  mkdirSync('/tmp/shots', { recursive: true });
  await page.goto('/');
  await page.getByRole('button', { name: /Surgical-site infections/ }).click();
  await expect(page.getByTestId('odds-table')).toBeVisible({ timeout: 30_000 });

  await page.getByRole('button', { name: 'Bedside points card' }).click();
  await expect(page.getByTestId('points-panel')).toBeVisible();
  // one point = 10 years of age
  await page.getByTestId('points-increase').fill('10');
  await page.getByTestId('points-column').selectOption('age');
  await page.getByTestId('points-build').click();
  await expect(page.getByTestId('points-risk-table')).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId('points-base-unit')).toContainText('an increase of 10 in "age"');

  // The same score as the engine gives in Node for the demo's model (profile limits do not change estimates).
  const demo = generateDemo('ssi');
  const model = fit(demo.dataset, demo.spec, { profile: false });
  const expected = pointsAnalysis(model, demo.dataset, {
    baseUnit: { kind: 'per-increase', column: 'age', increase: 10 },
  });
  await expect(page.getByTestId('points-term')).toHaveCount(expected.score.terms.length);
  const rows = page.getByTestId('points-risk-table').locator('tbody tr');
  await expect(rows).toHaveCount(expected.score.table.length);
  const last = expected.score.table[expected.score.table.length - 1];
  await expect(rows.last().locator('td')).toHaveText(riskText(last.risk));
  const comparison = page.getByTestId('points-comparison');
  await expect(comparison).toContainText(expected.evaluation.points.auc.auc!.toFixed(3));
  await expect(comparison).toContainText(expected.evaluation.model.auc.auc!.toFixed(3));
  await expect(page.getByTestId('points-cautions')).toContainText('Not a medical device');
  await expect(page.getByTestId('points-cautions')).toContainText('approximation of the model');
  await expectNoSidewaysScroll(page);
  await shot(page, 'points-01-view', true);

  // The card as PDF: one page, the cautions and every total's risk on it.
  const [pdf] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByTestId('points-card-pdf').click(),
  ]);
  expect(pdf.suggestedFilename()).toMatch(/^fulcra-points-card-ssi_30d-\d{4}-\d{2}-\d{2}\.pdf$/);
  const pdfPath = (await pdf.path())!;
  copyFileSync(pdfPath, '/tmp/shots/points-card.pdf');
  expect(execFileSync('pdfinfo', [pdfPath]).toString()).toMatch(/Pages:\s+1\n/);
  const text = execFileSync('pdftotext', ['-layout', pdfPath, '-']).toString().replace(/\s+/g, ' ');
  expect(text).toContain('Bedside points score');
  expect(text).toContain('Not a medical device');
  for (const r of expected.score.table) expect(text).toContain(riskText(r.risk));
  execFileSync('pdftoppm', ['-png', '-r', '60', '-singlefile', pdfPath, '/tmp/shots/points-card-pdf']);

  // The card as PNG: a 300-dpi A4 image.
  const [png] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByTestId('points-card-png').click(),
  ]);
  expect(png.suggestedFilename()).toMatch(/\.png$/);
  const pngPath = (await png.path())!;
  copyFileSync(pngPath, '/tmp/shots/points-card.png');
  const bytes = readFileSync(pngPath);
  expect(bytes.subarray(1, 4).toString()).toBe('PNG');
  const width = bytes.readUInt32BE(16);
  const height = bytes.readUInt32BE(20);
  expect(width).toBeGreaterThan(2400);
  expect(height / width).toBeCloseTo(297 / 210, 2);

  // The model summary carries the card page; the model file carries the points table.
  await page.getByRole('button', { name: 'Odds ratios' }).click();
  const [summary] = await Promise.all([
    page.waitForEvent('download', { timeout: 30_000 }),
    page.getByRole('button', { name: 'Download the model summary (PDF)' }).click(),
  ]);
  const summaryText = execFileSync('pdftotext', [(await summary.path())!, '-']).toString();
  expect(summaryText).toContain('Bedside points score');
  expect(summaryText.replace(/\s+/g, ' ')).toContain('The card is an approximation of the model');
});
