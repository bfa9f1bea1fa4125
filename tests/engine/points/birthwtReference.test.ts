import { describe, expect, it } from 'vitest';
import type { ModelSpec } from '../../../src/engine/core/model';
import { fit } from '../../../src/engine/fitting/fit';
import { pointsAnalysis, pointsOfRows, type PointsModel } from '../../../src/engine/points';
import { maxAbsErr, readCsvDataset, readJson } from '../fit/helpers';

// Reference: tests/fixtures/reference/points-birthwt.json from points-birthwt.R — the points method written
// independently in R 4.2.2 on MASS::birthwt (glm coefficients, ranges and reference values stated in the script,
// base = lowest-risk category, B = 5 years of age, halves away from zero), evaluated with pROC 1.18.0 (roc, ci.auc,
// roc.test(method = "delong", paired = TRUE)) and glm calibration fits. Fulcra gets R's coefficients, so the check is
// of the points method and its evaluation alone.
const ref = readJson('tests/fixtures/reference/points-birthwt.json');
const data = readCsvDataset('tests/fixtures/data/birthwt.csv', ['race']);
const spec: ModelSpec = {
  outcome: 'low',
  terms: ['age', 'lwt', 'race', 'smoke', 'ptl', 'ht', 'ui'].map((c) =>
    c === 'race' ? { type: 'main', column: c, reference: '1' } : { type: 'main', column: c },
  ),
};
const { recipe } = fit(data, spec, { profile: false, termTests: false });
const model: PointsModel = {
  recipe,
  coefficients: recipe.columnNames.map((name, j) => ({ name, estimate: ref.coefficients[j] as number })),
};
const binary = { cuts: [0.5], ref: [0, 1] };
const { score, evaluation: e } = pointsAnalysis(model, data, {
  baseUnit: { kind: 'per-increase', column: 'age', increase: 5 },
  cuts: {
    age: [20, 25, 30],
    lwt: [110, 130, 150],
    smoke: binary.cuts,
    ptl: [0.5, 1.5],
    ht: binary.cuts,
    ui: binary.cuts,
  },
  referenceValues: {
    age: [17, 22.5, 27.5, 35],
    lwt: [100, 120, 140, 180],
    smoke: binary.ref,
    ptl: [0, 1, 2],
    ht: binary.ref,
    ui: binary.ref,
  },
});

describe('points score of the MASS::birthwt model against R 4.2.2 / pROC 1.18.0 (points-birthwt.R)', () => {
  it('gives every predictor the points, base category and exact D/B of the R computation', () => {
    for (const t of score.terms) {
      const r = ref.terms[t.column];
      expect(t.categories.map((c) => c.points)).toEqual(r.points);
      expect(t.base).toBe(r.base);
      expect(
        maxAbsErr(
          t.categories.map((c) => c.exactPoints),
          r.exactPoints,
        ),
      ).toBeLessThan(1e-12);
    }
    // age's D/B are exactly 2.5 and 1.5 by hand ((35 − 22.5)/5, (35 − 27.5)/5): halves go up, to 3 and 2
    expect(score.terms[0].categories.map((c) => c.points)).toEqual([4, 3, 2, 0]);
  });

  it("gives each of the 189 mothers R's total points and risk", () => {
    const rows = pointsOfRows(score, data);
    expect(Array.from(rows.totals)).toEqual(ref.total);
    expect(maxAbsErr(rows.risks, ref.riskPoints)).toBeLessThan(1e-14);
  });

  it('has the same B, base linear predictor, attainable totals (1 and 5 are not) and table risks', () => {
    expect(score.baseUnit.logOdds).toBeCloseTo(ref.B, 14);
    expect(score.baseLinearPredictor).toBeCloseTo(ref.baseLinearPredictor, 12);
    expect(score.table.map((r) => r.total)).toEqual(ref.attainable);
    expect(
      maxAbsErr(
        score.table.map((r) => r.risk),
        ref.tableRisk,
      ),
    ).toBeLessThan(1e-14);
  });

  it("matches pROC's DeLong AUCs with CIs of the points total and of the model to 1e-12", () => {
    expect(e.points.auc.auc!).toBeCloseTo(ref.aucPoints, 12);
    expect(e.points.auc.lower!).toBeCloseTo(ref.aucPointsLower, 12);
    expect(e.points.auc.upper!).toBeCloseTo(ref.aucPointsUpper, 12);
    expect(e.model.auc.auc!).toBeCloseTo(ref.aucModel, 12);
    expect(e.model.auc.lower!).toBeCloseTo(ref.aucModelLower, 10);
  });

  it("matches pROC's paired roc.test (points first): z, p and the interval of the difference", () => {
    expect(e.aucDifference.z!).toBeCloseTo(ref.pairedZ, 8);
    expect(e.aucDifference.p!).toBeCloseTo(ref.pairedP, 8);
    expect(e.aucDifference.lower!).toBeCloseTo(ref.pairedLower, 8);
    expect(e.aucDifference.upper!).toBeCloseTo(ref.pairedUpper, 8);
  });

  it("matches glm's calibration intercept and slope of the points risk and both Brier scores", () => {
    expect(e.points.calibration.interceptInTheLarge!.estimate).toBeCloseTo(ref.calibrationIntercept, 8);
    expect(e.points.calibration.interceptInTheLarge!.se).toBeCloseTo(ref.calibrationInterceptSe, 8);
    expect(e.points.calibration.slope!.estimate).toBeCloseTo(ref.calibrationSlope, 8);
    expect(e.points.calibration.slope!.se).toBeCloseTo(ref.calibrationSlopeSe, 8);
    expect(e.points.brier.brier!).toBeCloseTo(ref.brierPoints, 14);
    expect(e.model.brier.brier!).toBeCloseTo(ref.brierModel, 12);
  });
});
