import { FulcraError } from '../../engine/core';
import type { DesignRecipe } from '../../engine/core';
import { readPointsScore, type PointsScore } from '../../engine/points';

/**
 * The `points` field of a model file: a valid points score (readPointsScore names a damaged field) made from this
 * model: the same outcome and event, and one entry per main-effect term of the recipe, in its order, reading the
 * same column. Throws FulcraError('model-file-invalid') naming the field otherwise.
 */
export function readModelPoints(value: unknown, recipe: DesignRecipe): PointsScore {
  let score: PointsScore;
  try {
    score = readPointsScore(value, 'points');
  } catch (e) {
    const err = e as FulcraError;
    throw new FulcraError('model-file-invalid', `Model file: ${err.message}`, err.suggestion);
  }
  const bad = (field: string, what: string) =>
    new FulcraError(
      'model-file-invalid',
      `Model file: "${field}" ${what}.`,
      'Save the model again from Fulcra, or remove the "points" field to use the model without its card.',
    );
  if (score.outcome !== recipe.outcome || score.event !== recipe.event)
    throw bad(
      'points.outcome',
      `is "${score.outcome}" = ${score.event}, but the model predicts "${recipe.outcome}" = ${recipe.event}`,
    );
  type Main = Exclude<DesignRecipe['terms'][number], { type: 'interaction' }>;
  const terms = recipe.terms.filter((t): t is Main => t.type !== 'interaction');
  if (score.terms.length !== terms.length)
    throw bad('points.terms', `has ${score.terms.length} entries but the model has ${terms.length} terms`);
  score.terms.forEach((t, i) => {
    const r = terms[i];
    if (t.term !== r.name || t.column !== r.column)
      throw bad(`points.terms[${i}]`, `is "${t.term}" but the model's term ${i + 1} is "${r.name}"`);
  });
  return score;
}
