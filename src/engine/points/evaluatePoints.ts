import { FulcraError, sheetRow, type Dataset } from '../core/data';
import { checkLevel } from '../core/vectors';
import { droppedRowsWarning, linearPredictorFromRecipe } from '../design/design';
import { brierScore } from '../evaluation/brier';
import { calibrationRegression } from '../evaluation/calibration';
import { delongAuc, delongPairedTest } from '../evaluation/delong';
import { sigmoid } from '../numerics/loss';
import { pointsOfRows } from './casePoints';
import type { PointsEvaluation, PointsModel, PointsScore } from './types';

/**
 * The points score against the full model on the rows the model's recipe uses in `data` (complete cases with an
 * outcome; `rows` restricts them): DeLong AUC with CI of the total points and of the model's linear predictor,
 * the paired DeLong test of the two (delongPairedTest, as pROC's roc.test(method = "delong", paired = TRUE); points
 * first), calibration-in-the-large and slope of the points-table risk and of the model (calibrationRegression),
 * Brier scores of both, the mean and largest |points risk − model risk|, and observed events per total. This is
 * apparent performance, on the rows the score was made from. Weighted (grouped) fits are refused: the DeLong
 * AUC counts one case per row.
 */
export function evaluatePointsScore(
  score: PointsScore,
  model: PointsModel,
  data: Dataset,
  options: { level?: number; rows?: Int32Array } = {},
): PointsEvaluation {
  const level = checkLevel(options.level);
  const beta = model.coefficients.map((c) => c.estimate);
  const lp = linearPredictorFromRecipe(model.recipe, beta, data, options.rows ? { rows: options.rows } : {});
  if (!lp.y)
    throw new FulcraError(
      'points-no-outcome',
      `The data have no outcome column "${model.recipe.outcome}", so the points score cannot be evaluated.`,
      'Evaluate on data that hold the outcome.',
    );
  if ('weights' in lp && lp.weights)
    throw new FulcraError(
      'points-weighted-evaluation',
      'The model was fitted on weighted rows (each row standing for several cases); the DeLong AUC of the points ' +
        'score counts one case per row, so it is not computed here.',
      'Evaluate the points score on data with one row per case.',
    );
  const y = lp.y;
  const pts = pointsOfRows(score, data, { rows: lp.rowsUsed });
  if (pts.rowsUsed.length !== lp.rowsUsed.length)
    throw new FulcraError(
      'recipe-mismatch',
      'The points score reads other columns than the model, so they cannot be compared on the same rows.',
      'Build the points score from this model.',
    );
  const n = y.length;
  const modelRisk = Float64Array.from(lp.eta, sigmoid);
  let events = 0,
    sumAbs = 0,
    largest = 0,
    largestAt = 0;
  for (let i = 0; i < n; i++) {
    events += y[i];
    const d = Math.abs(pts.risks[i] - modelRisk[i]);
    sumAbs += d;
    if (d > largest) {
      largest = d;
      largestAt = i;
    }
  }
  const counts = new Map(score.table.map((r) => [r.total, { n: 0, events: 0 }]));
  for (let i = 0; i < n; i++) {
    const c = counts.get(pts.totals[i])!;
    c.n++;
    c.events += y[i];
  }
  const byTotal = score.table.map((r) => {
    const c = counts.get(r.total)!;
    return { total: r.total, n: c.n, events: c.events, observedRate: c.n > 0 ? c.events / c.n : null, risk: r.risk };
  });
  const warnings =
    lp.nDropped > 0
      ? [
          droppedRowsWarning(
            'rows-dropped',
            `${lp.nDropped} row(s) were left out of the points score's evaluation because of missing values`,
            'The evaluation uses the same complete cases as the model.',
            lp.droppedByColumn,
            true,
          ),
        ]
      : [];
  return {
    n,
    events,
    points: {
      auc: delongAuc(y, pts.totals, { level }),
      brier: brierScore(y, pts.risks),
      calibration: calibrationRegression(y, pts.linearPredictor, { level }),
    },
    model: {
      auc: delongAuc(y, lp.eta, { level }),
      brier: brierScore(y, modelRisk),
      calibration: calibrationRegression(y, lp.eta, { level }),
    },
    aucDifference: delongPairedTest(y, pts.totals, lp.eta, { level }),
    riskDifference: {
      meanAbsolute: n > 0 ? sumAbs / n : 0,
      largest,
      largestRow: n > 0 ? sheetRow(data, lp.rowsUsed[largestAt]) : 0,
    },
    byTotal,
    nDropped: lp.nDropped,
    droppedByColumn: lp.droppedByColumn,
    level,
    warnings,
  };
}
