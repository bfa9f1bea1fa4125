import { warning, type Dataset, type EngineWarning, type FitResult } from '../core';
import { linearPredictorFromRecipe } from '../design/design';

/** Warning codes of an external file that holds all, or some, of the development cases. */
export const SAME_CASES_CODE = 'external-same-cases';
export const SHARED_CASES_CODE = 'external-shared-cases';

/**
 * How many of the cases the model scores in `other` are also cases of `dev`: a case is its outcome and its linear
 * predictor (the design row as the model sees it), counted as a multiset, so row order does not matter.
 * `same`: both hold exactly the same cases.
 */
export function sharedCases(fit: FitResult, dev: Dataset, other: Dataset): { shared: number; same: boolean } {
  const beta = fit.coefficients.map((c) => (Number.isFinite(c.estimate) ? c.estimate : 0));
  const a = linearPredictorFromRecipe(fit.recipe, beta, dev, { outcome: 'if-present' });
  const b = linearPredictorFromRecipe(fit.recipe, beta, other, { outcome: 'if-present' });
  if (!a.y || !b.y) return { shared: 0, same: false };
  const counts = new Map<string, number>();
  for (let i = 0; i < a.n; i++) {
    const k = `${a.y[i]}:${a.eta[i]}`;
    counts.set(k, (counts.get(k) ?? 0) + 1);
  }
  let shared = 0;
  for (let i = 0; i < b.n; i++) {
    const k = `${b.y[i]}:${b.eta[i]}`;
    const c = counts.get(k) ?? 0;
    if (c > 0) {
      shared++;
      counts.set(k, c - 1);
    }
  }
  return { shared, same: shared === a.n && shared === b.n };
}

/** The warning for an external file that holds development cases (null when it holds none). */
export function sharedCasesWarning(overlap: { shared: number; same: boolean }, nUsed: number): EngineWarning | null {
  if (overlap.shared === 0) return null;
  const message = overlap.same
    ? 'This file holds the same cases the model was fitted on: this is not an external validation. ' +
      'A calibration intercept of 0 and slope of 1 here only repeat the fit.'
    : `${overlap.shared} of the ${nUsed} cases in this file are also cases the model was fitted on ` +
      '(same outcome and same predictor values): the check is partly on the development data.';
  return warning(
    overlap.same ? SAME_CASES_CODE : SHARED_CASES_CODE,
    message,
    'Use cases from another time, place or population, not used in the fit.',
  );
}
