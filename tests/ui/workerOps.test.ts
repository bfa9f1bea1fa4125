import { describe, expect, it } from 'vitest';
import { generateDemo } from '../../src/engine/demo';
import { sheetRow } from '../../src/engine/core';
import { fit } from '../../src/engine/fitting/fit';
import { costView, thresholdAt } from '../../src/worker/cutoffOps';
import { loadDemo, loadImported } from '../../src/worker/dataOps';
import { readBytes, readPasted } from '../../src/worker/ioOps';
import { fitModel } from '../../src/worker/modelOps';
import { rowsWindow } from '../../src/worker/profile';
import type { FitRequest } from '../../src/worker/protocol';
import { scoreImported, scoreOne } from '../../src/worker/scoreOps';
import { createSession } from '../../src/worker/session';
import { riskCurve } from '../../src/worker/shapeOps';
import { lossSurface, validate } from '../../src/worker/validateOps';
import { fitWithImputation } from '../../src/worker/imputeOps';
import { modelFileText, modelReport, pmmlText } from '../../src/worker/reportOps';
import { readModelFile } from '../../src/io/export/readModelFile';

const demo = generateDemo('ssi');
const request = (method: FitRequest['method']): FitRequest => ({
  spec: demo.spec,
  method,
  level: 0.95,
  alpha: 0.5,
  profile: false,
});

async function fitted(method: FitRequest['method'] = 'ml') {
  const s = createSession();
  loadDemo(s, 'ssi');
  const view = await fitModel(s, request(method), {});
  return { s, view };
}

