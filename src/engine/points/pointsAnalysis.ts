import type { Dataset } from '../core/data';
import { buildPointsScore } from './buildScore';
import { evaluatePointsScore } from './evaluatePoints';
import type { PointsEvaluation, PointsModel, PointsOptions, PointsScore } from './types';

/**
 * The points score of a fitted model and its evaluation against the model on the same rows, in one call (what
 * `npm run fit --points` and the page need): buildPointsScore, then evaluatePointsScore.
 */
export function pointsAnalysis(
  model: PointsModel,
  data: Dataset,
  options: Partial<PointsOptions> = {},
  evaluation: { level?: number; rows?: Int32Array } = {},
): { score: PointsScore; evaluation: PointsEvaluation } {
  const score = buildPointsScore(model, data, options, evaluation.rows);
  return { score, evaluation: evaluatePointsScore(score, model, data, evaluation) };
}
