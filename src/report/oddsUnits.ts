import type { CoefficientRow, DesignRecipe } from '../engine/core';

/**
 * Odds ratios per a unit the user chooses (per 10 years, per 5 BMI units) for numeric predictors, and a row for
 * the reference level of each categorical predictor. Display only: the fit is never changed. For a coefficient
 * β with limits (l, u) on the log-odds scale, the odds ratio per `unit` is exp(unit·β) with limits
 * exp(unit·l) to exp(unit·u).
 */
export type OddsUnits = Record<string, number>;

/** A unit the page accepts: a finite number above 0. */
export const isOddsUnit = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v) && v > 0;

/** The valid entries of a saved setting (anything else dropped). */
export function cleanOddsUnits(v: unknown): OddsUnits {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) return {};
  return Object.fromEntries(Object.entries(v).filter(([, u]) => isOddsUnit(u))) as OddsUnits;
}

/** "per 10", "per 0.5"; null for the plain per-1 reading. */
export function unitLabel(unit: number): string | null {
  return unit === 1 ? null : `per ${Number(unit.toPrecision(6))}`;
}

/** The numeric main terms (by term name) whose odds ratio can be shown per a chosen unit. */
export function numericTerms(recipe: DesignRecipe): string[] {
  return recipe.terms.filter((t) => t.type === 'numeric').map((t) => t.name);
}

/** A row of the odds-ratio table: a coefficient (scaled by its unit) or the reference level of a categorical term. */
export type OddsDisplayRow<C> =
  | { kind: 'coefficient'; row: C; unit: number; label: string }
  | { kind: 'reference'; term: string; column: string; level: string; label: string };

/**
 * The rows of the odds-ratio table in coefficient order, a reference row placed before the first level of each
 * categorical term, and the unit of each numeric main term (1 unless the user chose another).
 */
export function oddsDisplayRows<C extends Pick<CoefficientRow, 'name' | 'term'>>(
  recipe: DesignRecipe,
  rows: C[],
  units: OddsUnits = {},
): OddsDisplayRow<C>[] {
  const numeric = new Set(numericTerms(recipe));
  const categorical = new Map(recipe.terms.flatMap((t) => (t.type === 'categorical' ? [[t.name, t] as const] : [])));
  const out: OddsDisplayRow<C>[] = [];
  const done = new Set<string>();
  for (const r of rows) {
    const cat = categorical.get(r.term);
    if (cat && !done.has(cat.name)) {
      done.add(cat.name);
      out.push({
        kind: 'reference',
        term: cat.name,
        column: cat.column,
        level: cat.reference,
        label: `${cat.column}=${cat.reference}`,
      });
    }
    const unit = numeric.has(r.term) && isOddsUnit(units[r.term]) ? units[r.term] : 1;
    const per = unitLabel(unit);
    out.push({ kind: 'coefficient', row: r, unit, label: per ? `${r.name}, ${per}` : r.name });
  }
  return out;
}

/** exp(unit·x) for a log-odds value or limit; null stays null. */
export const orPerUnit = (x: number | null, unit: number): number | null => (x === null ? null : Math.exp(unit * x));
