import { FulcraError, getColumn, type Dataset } from '../core/data';
import type { DesignRecipe } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { linearPredictorFromRecipe } from '../design/design';
import { parseDecimal } from '../design/levels';
import {
  coefficientLookup,
  formatValue,
  levelCategories,
  numericCategories,
  numericEffect,
  type RawCategory,
  type TermValues,
} from './categories';
import { resolvePointsOptions } from './options';
import { pointsTable } from './table';
import type { PointsBaseUnitRecord, PointsModel, PointsOptions, PointsScore, PointsTerm } from './types';

type RecipeTerm = DesignRecipe['terms'][number];
type MainTerm = Exclude<RecipeTerm, { type: 'interaction' }>;

/** Largest span of totals (maxTotal − minTotal) a score may have: a card beyond it is no bedside tool. */
export const MAX_POINTS_SPAN = 10_000;

/** Rounds to the nearest whole number, halves away from zero; 1e-9 points absorb floating-point error in D/B. */
export function roundPoints(x: number): number {
  const r = Math.sign(x) * Math.floor(Math.abs(x) + 0.5 + 1e-9);
  return r === 0 ? 0 : r;
}

/** Refuses what the method does not cover here (interactions; a column in two terms), naming the term. */
function checkTerms(recipe: DesignRecipe): void {
  const seen = new Map<string, string>();
  for (const t of recipe.terms) {
    if (t.type === 'interaction')
      throw new FulcraError(
        'points-interaction',
        `The term "${t.name}" is an interaction; a points score is built here from main effects only, one ` +
          'table of points per predictor.',
        `Refit the model without "${t.name}" to make a points score, or use the model's own risks.`,
      );
    const other = seen.get(t.column);
    if (other !== undefined)
      throw new FulcraError(
        'points-column-twice',
        `The column "${t.column}" enters the model in two terms ("${other}" and "${t.name}"); a points score ` +
          'needs one term per column.',
        'Keep one of the two terms.',
      );
    seen.set(t.column, t.name);
  }
}

/** The used rows' values of a numeric column, ascending, with their frequency weights (null: none). */
function termValues(data: Dataset, column: string, rows: Int32Array, weights: Float64Array | null): TermValues {
  const col = getColumn(data, column);
  const x = new Float64Array(rows.length);
  if (col.kind === 'numeric') for (let i = 0; i < rows.length; i++) x[i] = col.values[rows[i]];
  else {
    const parsed = col.levels.map(parseDecimal);
    for (let i = 0; i < rows.length; i++) x[i] = parsed[col.codes[rows[i]]];
  }
  if (!weights) return { sorted: x.sort(), weights: null };
  const order = Array.from(x.keys()).sort((a, b) => x[a] - x[b]);
  return { sorted: Float64Array.from(order, (i) => x[i]), weights: Float64Array.from(order, (i) => weights[i]) };
}

function checkUserColumns(recipe: DesignRecipe, o: PointsOptions): void {
  const numeric = recipe.terms.filter((t) => t.type === 'numeric' || t.type === 'spline').map((t) => t.column);
  for (const column of Object.keys(o.cuts))
    if (!numeric.includes(column))
      throw new FulcraError(
        'bad-points-option',
        `Points score option "cuts.${column}": "${column}" is not a numeric or spline term of the model ` +
          `(numeric terms: ${numeric.join(', ') || 'none'}).`,
        'Give cut points only for numeric predictors; categorical ones use their levels.',
      );
}

/** B from the option and the terms' raw categories (see PointsBaseUnit). */
function baseUnit(
  o: PointsOptions,
  recipe: DesignRecipe,
  raw: { term: RecipeTerm; categories: RawCategory[] }[],
  beta: (name: string) => number,
): PointsBaseUnitRecord {
  const u = o.baseUnit;
  if (u.kind === 'log-odds')
    return { logOdds: u.value, rule: 'log-odds', description: `1 point = ${formatValue(u.value)} in log odds.` };
  if (u.kind === 'per-increase') {
    const t = recipe.terms.find((s) => s.type !== 'interaction' && s.column === u.column);
    if (!t || t.type !== 'numeric')
      throw new FulcraError(
        'bad-points-base-unit',
        `The base unit is set as an increase of "${u.column}", which is not a linear numeric term of the model` +
          (t ? ` (it is a ${t.type} term, whose effect per unit is not constant).` : '.'),
        'Choose a linear numeric predictor (e.g. age), or give the log odds per point directly.',
      );
    const b = Math.abs(beta(u.column)) * u.increase;
    if (!(b > 0))
      throw new FulcraError(
        'bad-points-base-unit',
        `The coefficient of "${u.column}" is 0, so an increase of it cannot define a point.`,
        'Choose a predictor with an effect.',
      );
    return {
      logOdds: b,
      rule: 'per-increase',
      column: u.column,
      increase: u.increase,
      description: `1 point = the change in log odds of an increase of ${formatValue(u.increase)} in "${u.column}".`,
    };
  }
  let widest = -1,
    widestTerm = '';
  for (const { term, categories } of raw) {
    const cs = categories.map((c) => c.contribution);
    const span = Math.max(...cs) - Math.min(...cs);
    if (span > widest) {
      widest = span;
      widestTerm = term.name;
    }
  }
  if (!(widest > 0))
    throw new FulcraError(
      'points-no-effects',
      'Every term contributes the same log odds in each of its categories (all coefficients 0), so no points ' +
        'can be given.',
      'Build the score from a model whose predictors have effects.',
    );
  const k = o.widestTermPoints;
  return {
    logOdds: widest / k,
    rule: 'auto',
    widestTerm,
    widestTermPoints: k,
    description:
      `1 point = ${formatValue(widest / k)} in log odds: the term "${widestTerm}", whose categories differ most, ` +
      `spans ${k} points.`,
  };
}

