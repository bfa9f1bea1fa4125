import { FulcraError } from '../core/data';
import type { DesignRecipe } from '../core/model';
import { pchisqUpper } from '../numerics/distributions';
import type { ComparedModel, LikelihoodRatioTest, Nesting, NestingRecord } from './types';

type RecipeTerm = DesignRecipe['terms'][number];

/**
 * A key per term that is equal only when two terms span the same design columns on the same rows. A categorical
 * main effect's reference level does not change the span (with the intercept); inside an interaction it is kept
 * in the key, as is every level list and spline knot, so that terms are called equal only when they are.
 */
function termKey(t: RecipeTerm, recipe: DesignRecipe): string {
  if (t.type === 'numeric') return `numeric:${t.column}`;
  if (t.type === 'categorical') return `categorical:${t.column}:${JSON.stringify(t.levels)}`;
  if (t.type === 'spline') return `spline:${t.column}:${JSON.stringify(t.knots)}`;
  const part = (column: string) => {
    const main = recipe.terms.find((u) => u.type !== 'interaction' && u.column === column);
    // an interaction encodes a categorical part by its indicators and any other part by its linear value
    return main?.type === 'categorical'
      ? `categorical:${column}:${JSON.stringify(main.levels)}:${main.reference}`
      : `linear:${column}`;
  };
  return `interaction:${t.parts.map(part).sort().join('*')}`;
}

/** Term t of one model lies within some term of the other: the same term, or x within a spline of x. */
function covered(t: RecipeTerm, from: DesignRecipe, into: DesignRecipe): boolean {
  const key = termKey(t, from);
  // x is the first column of a spline of x
  const inSpline = (u: RecipeTerm) => t.type === 'numeric' && u.type === 'spline' && u.column === t.column;
  return into.terms.some((u) => termKey(u, into) === key || inSpline(u));
}

/** Whether every term of `inner` lies within the terms of `outer` (same outcome and event). */
export function termsWithin(inner: DesignRecipe, outer: DesignRecipe): boolean {
  return inner.terms.every((t) => covered(t, inner, outer));
}

/** The relation of the two models' terms; refuses models of different outcomes or events. */
export function nestingOf(a: DesignRecipe, b: DesignRecipe): Nesting {
  if (a.outcome !== b.outcome || a.event !== b.event)
    throw new FulcraError(
      'compare-different-outcome',
      `The two models predict different outcomes ("${a.outcome}" = ${a.event} and "${b.outcome}" = ${b.event}), ` +
        'so they cannot be compared.',
      'Compare models of the same outcome and the same event level.',
    );
  const ab = termsWithin(a, b);
  const ba = termsWithin(b, a);
  return ab && ba ? 'same-terms' : ab ? 'a-within-b' : ba ? 'b-within-a' : 'not-nested';
}

/** Estimated coefficients that are not aliased, intercept included. */
export function nonAliased(fit: ComparedModel['fit']): number {
  return fit.coefficients.filter((c) => !c.aliased).length;
}

const METHOD_NAME: Record<string, string> = {
  ml: 'maximum likelihood',
  firth: "Firth's penalised likelihood",
  ridge: 'ridge',
  lasso: 'lasso',
  'elastic-net': 'elastic net',
};

function explain(relation: Nesting, a: ComparedModel, b: ComparedModel, added: string[]): string {
  if (relation === 'same-terms') return `${a.label} and ${b.label} have the same terms.`;
  if (relation === 'not-nested')
    return (
      `The models are not nested: each has terms the other lacks, so no likelihood-ratio test applies. ` +
      'AIC and BIC (lower is better) are the usual summary for models that are not nested.'
    );
  const [small, large] = relation === 'a-within-b' ? [a, b] : [b, a];
  return (
    `${small.label} is nested in ${large.label}: ${large.label} has every term of ${small.label} ` +
    `and adds ${added.join(', ')}.`
  );
}

