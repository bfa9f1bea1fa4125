import type { CoefficientRow, DesignRecipe } from '../core/model';
import type { EngineWarning } from '../core/warnings';
import type { AucInterval, PairedDelongTest } from '../evaluation/delong';
import type { BrierResult } from '../evaluation/brier';
import type { CalibrationRegression } from '../evaluation/calibration';

/**
 * The bedside points score of a fitted logistic model, as Sullivan, Massaro & D'Agostino (2004, Stat Med 23:1631)
 * lay out the procedure. A plain, structured-clone-safe record (numbers, strings, arrays, plain objects; no
 * functions, no typed arrays), so it can be stored as it is in the model file under a key such as `points`, sent
 * between the worker and the page, and printed by `npm run fit --json`. `readPointsScore` checks a stored one.
 *
 * How a case is scored: for each term find the category its value falls in (`PointsTerm.categories`), add the
 * categories' `points`, and read the risk of that total from `table` (or compute
 * `1 / (1 + exp(−(baseLinearPredictor + baseUnit.logOdds · total)))`, which is what the table holds).
 */
export interface PointsScore {
  kind: 'points-score';
  /** Shape version of this record; 1. */
  version: 1;
  /** Outcome column and the level counted as the event, from the model's recipe. */
  outcome: string;
  event: string;
  /** The model's intercept β₀ (log odds). */
  intercept: number;
  /** B: the change in the linear predictor that one point stands for, and how it was chosen. */
  baseUnit: PointsBaseUnitRecord;
  /**
   * β₀ + Σᵢ fᵢ(W_iREF): the linear predictor of a case in every term's base category (total 0 points), where fᵢ is
   * term i's contribution to the linear predictor at a value and W_iREF the reference value of its base category.
   */
  baseLinearPredictor: number;
  /** One entry per model term, in the model's order. */
  terms: PointsTerm[];
  /** Smallest and largest total a case can have (Σ of each term's smallest / largest points). */
  minTotal: number;
  maxTotal: number;
  /** Every attainable total from minTotal to maxTotal (totals no combination of categories gives are left out). */
  table: PointsTableRow[];
  /**
   * For each linear numeric term: how many units of the column one point is worth (B / |β|), e.g. "1 point ≈ 4.8
   * years of age". Empty when the model has no linear numeric term.
   */
  unitsPerPoint: { term: string; column: string; units: number }[];
  warnings: EngineWarning[];
}

export interface PointsBaseUnitRecord {
  /** B > 0, log odds per point. */
  logOdds: number;
  /** Which rule gave B (see PointsBaseUnit). */
  rule: 'auto' | 'per-increase' | 'log-odds';
  /** per-increase: the linear numeric column and the increase whose effect is one point. */
  column?: string;
  increase?: number;
  /** auto: the term whose categories span the widest range of log odds, and the points it spans (the option). */
  widestTerm?: string;
  widestTermPoints?: number;
  /** One sentence saying what one point is, for the card and the report. */
  description: string;
}

export interface PointsTerm {
  /** The model term's name (as in the coefficient table) and the data column it reads. */
  term: string;
  column: string;
  /** 'categorical': one category per level; 'numeric' (linear) and 'spline': ranges of the column's values. */
  kind: 'categorical' | 'numeric' | 'spline';
  /** How the categories were made: levels, one per distinct value, ranges the user gave, or default ranges. */
  grouping: 'levels' | 'values' | 'user-ranges' | 'default-ranges';
  /** Index into `categories` of the base category (0 points). */
  base: number;
  categories: PointsCategory[];
}

export interface PointsCategory {
  /** Text for the card: the level, the value, or "under 40", "40 to under 50", "70 or more". */
  label: string;
  /** Categorical terms: the level; null for numeric terms. */
  level: string | null;
  /** Numeric terms: a value x is in this category when lower ≤ x < upper; null is an open end. */
  lower: number | null;
  upper: number | null;
  /** Numeric terms: the reference value W_ij that stands for the category; null for categorical terms. */
  reference: number | null;
  /** fᵢ(W_ij): the term's contribution to the linear predictor at the reference value / level (log odds). */
  contribution: number;
  /** fᵢ(W_ij) − fᵢ(W_iREF): the difference from the base category (log odds). */
  difference: number;
  /** difference / B before rounding. */
  exactPoints: number;
  /** round(difference / B), halves away from zero. */
  points: number;
}

