import { describe, expect, it } from 'vitest';
import type { Dataset } from '../../../src/engine/core/data';
import type { ModelSpec } from '../../../src/engine/core/model';
import { generateSsiRegistry, ssiSeededError } from '../../../src/engine/demo';
import { linearPredictorFromRecipe } from '../../../src/engine/design';
import { fit } from '../../../src/engine/fitting/fit';
import { casePoints, pointsAnalysis, pointsOfRows, readPointsScore } from '../../../src/engine/points';
import { readCsvDataset } from '../fit/helpers';

// Data: the invented SSI registry (src/engine/demo/ssiRegistry.ts, default seed) and MASS::birthwt
// (tests/fixtures/data/birthwt.csv, Hosmer & Lemeshow 1989). The score's AUC, calibration and Brier come from
// delongAuc / delongPairedTest / calibrationRegression / brierScore, which tests/engine/eval checks against pROC
// 1.18.0 and R 4.2.2; here the checks are of what the points method must do to them.
const demo = generateSsiRegistry();
const ssiFit = fit(demo.dataset, demo.spec, { profile: false, termTests: false });
const ssi = pointsAnalysis(ssiFit, demo.dataset);

describe('the points score of the invented SSI demo model (default options)', () => {
  it('discriminates a little less well than the full model: AUC lower by less than 0.02 (DeLong, paired)', () => {
    const e = ssi.evaluation;
    expect(e.points.auc.auc!).toBeLessThan(e.model.auc.auc!);
    expect(e.points.auc.auc!).toBeGreaterThan(e.model.auc.auc! - 0.02);
    expect(e.aucDifference.difference!).toBeCloseTo(e.points.auc.auc! - e.model.auc.auc!, 12);
    expect(e.aucDifference.lower!).toBeLessThan(0);
    expect(e.aucDifference.correlation!).toBeGreaterThan(0.95);
    expect(e.n).toBe(ssiFit.nUsed);
  });

  it('keeps the model calibrated on its own rows (slope within 0.9–1.1) at a Brier score barely above it', () => {
    const e = ssi.evaluation;
    expect(e.points.calibration.slope!.estimate).toBeGreaterThan(0.9);
    expect(e.points.calibration.slope!.estimate).toBeLessThan(1.1);
    expect(Math.abs(e.points.calibration.interceptInTheLarge!.estimate)).toBeLessThan(0.15);
    expect(e.model.calibration.slope!.estimate).toBeCloseTo(1, 6); // ML on its own rows: slope 1 exactly
    expect(e.points.brier.brier!).toBeGreaterThan(e.model.brier.brier!);
    expect(e.points.brier.brier! - e.model.brier.brier!).toBeLessThan(0.002);
  });

  it('makes tidy default ranges (ages cut at multiples of 5) and gives the widest term 10 points', () => {
    const age = ssi.score.terms.find((t) => t.column === 'age')!;
    expect(age.grouping).toBe('default-ranges');
    for (const c of age.categories.slice(1)) expect(c.lower! % 5).toBe(0);
    expect(ssi.score.baseUnit.rule).toBe('auto');
    const widest = ssi.score.terms.find((t) => t.term === ssi.score.baseUnit.widestTerm)!;
    expect(Math.max(...widest.categories.map((c) => c.points))).toBe(10);
    for (const t of ssi.score.terms) expect(Math.min(...t.categories.map((c) => c.points))).toBe(0);
  });

  it('takes mid-points for the ranges of user cut points given without reference values', () => {
    const s = pointsAnalysis(ssiFit, demo.dataset, { cuts: { age: [50, 60, 70] } }).score;
    const age = s.terms.find((t) => t.column === 'age')!;
    expect(age.grouping).toBe('user-ranges');
    const refs = age.categories.map((c) => c.reference!);
    expect(refs.slice(1, 3)).toEqual([55, 65]);
    expect(refs[0]).toBeLessThan(50);
    expect(refs[3]).toBeGreaterThanOrEqual(70);
    expect(refs[3]).toBeLessThan(95); // ages run 18–95: half-way from 70 to the 99th percentile, a multiple of 5
    expect(refs[3] % 5).toBe(0);
  });

  it('shows where rounding costs most: the seeded 2880-minute operation, which the card puts in "180 or more"', () => {
    expect(ssi.evaluation.riskDifference.largestRow).toBe(ssiSeededError.sheetRow);
    const dur = ssi.score.terms.find((t) => t.column === 'duration_min')!;
    expect(dur.categories[dur.categories.length - 1].reference!).toBeLessThan(600);
  });

  it('counts every row used once in the table of observed events by total', () => {
    const e = ssi.evaluation;
    expect(e.byTotal.reduce((a, r) => a + r.n, 0)).toBe(e.n);
    expect(e.byTotal.reduce((a, r) => a + r.events, 0)).toBe(e.events);
    expect(e.events).toBe(ssiFit.events);
  });

  it('scores a row of the dataset and the same case typed on the card alike', () => {
    const rows = pointsOfRows(ssi.score, demo.dataset);
    const i = 7;
    const r = rows.rowsUsed[i];
    const values: Record<string, string | number> = {};
    for (const c of demo.dataset.columns) values[c.name] = c.kind === 'numeric' ? c.values[r] : c.levels[c.codes[r]];
    const card = casePoints(ssi.score, values);
    expect(card.total).toBe(rows.totals[i]);
    expect(card.risk).toBe(rows.risks[i]);
  });

  it('is a structured-clone-safe record that survives JSON and is read back unchanged', () => {
    expect(structuredClone(ssi.score)).toEqual(ssi.score);
    const back = readPointsScore(JSON.parse(JSON.stringify(ssi.score)));
    expect(back).toEqual(ssi.score);
    expect(structuredClone(ssi.evaluation)).toEqual(ssi.evaluation);
  });
});

