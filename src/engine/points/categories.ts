import { FulcraError } from '../core/data';
import type { DesignRecipe } from '../core/model';
import { rcsBasis } from '../design/splines';
import { quantileSorted } from '../numerics/quantile';
import { searchSorted } from '../numerics/searchSorted';
import type { PointsModel, PointsOptions, PointsTerm } from './types';

type RecipeTerm = DesignRecipe['terms'][number];
type MainTerm = Exclude<RecipeTerm, { type: 'interaction' }>;

/** A category before its points: where it lies and what it contributes to the linear predictor. */
export type RawCategory = Pick<
  PointsTerm['categories'][number],
  'label' | 'level' | 'lower' | 'upper' | 'reference' | 'contribution'
>;

/** Numbers as the card shows them: up to 6 significant digits, no trailing zeros. */
export function formatValue(v: number): string {
  return String(Number(v.toPrecision(6)));
}

/** Removes floating-point dust from a multiple of a tidy step (0.30000000000000004 → 0.3). */
const clean = (v: number) => Number(v.toPrecision(12));

/**
 * The tidy step for rounding cut points of a column whose central 80 % spans `spread`: the smallest of 1, 2, 2.5
 * and 5 times a power of ten that is at least spread / 10 (ages spanning 36 years → 5; a BMI spanning 13 → 2).
 */
export function tidyStep(spread: number): number {
  if (!(spread > 0)) return NaN;
  const raw = spread / 10;
  const power = 10 ** Math.floor(Math.log10(raw));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * power >= raw * (1 - 1e-12)) return clean(m * power);
  return 10 * power;
}

/** Each term's coefficients by design-column name; throws naming a column the model has no coefficient for. */
export function coefficientLookup(model: PointsModel): (name: string) => number {
  const map = new Map(model.coefficients.map((c) => [c.name, c.estimate]));
  return (name) => {
    const b = map.get(name);
    if (b === undefined || !Number.isFinite(b))
      throw new FulcraError(
        'recipe-mismatch',
        `The model has no finite coefficient for the design column "${name}".`,
        'Build the points score from the fitted model record whose recipe this is.',
      );
    return b;
  };
}

/** fᵢ: a numeric or spline term's contribution to the linear predictor at value x. */
export function numericEffect(t: MainTerm, beta: (name: string) => number): (x: number) => number {
  const b = beta(t.column);
  if (t.type !== 'spline') return (x) => b * x;
  const bs = t.knots.slice(2).map((_, j) => beta(t.column + "'".repeat(j + 1)));
  const tmp = new Float64Array(t.knots.length - 2);
  return (x) => {
    rcsBasis(x, t.knots, tmp);
    let s = b * x;
    for (let j = 0; j < bs.length; j++) s += bs[j] * tmp[j];
    return s;
  };
}

/** One category per level of a categorical term; the recipe's reference level contributes 0. */
export function levelCategories(t: Extract<RecipeTerm, { type: 'categorical' }>, beta: (n: string) => number) {
  return t.levels.map((level): RawCategory => ({
    label: level,
    level,
    lower: null,
    upper: null,
    reference: null,
    contribution: level === t.reference ? 0 : beta(`${t.column}=${level}`),
  }));
}

function rangeLabel(lower: number | null, upper: number | null): string {
  if (lower === null) return `under ${formatValue(upper!)}`;
  if (upper === null) return `${formatValue(lower)} or more`;
  return `${formatValue(lower)} to under ${formatValue(upper)}`;
}

/**
 * A numeric term's values over the rows used, ascending, with the cases each row stands for (frequency weights of
 * a weighted fit, aligned with `sorted`; null: one case per row).
 */
export interface TermValues {
  sorted: Float64Array;
  weights: Float64Array | null;
}

/**
 * The type-7 quantile (R's default, quantileSorted) of the cases the rows stand for: with frequency weights, of the
 * sample in which each row is repeated as often as its weight says, without building it.
 */
export function caseQuantile(v: TermValues, p: number): number {
  const { sorted, weights } = v;
  if (!weights) return quantileSorted(sorted, p);
  let total = 0;
  for (let i = 0; i < weights.length; i++) total += weights[i];
  const h = (total - 1) * p;
  const lo = Math.floor(h);
  const at = (k: number) => {
    let acc = 0;
    for (let i = 0; i < sorted.length; i++) {
      acc += weights[i];
      if (acc > k) return sorted[i];
    }
    return sorted[sorted.length - 1];
  };
  const a = at(lo);
  return a + (h - lo) * (at(Math.min(lo + 1, total - 1)) - a);
}

/** Default cut points: quantiles at k/r (k = 1 … r−1) rounded to the tidy step, each leaving rows on both sides. */
function defaultCuts(v: TermValues, r: number): number[] {
  const { sorted } = v;
  const n = sorted.length;
  const step = tidyStepOf(v);
  const raw = Array.from({ length: r - 1 }, (_, k) => caseQuantile(v, (k + 1) / r));
  const keep = (candidates: number[]) => {
    const out: number[] = [];
    let below = 0;
    for (const c of candidates) {
      const k = searchSorted(sorted, c, 'left');
      if (k > below && k < n) {
        out.push(c);
        below = k;
      }
    }
    return out;
  };
  const tidy = keep([...new Set(raw.map((q) => clean(Math.round(q / step) * step)))]);
  return tidy.length > 0 ? tidy : keep([...new Set(raw)]);
}