describe('worker operations (run in Node, as in the worker)', () => {
  it('fits exactly what the engine fits and attaches the invented truth to each coefficient', async () => {
    const { view } = await fitted();
    const ref = fit(demo.dataset, demo.spec, { level: 0.95, profile: false });
    expect(view.rows.map((r) => r.estimate)).toEqual(ref.coefficients.map((c) => c.estimate));
    expect(view.rows.find((r) => r.name === 'asa_class=IV')?.truth).toBe(1.1);
    expect(view.rows.find((r) => r.name === 'age')?.truth).toBe(0.02);
    expect(view.performance?.auc).toBeGreaterThan(0.6);
  });

  it('answers the cut-off query with the same counts as a brute-force count of risk ≥ t', async () => {
    const { s } = await fitted();
    for (const t of [0.02, 0.1, 0.137, 0.5]) {
      const v = thresholdAt(s, t, { missedCase: 10, falseAlarm: 1 });
      let tp = 0,
        fp = 0;
      for (let i = 0; i < s.y!.length; i++)
        if (s.risk![i] >= t) {
          if (s.y![i] === 1) tp++;
          else fp++;
        }
      expect([v.metrics.tp, v.metrics.fp]).toEqual([tp, fp]);
      const n = s.y!.length;
      expect(v.netBenefit).toBeCloseTo(tp / n - (fp / n) * (t / (1 - t)), 12);
    }
  });

  it('marks an empirical cut-off no costlier than any point of the expected-cost curve', async () => {
    const { s } = await fitted();
    const cv = costView(s, { missedCase: 10, falseAlarm: 1 });
    expect(cv.optimal.decisionTheory.threshold).toBeCloseTo(1 / 11, 12);
    for (const p of cv.curve) expect(cv.optimal.empirical.expectedCostPer100).toBeLessThanOrEqual(p.y + 1e-9);
  });

  it('draws the risk curve through the one-case score at the typical values', async () => {
    const { s, view } = await fitted();
    const curve = riskCurve(s, 'wound_class', view.typical);
    const at = curve.points.find((p) => p.label === 'dirty')!;
    const one = scoreOne(s, { ...view.typical, wound_class: 'dirty' }, 0.5);
    expect(at.risk).toBeCloseTo(one.risk, 12);
    expect(at.lower).toBeLessThan(at.risk);
    expect(at.upper).toBeGreaterThan(at.risk);
  });

  it('puts the lowest mean cross-entropy of the loss grid at the maximum-likelihood estimate', async () => {
    const { s } = await fitted();
    const surf = lossSurface(s, 1, 2);
    const G = surf.xs.length;
    const min = surf.values.indexOf(Math.min(...surf.values));
    const nearest = (axis: number[], v: number) =>
      axis.reduce((best, x, k) => (Math.abs(x - v) < Math.abs(axis[best] - v) ? k : best), 0);
    expect([min % G, Math.floor(min / G)]).toEqual([
      nearest(surf.xs, surf.optimum[0]),
      nearest(surf.ys, surf.optimum[1]),
    ]);
    const last = surf.path.at(-1)!;
    expect(last[0]).toBeCloseTo(surf.optimum[0], 6);
    expect(last[1]).toBeCloseTo(surf.optimum[1], 6);
  });

  it('refuses to score a level the model never saw, naming it', async () => {
    const { s, view } = await fitted();
    expect(() => scoreOne(s, { ...view.typical, wound_class: 'filthy' }, 0.5)).toThrow(/filthy/);
  });

  it('fits a lasso with λ chosen by cross-validation and no inference table', async () => {
    const { view } = await fitted('lasso');
    expect(view.lambda?.chosen).toBeGreaterThan(0);
    expect(view.lambda!.chosen).toBeGreaterThanOrEqual(view.lambda!.lambdaMin!);
    expect(view.rows.every((r) => r.se === null)).toBe(true);
    expect(view.warnings.some((w) => w.code === 'penalised-no-inference')).toBe(true);
  });

  it('runs bootstrap validation and stops with code "cancelled" when the signal is raised', async () => {
    const { s } = await fitted();
    const v = await validate(s, 5, {});
    expect(v.metrics.map((m) => m.name)).toEqual(['auc', 'slope', 'intercept', 'brier']);
    const signal = { aborted: false };
    let seen = 0;
    const run = validate(s, 200, {
      signal,
      onProgress: (d) => {
        seen = d;
        if (d === 2) signal.aborted = true;
      },
    });
    await expect(run).rejects.toMatchObject({ code: 'cancelled' });
    expect(seen).toBeLessThanOrEqual(3);
  });

  it('returns grid rows as cell text with missing cells empty, numbered as spreadsheet rows', () => {
    const s = createSession();
    loadDemo(s, 'ssi');
    const rows = rowsWindow(s.data!, 0, 5000);
    expect(rows.cells).toHaveLength(2000);
    expect(rows.cells.some((r) => r[1] === '')).toBe(true);
    expect(rows.rowNumbers.slice(0, 2)).toEqual([2, 3]);
    expect(rowsWindow(s.data!, 1999, 10)).toEqual({ cells: [rows.cells[1999]], rowNumbers: [2001] });
  });

  it('numbers grid rows after a skipped blank row as the file does', async () => {
    const s = createSession();
    const text = 'age,infected\n50,no\n\n61,yes\n70,yes\n';
    loadImported(s, await readBytes(new TextEncoder().encode(text).buffer, 'gap.csv', {}, {}), 'file', 'gap.csv');
    expect(rowsWindow(s.data!, 0, 10)).toEqual({
      cells: [
        ['50', 'no'],
        ['61', 'yes'],
        ['70', 'yes'],
      ],
      rowNumbers: [2, 4, 5],
    });
    expect(sheetRow(s.data!, 1)).toBe(4);
  });

  it('imports pasted cells and scores them, skipping a row with a missing predictor', async () => {
    const { s } = await fitted();
    const text =
      'age\tbmi\tdiabetes\tasa_class\twound_class\tduration_min\tprophylaxis\tsmoker\n' +
      '70\t31\tyes\tIII\tdirty\t200\tnone\tyes\n55\t\tno\tI\tclean\t90\ton time\tno\n';
    const imported = await readPasted(text, {}, {});
    const batch = scoreImported(s, imported, 0.2);
    expect(batch).toMatchObject({ n: 2, scored: 1, skipped: 1 });
    expect(batch.preview[0].row).toBe(2);
    const one = scoreOne(
      s,
      {
        age: 70,
        bmi: 31,
        diabetes: 'yes',
        asa_class: 'III',
        wound_class: 'dirty',
        duration_min: 200,
        prophylaxis: 'none',
        smoker: 'yes',
      },
      0.2,
    );
    expect(batch.preview[0].risk).toBeCloseTo(one.risk, 12);
    const summary = loadImported(createSession(), imported, 'paste', 'pasted');
    expect(summary.columns.map((c) => c.name)).toContain('wound_class');
  });

  it('builds the model-summary PDF from the worker’s records, with the bootstrap when it has run', async () => {
    const { s } = await fitted();
    await validate(s, 5, {});
    const pdf = modelReport(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z', { purpose: 'Audit' });
    expect(new TextDecoder().decode(pdf.subarray(0, 5))).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(10_000);
  });

  it('saves a model file that reads back with the same coefficients, and a PMML document', async () => {
    const { s, view } = await fitted();
    const back = readModelFile(modelFileText(s, { missedCase: 10, falseAlarm: 1 }, 0.1, '2026-01-01T00:00:00Z'));
    expect(back.coefficients.map((c) => c.estimate)).toEqual(view.rows.map((r) => r.estimate));
    expect(back.threshold).toEqual({ value: 0.1, costMissedCase: 10, costFalseAlarm: 1 });
    expect(pmmlText(s, '2026-01-01T00:00:00Z')).toContain('<PMML');
  });

  it('pools the model over 10 imputations and fills exactly the cells that were missing', async () => {
    const { s, view } = await fitted();
    const imp = await fitWithImputation(s, view.request, {});
    expect(imp.m).toBe(10);
    expect(imp.rows.map((r) => r.name)).toEqual(view.rows.map((r) => r.name));
    const cells = Object.fromEntries(imp.imputedColumns.map((c) => [c.column, c.cells]));
    expect(cells).toEqual({ bmi: 37, duration_min: 19, smoker: 21 });
    for (const r of imp.rows.slice(1)) expect(r.fmi).toBeGreaterThanOrEqual(0);
  });
});

describe('memory guard in the worker', () => {
  it('refuses a model whose design would not fit in the memory of a tab, saying so in plain words', async () => {
    const { checkFitBudget } = await import('../../src/worker/budget');
    const wide = {
      nRows: 3_000_000,
      columns: [
        { kind: 'numeric' as const, name: 'y', values: new Float64Array(1) },
        ...Array.from({ length: 40 }, (_, j) => ({
          kind: 'numeric' as const,
          name: `x${j}`,
          values: new Float64Array(1),
        })),
      ],
    };
    const spec = { outcome: 'y', terms: wide.columns.slice(1).map((c) => ({ type: 'main' as const, column: c.name })) };
    expect(() => checkFitBudget(wide, spec)).toThrow(expect.objectContaining({ code: 'too-big' }));
    const demo = generateDemo('ssi');
    expect(() => checkFitBudget(demo.dataset, demo.spec)).not.toThrow();
  });
});
