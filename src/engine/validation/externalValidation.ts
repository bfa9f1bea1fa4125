import { plural } from '../core/wording';
import { FulcraError, type Dataset } from '../core/data';
import { sigmoid } from '../numerics/loss';
import { droppedRowsWarning, linearPredictorFromRecipe } from '../design/design';
import { evaluate, type EvaluateOptions, type EvaluationRecord } from '../evaluation/evaluate';
import {
  recalibrate,
  recalibratedModel,
  type RecalibratedModel,
  type RecalibrationResult,
  type ScoringModel,
} from './recalibration';
import { type EngineWarning } from '../core/warnings';

export interface ExternalValidation {
  nRows: number;
  nUsed: number;
  nDropped: number;
  droppedByColumn: Record<string, number>;
  /** Indices of the rows of the new data that were scored (complete cases). */
  rowsUsed: Int32Array;
  y: Float64Array;
  /** Linear predictor and risk of the model as it stands, per used row. */
  eta: Float64Array;
  risk: Float64Array;
  evaluation: EvaluationRecord;
  recalibration: RecalibrationResult;
  /** The model with an updated intercept, and with updated intercept and slope (null when not estimable). */
  recalibrated: { interceptOnly: RecalibratedModel | null; interceptSlope: RecalibratedModel | null };
  warnings: EngineWarning[];
}

/** Linear predictor of a scoring model on an encoded design (intercept first). */
export function scoreDesign(model: ScoringModel, X: Float64Array, n: number): Float64Array {
  const eta = new Float64Array(n);
  model.coefficients.forEach((c, j) => {
    if (c.estimate === 0) return;
    for (let i = 0; i < n; i++) eta[i] += c.estimate * X[j * n + i];
  });
  return eta;
}

/**
 * External validation: applies a fitted model (its recipe and coefficients, unchanged) to a second dataset
 * with the same columns, evaluates the predicted risks with every measure of evaluate.ts (the model's linear
 * predictor feeds the calibration fits), and fits intercept-only and intercept-and-slope logistic
 * recalibration (recalibration.ts), returning both updated models. Rows with a missing value in a used
 * column are dropped and counted; a categorical level the model never saw throws, naming row and column.
 */
export function externalValidation(
  model: ScoringModel,
  data: Dataset,
  options: Omit<EvaluateOptions, 'eta' | 'weights'> = {},
): ExternalValidation {
  const { recipe } = model;
  if (
    model.coefficients.length !== recipe.columnNames.length ||
    model.coefficients.some((c, j) => c.name !== recipe.columnNames[j])
  ) {
    throw new FulcraError('model-mismatch', 'The coefficients do not line up with the model recipe’s design columns.');
  }
  const enc = linearPredictorFromRecipe(
    recipe,
    model.coefficients.map((c) => c.estimate),
    data,
  );
  if (!enc.y) {
    throw new FulcraError(
      'no-outcome',
      `The new data have no column "${recipe.outcome}", so the model cannot be validated on them.`,
      'Add the outcome column, or score the data without validating.',
    );
  }
  if (enc.n === 0)
    throw new FulcraError('no-complete-rows', 'No row of the new data has a value in every column the model uses.');
  const eta = enc.eta;
  const risk = eta.map((e) => sigmoid(e));
  const evaluation = evaluate(enc.y, risk, { ...options, eta });
  const recalibration = recalibrate(enc.y, eta, { level: options.level });
  const warnings: EngineWarning[] = [...evaluation.warnings, ...recalibration.warnings];
  if (enc.nDropped > 0) {
    const verb = enc.nDropped === 1 ? 'was' : 'were';
    const lead = `${enc.nDropped} of ${plural(data.nRows, 'row')} of the new data ${verb} left out for missing values`;
    const hint = 'If the missing values are not random, the validation may not represent all cases.';
    warnings.push(droppedRowsWarning('rows-dropped', lead, hint, enc.droppedByColumn, false));
  }
  return {
    nRows: data.nRows,
    nUsed: enc.n,
    nDropped: enc.nDropped,
    droppedByColumn: enc.droppedByColumn,
    rowsUsed: enc.rowsUsed,
    y: enc.y,
    eta,
    risk,
    evaluation,
    recalibration,
    recalibrated: {
      interceptOnly: recalibration.interceptOnly ? recalibratedModel(model, recalibration.interceptOnly) : null,
      interceptSlope: recalibration.interceptSlope ? recalibratedModel(model, recalibration.interceptSlope) : null,
    },
    warnings,
  };
}
