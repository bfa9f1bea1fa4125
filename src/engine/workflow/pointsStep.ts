import { FulcraError, getColumn, sheetRow, type Column, type Dataset } from '../core/data';
import type { DesignRecipe, FitResult } from '../core/model';
import { linearPredictorFromRecipe, droppedRowsWarning } from '../design/design';
import {
  buildPointsScore,
  evaluatePointsScore,
  type PointsEvaluation,
  type PointsModel,
  type PointsOptions,
  type PointsScore,
} from '../points';
import { analysedRows } from './analyse';
import type { AnalysisRequest } from './request';

/** Most cases a weighted fit's rows may stand for when they are written out one row per case for the evaluation. */
export const MAX_POINTS_CASES = 5_000_000;

/**
 * The bedside points score of an analysis, as the page, the PDF, the model file and `npm run fit --points` show
 * it: the score (Sullivan, Massaro & D'Agostino 2004) and its apparent performance beside the full model's.
 */
export interface PointsRecord {
  score: PointsScore;
  evaluation: PointsEvaluation;
  /** The options as the user gave them (defaults are the engine's `defaultPointsOptions`). */
  options: Partial<PointsOptions>;
  /**
   * Rows the fit used and the cases they stand for; with frequency weights (grouped data) the evaluation ran on
   * the cases written out one row per case, so `evaluation.n` counts cases.
   */
  rows: number;
  cases: number;
  weighted: boolean;
}

/**
 * The points score of `record`'s fitted model on the rows it was fitted on (left-out rows removed, a grouped table
 * as weighted case rows, as `runAnalysis` does), evaluated against the model at the request's confidence level.
 * With frequency weights (whole numbers, as the fit requires) the score's default ranges are cut at quantiles of
 * the cases, and the evaluation (DeLong AUCs, calibration, Brier) runs on the rows written out one per case, so
 * it equals the evaluation of the same data given one row per case. Throws FulcraError for what the points
 * method does not cover (interactions, a column in two terms) and for a bad option, naming it.
 */
export function pointsStep(
  record: { fit: FitResult; request: AnalysisRequest },
  data: Dataset,
  options: Partial<PointsOptions> = {},
): PointsRecord {
  const fitted = analysedRows(data, record.request).data;
  const model: PointsModel = { recipe: record.fit.recipe, coefficients: record.fit.coefficients };
  const score = buildPointsScore(model, fitted, options);
  const level = record.request.level;
  if (!record.fit.recipe.weights) {
    const evaluation = evaluatePointsScore(score, model, fitted, { level });
    return { score, evaluation, options, rows: evaluation.n, cases: evaluation.n, weighted: false };
  }
  const { expanded, rows, dropped } = writtenOut(model, fitted);
  const { weights: _w, ...recipe } = model.recipe;
  const evaluation = evaluatePointsScore(score, { ...model, recipe }, expanded, { level });
  if (dropped.nDropped > 0) {
    evaluation.nDropped = dropped.nDropped;
    evaluation.droppedByColumn = dropped.droppedByColumn;
    evaluation.warnings = [
      droppedRowsWarning(
        'rows-dropped',
        `${dropped.nDropped} row(s) were left out of the points score's evaluation because of missing values`,
        'The evaluation uses the same complete rows as the model.',
        dropped.droppedByColumn,
        true,
      ),
      ...evaluation.warnings,
    ];
  }
  return { score, evaluation, options, rows, cases: evaluation.n, weighted: true };
}

/**
 * The complete rows of a weighted fit written out one row per case (a row of weight w repeated w times), holding
 * the outcome and the columns the model reads; each written-out row keeps its spreadsheet row number.
 */
function writtenOut(
  model: PointsModel,
  data: Dataset,
): { expanded: Dataset; rows: number; dropped: { nDropped: number; droppedByColumn: Record<string, number> } } {
  const recipe: DesignRecipe = model.recipe;
  const lp = linearPredictorFromRecipe(
    recipe,
    model.coefficients.map((c) => c.estimate),
    data,
  );
  const w = lp.weights;
  if (!w) throw new FulcraError('points-no-weights', `The weights column "${recipe.weights}" is missing.`);
  let total = 0;
  for (let i = 0; i < w.length; i++) total += w[i];
  if (total > MAX_POINTS_CASES)
    throw new FulcraError(
      'points-too-many-cases',
      `The rows stand for ${total} cases; the points score's evaluation writes them out one row per case and ` +
        `stops at ${MAX_POINTS_CASES}.`,
      'Evaluate the points score on a sample of the cases.',
    );
  const source = new Int32Array(total);
  for (let i = 0, k = 0; i < w.length; i++) for (let j = 0; j < w[i]; j++) source[k++] = lp.rowsUsed[i];
  const names = new Set([recipe.outcome, ...recipe.terms.flatMap((t) => (t.type === 'interaction' ? [] : [t.column]))]);
  const columns: Column[] = [...names].map((name) => {
    const c = getColumn(data, name);
    return c.kind === 'numeric'
      ? { kind: 'numeric', name, values: Float64Array.from(source, (i) => c.values[i]) }
      : { kind: 'categorical', name, codes: Int32Array.from(source, (i) => c.codes[i]), levels: [...c.levels] };
  });
  return {
    expanded: { nRows: total, columns, rowNumbers: Int32Array.from(source, (i) => sheetRow(data, i)) },
    rows: lp.rowsUsed.length,
    dropped: { nDropped: lp.nDropped, droppedByColumn: lp.droppedByColumn },
  };
}
