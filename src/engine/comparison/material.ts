import { FulcraError, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { linearPredictorFromRecipe } from '../design/design';
import type { ComparedModel } from './types';

/**
 * A model's per-row material from runAnalysis's result: its fit and apparent scores (`rowsUsed` are indices into
 * the data as given to runAnalysis, also when the request left rows out).
 */
export function comparedFromAnalysis(
  label: string,
  record: { fit: FitResult },
  scores: { eta: Float64Array; y: Float64Array; rowsUsed: Int32Array },
): ComparedModel {
  return { label, fit: record.fit, eta: scores.eta, y: scores.y, rowsUsed: scores.rowsUsed };
}

/**
 * A model's per-row material rebuilt from its fit on `data` (the dataset it was fitted on, without rows left
 * out): the linear predictor of every complete row from the recipe (linearPredictorFromRecipe), its outcome and
 * its dataset index.
 */
export function comparedFromFit(label: string, fit: FitResult, data: Dataset): ComparedModel {
  const d = linearPredictorFromRecipe(
    fit.recipe,
    fit.coefficients.map((c) => c.estimate),
    data,
  );
  if (!d.y)
    throw new FulcraError(
      'no-outcome',
      `${label}: the data have no outcome column "${fit.recipe.outcome}".`,
      'Compare the models on the data they were fitted on.',
    );
  return { label, fit, eta: d.eta, y: d.y, rowsUsed: d.rowsUsed };
}
