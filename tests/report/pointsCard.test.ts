import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { readModelFile } from '../../src/io/export/readModelFile';
import { POINTS_CAUTIONS, pointsCardItems, riskText } from '../../src/report/pointsCard';
import { pointsStep, runAnalysis } from '../../src/engine/workflow';
import { createApi } from '../../src/worker/api';
import type { FitRequest } from '../../src/worker/protocol';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-points-report-'));
const pdfPath = (name: string) => join(process.env.FULCRA_PDF_DIR ?? dir, `${name}.pdf`);
/** The PDF's text by pdftotext -layout (poppler-utils), whitespace collapsed. */
const text = (bytes: Uint8Array, name: string) => {
  writeFileSync(pdfPath(name), bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', '-layout', pdfPath(name), '-'], { encoding: 'utf8' }).replace(
    /\s+/g,
    ' ',
  );
};
const pages = (name: string) =>
  Number(/Pages:\s+(\d+)/.exec(execFileSync('pdfinfo', [pdfPath(name)], { encoding: 'utf8' }))![1]);

describe('the points card through the worker api: card PDF, model-summary PDF, model file', () => {
  const ssi = generateDemo('ssi');
  const req: FitRequest = { spec: ssi.spec, method: 'ml', level: 0.95, alpha: 1, profile: false };
  const costs = { missedCase: 5, falseAlarm: 1 };
  const created = '2026-12-04T18:00:00Z';

  it('prints the card and the section only after a score was built for the current fit', async () => {
    const api = createApi();
    await api.loadDemo('ssi');
    await api.fitModel(req, 'fit');
    const before = text(await api.modelReport(costs, 0.1, created, {}), 'summary-without');
    expect(before).not.toContain('Bedside points score');
    expect(JSON.parse(await api.modelFile(costs, 0.1, created, {})).points).toBeUndefined();
    await expect(api.pointsCard(created)).rejects.toMatchObject({ code: 'no-points-score' });

    const answer = await api.pointsScore({ baseUnit: { kind: 'per-increase', column: 'age', increase: 10 } });
    if (!answer.ok) throw new Error(answer.problem.message);
    const points = answer.points;
    expect(await api.currentPoints()).toEqual(points);
    const card = text(await api.pointsCard(created), 'card');
    expect(pages('card')).toBe(1);
    expect(card).toContain('Bedside points score');
    expect(card).toContain(points.score.baseUnit.description);
    for (const c of POINTS_CAUTIONS) expect(card).toContain(c.slice(0, 60));
    // every category and every total's risk is on the card
    for (const t of points.score.terms) for (const c of t.categories) expect(card).toContain(c.label);
    for (const r of points.score.table) expect(card).toContain(riskText(r.risk));

    const summary = text(await api.modelReport(costs, 0.1, created, {}), 'summary-with');
    const before_pages = pages('summary-without');
    expect(pages('summary-with')).toBeGreaterThanOrEqual(before_pages + 2);
    expect(summary).toContain('Bedside points score');
    expect(summary).toContain('Sullivan, Massaro');
    expect(summary).toContain('The card is an approximation of the model');

    const file = readModelFile(await api.modelFile(costs, 0.1, created, {}));
    expect(file.points).toEqual(points.score);

    // a new fit: the score belongs to the old model, so it leaves the PDF and the model file
    await api.fitModel({ ...req, level: 0.9 }, 'refit');
    expect(text(await api.modelReport(costs, 0.1, created, {}), 'summary-refit')).not.toContain('Bedside points');
    expect(JSON.parse(await api.modelFile(costs, 0.1, created, {})).points).toBeUndefined();
    expect(await api.currentPoints()).toBeNull();
    // a refusal the user fixes comes back beside the inputs, naming the value
    const bad = await api.pointsScore({ baseUnit: { kind: 'log-odds', value: 0 } });
    expect(bad).toMatchObject({ ok: false, problem: { code: 'bad-points-base-unit' } });
  }, 60_000);

  it('fits a score of hundreds of totals on the page, saying that only every k-th total is shown', async () => {
    const { record } = await runAnalysis(ssi.dataset, { spec: ssi.spec, profile: false, termTests: false });
    const p = pointsStep(record, ssi.dataset, { baseUnit: { kind: 'log-odds', value: 0.02 } });
    expect(p.score.table.length).toBeGreaterThan(300);
    const items = pointsCardItems(p, { fulcraVersion: 't', created, footer: true });
    const texts = items.flatMap((i) => (i.kind === 'text' ? [i.text] : []));
    expect(texts.join(' ')).toMatch(/Only every \d+(nd|rd|th) total \(and the last\) fits on the card/);
    expect(texts).toContain(riskText(p.score.table[p.score.table.length - 1].risk));
    for (const it of items) if (it.kind === 'text') expect(it.y).toBeLessThan(290);
  }, 60_000);

  it('keeps every item of the card on the A4 page above the foot line', async () => {
    const api = createApi();
    await api.loadDemo('ssi');
    await api.fitModel(req, 'fit');
    const answer = await api.pointsScore({});
    if (!answer.ok) throw new Error(answer.problem.message);
    const points = answer.points;
    for (const it of pointsCardItems(points, { fulcraVersion: 't', created, footer: false })) {
      const [x, y] = it.kind === 'line' ? [it.x1, it.y1] : [it.x, it.y];
      expect(x).toBeGreaterThanOrEqual(18);
      expect(x).toBeLessThanOrEqual(192);
      expect(y + (it.kind === 'rect' ? it.h : 0)).toBeLessThan(284);
    }
  }, 60_000);
});