/** Why a nested pair gets no likelihood-ratio test, or null when it gets one. */
function whyNoTest(relation: Nesting, a: ComparedModel, b: ComparedModel, df: number): string | null {
  if (relation === 'not-nested') return 'The models are not nested, so no likelihood-ratio test applies.';
  if (relation === 'same-terms')
    return 'The models have the same terms, so there is nothing for a likelihood-ratio test to test.';
  const other = [a, b].filter((m) => m.fit.method !== 'ml');
  if (other.length > 0) {
    const names = other.map((m) => `${m.label} was fitted by ${METHOD_NAME[m.fit.method]}`).join(' and ');
    const firth = other.some((m) => m.fit.method === 'firth');
    return (
      `${names}. The likelihood-ratio test needs both models fitted by maximum likelihood: ` +
      (firth
        ? "Firth's estimates maximise a penalised likelihood whose penalty differs between the two models, so the " +
          'difference in deviance does not follow the χ² distribution of the test. Refit both by maximum ' +
          "likelihood, or read the larger Firth model's own penalised likelihood-ratio tests of the added terms."
        : 'penalised estimates are shrunk on purpose and are not likelihood maxima, so the difference in deviance ' +
          'is not a likelihood-ratio statistic. Refit both by maximum likelihood for the test.')
    );
  }
  const unconverged = [a, b].filter((m) => !m.fit.converged);
  if (unconverged.length > 0)
    return (
      `${unconverged.map((m) => m.label).join(' and ')} did not converge, so its deviance is not a maximum ` +
      'and no likelihood-ratio test is given.'
    );
  if (df <= 0)
    return (
      'The larger model has no more estimated (non-aliased) coefficients than the smaller: its added terms are ' +
      'linear combinations of the smaller model’s columns on these rows, so there is nothing to test.'
    );
  return null;
}

/**
 * Nesting of two models fitted on the same rows, and when one is nested in the other and both are maximum
 * likelihood fits, the likelihood-ratio test (Wilks 1938): χ² = deviance of the smaller − deviance of the larger,
 * df = difference in non-aliased coefficients, p from the upper χ² tail — as R's anova(glm1, glm2, test = "LRT").
 */
export function compareNesting(a: ComparedModel, b: ComparedModel): NestingRecord {
  const relation = nestingOf(a.fit.recipe, b.fit.recipe);
  const [small, large, smaller] = relation === 'b-within-a' ? ([b, a, 'b'] as const) : ([a, b, 'a'] as const);
  const smallKeys = new Set(small.fit.recipe.terms.map((t) => termKey(t, small.fit.recipe)));
  const added = large.fit.recipe.terms.filter((t) => !smallKeys.has(termKey(t, large.fit.recipe))).map((t) => t.name);
  const df = nonAliased(large.fit) - nonAliased(small.fit);
  const note = whyNoTest(relation, a, b, df);
  let lrTest: LikelihoodRatioTest | null = null;
  let lrTestNote = note;
  const drop = small.fit.deviance - large.fit.deviance;
  if (note === null && drop < -1e-7 * Math.max(1, small.fit.deviance))
    lrTestNote =
      `${large.label} has a higher deviance than the model nested in it (by ${(-drop).toPrecision(3)}), which a ` +
      'maximum-likelihood fit cannot have: one of the fits stopped short of its maximum, so no test is given.';
  else if (note === null) {
    // rounding of two converged fits can leave a difference of about 1e-10 below 0
    const chi2 = Math.max(0, drop);
    lrTest = { chi2, df, p: pchisqUpper(chi2, df), smaller, larger: smaller === 'a' ? 'b' : 'a', addedTerms: added };
  }
  const diff = (x: number | null, y: number | null) => (x === null || y === null ? null : y - x);
  return {
    relation,
    explanation: explain(relation, a, b, added),
    lrTest,
    lrTestNote,
    aicDifference: diff(a.fit.aic, b.fit.aic),
    bicDifference: diff(a.fit.bic, b.fit.bic),
  };
}
