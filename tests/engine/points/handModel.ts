import type { Dataset } from '../../../src/engine/core/data';
import type { DesignRecipe } from '../../../src/engine/core/model';
import type { PointsModel, PointsOptions } from '../../../src/engine/points';

/**
 * A small invented coronary-risk model with the predictors of Sullivan, Massaro & D'Agostino's (2004, Stat Med
 * 23:1631) Framingham example (age, total cholesterol, HDL cholesterol, systolic blood pressure, smoking,
 * diabetes). The coefficients, ranges and reference values are NOT the paper's: they were chosen for this test
 * so that every step can be done by hand (see workedExample.test.ts).
 *   logit p = −8 + 0.05·age + 0.005·chol − 0.03·hdl + 0.01·sbp + 0.6·[smoker = yes] + 0.5·[diabetes = yes]
 */
export const handRecipe: DesignRecipe = {
  outcome: 'chd',
  event: 'yes',
  terms: [
    { type: 'numeric', name: 'age', column: 'age' },
    { type: 'numeric', name: 'chol', column: 'chol' },
    { type: 'numeric', name: 'hdl', column: 'hdl' },
    { type: 'numeric', name: 'sbp', column: 'sbp' },
    { type: 'categorical', name: 'smoker', column: 'smoker', levels: ['no', 'yes'], reference: 'no' },
    { type: 'categorical', name: 'diabetes', column: 'diabetes', levels: ['no', 'yes'], reference: 'no' },
  ],
  columnNames: ['(Intercept)', 'age', 'chol', 'hdl', 'sbp', 'smoker=yes', 'diabetes=yes'],
};

export const handModel: PointsModel = {
  recipe: handRecipe,
  coefficients: [
    { name: '(Intercept)', estimate: -8 },
    { name: 'age', estimate: 0.05 },
    { name: 'chol', estimate: 0.005 },
    { name: 'hdl', estimate: -0.03 },
    { name: 'sbp', estimate: 0.01 },
    { name: 'smoker=yes', estimate: 0.6 },
    { name: 'diabetes=yes', estimate: 0.5 },
  ],
};

/** The ranges and reference values of the worked example, and B = the effect of 5 years of age. */
export const handOptions: Partial<PointsOptions> = {
  baseUnit: { kind: 'per-increase', column: 'age', increase: 5 },
  cuts: { age: [40, 50, 60], chol: [200, 240], hdl: [40, 60], sbp: [120, 140, 160] },
  referenceValues: { age: [35, 45, 55, 65], chol: [180, 220, 260], hdl: [35, 50, 70], sbp: [110, 130, 150, 170] },
};

/** Three invented people (spreadsheet rows 2–4); the third has no blood pressure recorded. */
export const handData: Dataset = {
  nRows: 3,
  columns: [
    { kind: 'numeric', name: 'age', values: Float64Array.from([52, 38, 71]) },
    { kind: 'numeric', name: 'chol', values: Float64Array.from([230, 190, 250]) },
    { kind: 'numeric', name: 'hdl', values: Float64Array.from([45, 65, 30]) },
    { kind: 'numeric', name: 'sbp', values: Float64Array.from([145, 118, NaN]) },
    { kind: 'categorical', name: 'smoker', levels: ['no', 'yes'], codes: Int32Array.from([1, 0, 1]) },
    { kind: 'categorical', name: 'diabetes', levels: ['no', 'yes'], codes: Int32Array.from([0, 0, 1]) },
  ],
};
