import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { compareAnalyses, runAnalysis } from '../../src/engine/workflow';
import { createApi } from '../../src/worker/api';
import type { FitRequest } from '../../src/worker/protocol';

const dir = mkdtempSync(join(tmpdir(), 'fulcra-compare-report-'));
/** The PDF's text by pdftotext (poppler-utils), whitespace collapsed. */
const text = (bytes: Uint8Array) => {
  const path = join(dir, 'summary.pdf');
  writeFileSync(path, bytes);
  return execFileSync('pdftotext', ['-enc', 'UTF-8', path, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
};

describe('kept models through the worker api: keep, show again without refit, compare, PDF section', () => {
  const ssi = generateDemo('ssi');
  const full: FitRequest = { spec: ssi.spec, profile: false, termTests: false };
  const terms = ssi.spec.terms.filter((t) => t.type === 'interaction' || t.column !== 'diabetes');
  const reduced: FitRequest = { ...full, spec: { ...ssi.spec, terms } };
  const costs = { missedCase: 5, falseAlarm: 1 };
  const created = '2026-12-04T18:00:00Z';

  it('compares two kept models as compareAnalyses does in Node; the PDF section only after a comparison', async () => {
    const api = createApi();
    await api.loadDemo('ssi');
    const a = await api.fitModel(full, 'fit-a');
    const b = await api.fitModel(reduced, 'fit-b');
    expect(a.modelKey).toBeDefined();
    expect(b.modelKey).not.toBe(a.modelKey);
    expect(text(await api.modelReport(costs, 0.1, created, {}))).not.toContain('Comparison of two models');

    const got = await api.compareModels(
      { key: a.modelKey!, label: 'Full' },
      { key: b.modelKey!, label: 'Small' },
      0.1,
      costs,
    );
    // Source: the same glue in Node on runAnalysis's own scores (checked against R anova and pROC in
    // tests/workflow/compareStep.test.ts).
    const ra = await runAnalysis(ssi.dataset, full);
    const rb = await runAnalysis(ssi.dataset, reduced);
    const want = compareAnalyses(
      ssi.dataset,
      { label: 'Full', ...ra },
      { label: 'Small', ...rb },
      { threshold: 0.1, costs },
    );
    expect(got).toEqual(want);
    expect(got.status === 'compared' && got.comparison.nesting.lrTest?.df).toBe(1);

    // The shown model is the second; showing the first again restores its record without a refit.
    expect((await api.analysisRecord()).fit.recipe.terms).toHaveLength(terms.length);
    expect(await api.showKeptModel(a.modelKey!)).toBe(true);
    const shown = await api.analysisRecord();
    expect(shown.fit.deviance).toBe(a.fit.deviance);
    expect(shown.fit.recipe.terms).toHaveLength(ssi.spec.terms.length);
    expect(await api.showKeptModel(987654321)).toBe(false);

    const pdf = text(await api.modelReport(costs, 0.1, created, {}));
    expect(pdf).toContain('Comparison of two models');
    expect(pdf).toContain('Likelihood-ratio test of Small within Full (adds diabetes)');
    expect(pdf).toContain('Who changes side of the cut-off 10.0%');

    // Forgotten models cannot be compared; the message says what to do.
    await api.forgetModels([b.modelKey!]);
    await expect(
      api.compareModels({ key: a.modelKey!, label: 'Full' }, { key: b.modelKey!, label: 'Small' }, 0.1, costs),
    ).rejects.toMatchObject({ code: 'model-not-held' });
  }, 60_000);
});