/**
 * The points score of a fitted logistic model, following Sullivan, Massaro & D'Agostino (2004, Stat Med 23:1631):
 * 1. each predictor's values are put into categories: a categorical term's levels; a numeric (or spline) term's
 *    ranges, given by the user (`cuts`) or by default (numericCategories: tidy quantile cuts of the rows used);
 * 2. each category gets a reference value W_ij (mid-point of a range, a percentile-based value for an open end,
 *    or the user's `referenceValues`), and each predictor a base category W_iREF (the lowest-risk one, or the first);
 * 3. the distance from the base in log odds is D_ij = fᵢ(W_ij) − fᵢ(W_iREF), where fᵢ is the term's contribution
 *    to the linear predictor (β_i·W for a linear term; the fitted spline curve for a spline term, so a spline
 *    becomes ranges; the level's coefficient for a categorical term);
 * 4. a constant B, the log odds one point stands for, is chosen (PointsBaseUnit; default: the widest term spans
 *    10 points), and points_ij = round(D_ij / B);
 * 5. a total of T points has the risk 1 / (1 + exp(−(β₀ + Σᵢ fᵢ(W_iREF) + B·T))), tabulated for every
 *    attainable total.
 * `data` supplies the values for the default ranges: the rows the model's recipe uses (complete cases with an
 * outcome), or `rows` among them. Interactions and a column entered twice are refused with a message naming the
 * term; a bad option throws FulcraError naming it. Terms whose categories all get 0 points are warned about.
 */
export function buildPointsScore(
  model: PointsModel,
  data: Dataset,
  options: Partial<PointsOptions> = {},
  rows?: Int32Array,
): PointsScore {
  const o = resolvePointsOptions(options);
  const { recipe } = model;
  checkTerms(recipe);
  checkUserColumns(recipe, o);
  const beta = coefficientLookup(model);
  const intercept = beta('(Intercept)');
  const mainTerms = recipe.terms.filter((t): t is MainTerm => t.type !== 'interaction'); // all, after checkTerms
  const needsData = mainTerms.some((t) => t.type !== 'categorical' && !o.referenceValues[t.column]);
  const estimates = model.coefficients.map((c) => c.estimate);
  const lp = needsData ? linearPredictorFromRecipe(recipe, estimates, data, rows ? { rows } : {}) : null;
  const used = lp?.rowsUsed ?? new Int32Array(0);
  // frequency weights of a weighted (grouped) fit: default ranges are then quantiles of the cases, not the rows
  const weights = lp && 'weights' in lp ? (lp.weights ?? null) : null;
  const raw = mainTerms.map((t) => {
    if (t.type === 'categorical') return { term: t, grouping: 'levels' as const, categories: levelCategories(t, beta) };
    const values = o.referenceValues[t.column]
      ? { sorted: new Float64Array(0), weights: null }
      : termValues(data, t.column, used, weights);
    return { term: t, ...numericCategories(t, values, numericEffect(t, beta), o) };
  });
  const unit = baseUnit(o, recipe, raw, beta);
  const B = unit.logOdds;
  const warnings: EngineWarning[] = [];
  let baseLinearPredictor = intercept;
  const terms: PointsTerm[] = raw.map(({ term, grouping, categories }) => {
    let base = 0;
    if (o.base === 'lowest-risk')
      categories.forEach((c, j) => {
        if (c.contribution < categories[base].contribution) base = j;
      });
    const ref = categories[base].contribution;
    baseLinearPredictor += ref;
    const cats = categories.map((c) => {
      const difference = c.contribution - ref;
      return { ...c, difference, exactPoints: difference / B, points: roundPoints(difference / B) };
    });
    if (cats.every((c) => c.points === 0))
      warnings.push(
        warning(
          'points-term-no-points',
          `Every category of "${term.name}" gets 0 points with 1 point = ${formatValue(B)} in log odds, so the ` +
            'score ignores this predictor.',
          'Choose a smaller base unit (more points per unit of log odds), or leave the predictor out.',
          [term.name],
        ),
      );
    const kind = term.type === 'categorical' ? 'categorical' : term.type === 'spline' ? 'spline' : 'numeric';
    return { term: term.name, column: term.column, kind, grouping, base, categories: cats };
  });
  let minTotal = 0,
    maxTotal = 0;
  for (const t of terms) {
    const ps = t.categories.map((c) => c.points);
    minTotal += Math.min(...ps);
    maxTotal += Math.max(...ps);
  }
  if (maxTotal - minTotal > MAX_POINTS_SPAN)
    throw new FulcraError(
      'points-too-many',
      `With 1 point = ${formatValue(B)} in log odds the totals would run from ${minTotal} to ${maxTotal}, more ` +
        `than ${MAX_POINTS_SPAN} points apart: too fine for a points card.`,
      'Choose a larger base unit, e.g. the effect of a round increase of the main numeric predictor.',
    );
  const unitsPerPoint = recipe.terms.flatMap((t) =>
    t.type === 'numeric' && beta(t.column) !== 0
      ? [{ term: t.name, column: t.column, units: B / Math.abs(beta(t.column)) }]
      : [],
  );
  return {
    kind: 'points-score',
    version: 1,
    outcome: recipe.outcome,
    event: recipe.event,
    intercept,
    baseUnit: unit,
    baseLinearPredictor,
    terms,
    minTotal,
    maxTotal,
    table: pointsTable(terms, baseLinearPredictor, B, minTotal, maxTotal),
    unitsPerPoint,
    warnings,
  };
}