describe('a spline term becomes ranges at the fitted curve', () => {
  const spec: ModelSpec = {
    ...demo.spec,
    terms: demo.spec.terms.map((t) =>
      t.type === 'main' && t.column === 'age' ? { type: 'spline' as const, column: 'age', knots: 4 as const } : t,
    ),
  };
  const f = fit(demo.dataset, spec, { profile: false, termTests: false });
  const { score, evaluation } = pointsAnalysis(f, demo.dataset);
  const age = score.terms.find((t) => t.column === 'age')!;

  it("gives each range the spline's value at its reference value (checked through the design's own η)", () => {
    expect(age.kind).toBe('spline');
    // η of copies of one row that differ only in age, computed by the model's recipe: differences are the curve's
    const base = Array.from({ length: age.categories.length }, () => 0);
    const one: Dataset = {
      nRows: base.length,
      columns: demo.dataset.columns.map((c) =>
        c.name === 'age'
          ? { kind: 'numeric' as const, name: 'age', values: Float64Array.from(age.categories, (k) => k.reference!) }
          : c.kind === 'numeric'
            ? { ...c, values: Float64Array.from(base, () => c.values[0]) }
            : { ...c, codes: Int32Array.from(base, () => c.codes[0]) },
      ),
    };
    const eta = linearPredictorFromRecipe(
      f.recipe,
      f.coefficients.map((c) => c.estimate),
      one,
    ).eta;
    age.categories.forEach((c, j) => expect(c.difference).toBeCloseTo(eta[j] - eta[age.base], 10));
  });

  it('still scores close to the full model', () => {
    expect(evaluation.points.auc.auc!).toBeGreaterThan(evaluation.model.auc.auc! - 0.02);
  });
});

describe('the points score of the MASS::birthwt model (Hosmer & Lemeshow 1989)', () => {
  const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
  const spec: ModelSpec = {
    outcome: 'low',
    terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
      c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
    ),
  };
  const f = fit(data, spec, { profile: false, termTests: false });
  const { score, evaluation } = pointsAnalysis(f, data);

  it('gives 0/1 and count predictors one category per value, and a falling risk the base at the top range', () => {
    expect(score.terms.find((t) => t.column === 'ptl')!.categories.map((c) => c.label)).toEqual(['0', '1', '2', '3']);
    const lwt = score.terms.find((t) => t.column === 'lwt')!; // β < 0: heavier mothers lowest risk
    expect(lwt.base).toBe(lwt.categories.length - 1);
  });

  it('has an AUC a little below the full model (0 < loss < 0.02)', () => {
    const loss = evaluation.model.auc.auc! - evaluation.points.auc.auc!;
    expect(loss).toBeGreaterThan(0);
    expect(loss).toBeLessThan(0.02);
    expect(evaluation.n).toBe(189);
  });
});