/** The tidy step of a column: from the central 80 % of the values (all of them when that spans 0). */
function tidyStepOf(v: TermValues): number {
  const n = v.sorted.length;
  const spread = caseQuantile(v, 0.9) - caseQuantile(v, 0.1) || v.sorted[n - 1] - v.sorted[0];
  // a column with one value: a tenth of its size (or 0.1 around 0), so that ranges beyond a user's cut have a width
  return tidyStep(spread || Math.abs(v.sorted[0]) || 1);
}

/**
 * Default reference values of ranges cut at `cuts`: the mid-point of each closed range; for the open lowest range
 * the mid-point of the 1st percentile of the rows used and the first cut (the smallest value when the 1st
 * percentile is not below the cut), and likewise with the 99th percentile (or the largest value) at the top,
 * rounded to the column's tidy step when that keeps it inside its range. Percentiles rather than the extremes keep
 * one outlying value (a data-entry error) from setting the end categories' points.
 */
function defaultReferences(v: TermValues, cuts: number[]): number[] {
  const { sorted } = v;
  const n = sorted.length;
  const step = tidyStepOf(v);
  const tidy = (x: number, inside: (r: number) => boolean) => {
    const r = clean(Math.round(x / step) * step);
    return Number.isFinite(r) && inside(r) ? r : clean(x);
  };
  const first = cuts[0],
    last = cuts[cuts.length - 1];
  // no value below the first cut (or at or above the last, user's cuts only): half a step beyond the cut
  let lo = caseQuantile(v, 0.01);
  if (!(lo < first)) lo = sorted[0] < first ? sorted[0] : first - step;
  let hi = caseQuantile(v, 0.99);
  if (!(hi >= last)) hi = sorted[n - 1] >= last ? sorted[n - 1] : last + step;
  const refs = [tidy((lo + first) / 2, (r) => r < first)];
  for (let j = 1; j < cuts.length; j++) refs.push(clean((cuts[j - 1] + cuts[j]) / 2));
  refs.push(tidy((last + hi) / 2, (r) => r >= last));
  return refs;
}

/**
 * The ranges of a numeric or spline term, from the user's cut points and reference values, or by default: one
 * category per distinct value when the rows used hold at most `rangesPerTerm` of them (cut half-way between
 * neighbours, the value itself the reference), else `rangesPerTerm` ranges cut at tidy quantiles (defaultCuts)
 * with mid-point references (defaultReferences). Quantiles and percentiles are of the cases the rows stand for.
 */
export function numericCategories(
  t: MainTerm,
  values: TermValues,
  f: (x: number) => number,
  options: PointsOptions,
): { grouping: PointsTerm['grouping']; categories: RawCategory[] } {
  const make = (lower: number | null, upper: number | null, reference: number, label?: string): RawCategory => ({
    label: label ?? rangeLabel(lower, upper),
    level: null,
    lower,
    upper,
    reference,
    contribution: f(reference),
  });
  const userCuts = options.cuts[t.column];
  const { sorted } = values;
  if (sorted.length === 0 && !options.referenceValues[t.column])
    throw new FulcraError(
      'points-no-rows',
      `The column "${t.column}" has no values in the rows used, so its ranges cannot be chosen.`,
      `Give the cut points and reference values of "${t.column}".`,
    );
  if (userCuts) {
    const refs = options.referenceValues[t.column] ?? defaultReferences(values, userCuts);
    const cats = refs.map((r, j) =>
      make(j === 0 ? null : userCuts[j - 1], j < userCuts.length ? userCuts[j] : null, r),
    );
    cats.forEach((c) => {
      if ((c.lower !== null && c.reference! < c.lower) || (c.upper !== null && c.reference! >= c.upper))
        throw new FulcraError(
          'bad-points-option',
          `Points score option "referenceValues.${t.column}": ${c.reference} lies outside its range "${c.label}".`,
          'Give each range a reference value inside it (e.g. its mid-point).',
        );
    });
    return { grouping: 'user-ranges', categories: cats };
  }
  const distinct = [...new Set(sorted)];
  if (distinct.length <= options.rangesPerTerm) {
    const mid = (j: number) => clean((distinct[j] + distinct[j + 1]) / 2);
    const cats = distinct.map((v, j) =>
      make(j === 0 ? null : mid(j - 1), j + 1 < distinct.length ? mid(j) : null, v, formatValue(v)),
    );
    return { grouping: 'values', categories: cats };
  }
  const cuts = defaultCuts(values, options.rangesPerTerm);
  const refs = defaultReferences(values, cuts);
  const cats = refs.map((r, j) => make(j === 0 ? null : cuts[j - 1], j < cuts.length ? cuts[j] : null, r));
  return { grouping: 'default-ranges', categories: cats };
}

/** The index of the category holding x (lower ≤ x < upper) among ranges in increasing order. */
export function rangeIndex(categories: ReadonlyArray<{ lower: number | null }>, x: number): number {
  let lo = 1,
    hi = categories.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (categories[mid].lower! <= x) lo = mid + 1;
    else hi = mid;
  }
  return lo - 1;
}