export interface PointsTableRow {
  total: number;
  /** baseLinearPredictor + B · total. */
  linearPredictor: number;
  /** 1 / (1 + exp(−linearPredictor)). */
  risk: number;
}

/**
 * The number B one point stands for. `auto` (the default): B = (the widest term's range of log odds across its
 * categories) / `widestTermPoints`, so that the most influential term spans `widestTermPoints` points (10 by
 * default) and every other term fewer. `per-increase`: B = |β| · increase of a linear numeric term, e.g. 5 years
 * of age (the paper's own choice for its example). `log-odds`: B given directly.
 */
export type PointsBaseUnit =
  { kind: 'auto' } | { kind: 'per-increase'; column: string; increase: number } | { kind: 'log-odds'; value: number };

export interface PointsOptions {
  /** Default { kind: 'auto' }. */
  baseUnit: PointsBaseUnit;
  /** For the auto base unit: the points the widest term spans. Default 10; a whole number from 1 to 1000. */
  widestTermPoints: number;
  /**
   * Number of default ranges of a numeric or spline term (cut at its quantiles among the rows used, rounded to
   * tidy numbers); a column with at most this many distinct values gets one category per value. Default 5; 2–20.
   */
  rangesPerTerm: number;
  /** Cut points per column (strictly increasing, finite): ranges under c₁, c₁ to under c₂, …, c_k or more. */
  cuts: Record<string, number[]>;
  /** Reference value of each range per column (one per range, inside its range); needs `cuts` for that column. */
  referenceValues: Record<string, number[]>;
  /** Base category of each term: the lowest-risk one (all points ≥ 0; default) or the first one. */
  base: 'lowest-risk' | 'first';
}

export const defaultPointsOptions: PointsOptions = {
  baseUnit: { kind: 'auto' },
  widestTermPoints: 10,
  rangesPerTerm: 5,
  cuts: {},
  referenceValues: {},
  base: 'lowest-risk',
};

/** What the score needs of a fitted model: its recipe and its coefficient estimates (a FitResult has both). */
export interface PointsModel {
  recipe: DesignRecipe;
  coefficients: ReadonlyArray<Pick<CoefficientRow, 'name' | 'estimate'>>;
}

/** The points and risk of a set of rows of a dataset (`pointsOfRows`), in the order of `rowsUsed`. */
export interface PointsOfRows {
  /** Total points per row used. */
  totals: Float64Array;
  /** baseLinearPredictor + B · total per row used. */
  linearPredictor: Float64Array;
  /** The points-table risk per row used. */
  risks: Float64Array;
  /** Data-row indices (0-based) of the rows scored: those with a value in every column the score reads. */
  rowsUsed: Int32Array;
  nDropped: number;
  droppedByColumn: Record<string, number>;
}

/** One case's points (`casePoints`): what the card shows. */
export interface CasePoints {
  /** Null when a value is missing (see `missing`). */
  total: number | null;
  risk: number | null;
  terms: { term: string; column: string; category: number | null; label: string | null; points: number | null }[];
  /** Columns with no value given. */
  missing: string[];
}

/**
 * The score against the full model on the same rows (apparent performance), so that the loss from categorising
 * and rounding is visible: discrimination (DeLong AUC of the total points and of the model, and their paired
 * difference, points − model), calibration of the points-table risk, Brier scores of both.
 */
export interface PointsEvaluation {
  n: number;
  events: number;
  points: { auc: AucInterval; brier: BrierResult; calibration: CalibrationRegression };
  model: { auc: AucInterval; brier: BrierResult; calibration: CalibrationRegression };
  /** Paired DeLong test, auc1 = the points score, auc2 = the model (difference = points − model). */
  aucDifference: PairedDelongTest;
  /** |points-table risk − model risk| over the rows: mean, largest, and the spreadsheet row of the largest. */
  riskDifference: { meanAbsolute: number; largest: number; largestRow: number };
  /** Per attainable total: rows and events with that total, and the table's risk. */
  byTotal: { total: number; n: number; events: number; observedRate: number | null; risk: number }[];
  nDropped: number;
  droppedByColumn: Record<string, number>;
  level: number;
  warnings: EngineWarning[];
}
