import type { EngineWarning } from '../core/warnings';
import type { IntervalEstimate } from '../evaluation/calibration';
import type { ProportionEstimate } from '../evaluation/proportionCi';
import type { RatioInterval } from '../monitoring/types';

/**
 * The contract of subgroup performance (issue 16): how a model that was evaluated on its rows performs within the
 * groups one column of the dataset defines. Two records, both plain and structured-clone safe:
 * `SubgroupAssignment` (which group each used row belongs to) and `SubgroupPerformance` (the measures per group and
 * overall, which is also the data of a forest plot).
 *
 * Conventions:
 * - "used rows" are the analysis's rows, in the order of its `rowsUsed` (indices into the dataset); every per-row
 *   vector here (outcome, risk, linear predictor, group) is in that order;
 * - every used row belongs to exactly one group: a missing value in the subgroup column is a group of its own,
 *   labelled "(missing)", listed last, so the groups' counts add up to the overall row;
 * - numeric bands are closed on the left, open on the right: cut points 40, 60 give "< 40", "40 to < 60", "≥ 60";
 * - O = observed events, E = expected events = Σ risks; O/E has the exact Poisson (Garwood) interval.
 */

/** How to form the groups. */
export interface SubgroupSpec {
  /** The dataset column that defines the groups. */
  column: string;
  /**
   * For a numeric column: strictly increasing, finite cut points that split it into bands closed on the left.
   * Absent or empty: each distinct value (numeric) or level (categorical) is a group. Not allowed on a
   * categorical column.
   */
  cutPoints?: number[];
  /** Most groups allowed (the missing-value group included). Default 50. */
  maxGroups?: number;
}

/** One group of a subgroup column. */
export interface SubgroupGroup {
  /** Short label: the level, the value, the band ("40 to < 60") or "(missing)". */
  label: string;
  /** The rule in words with the column name, e.g. `age: 40 ≤ value < 60`, `race = "black"`, `age is missing`. */
  definition: string;
  /** Used rows in the group. */
  n: number;
  /** True for the group of rows whose subgroup value is missing. */
  missing: boolean;
}

/** Which group each used row belongs to. */
export interface SubgroupAssignment {
  column: string;
  /** 'levels': one group per level or distinct value; 'bands': a numeric column cut at `cutPoints`. */
  kind: 'levels' | 'bands';
  cutPoints: number[] | null;
  /** Groups with at least one used row, in level / value / band order, the missing-value group last. */
  groups: SubgroupGroup[];
  /** Per used row (order of rowsUsed): index into `groups`. Every row has a group. */
  groupOf: Int32Array;
  /** Levels or bands that exist but hold none of the used rows (listed so that nothing disappears unsaid). */
  emptyGroups: string[];
  /** How the group labels read, in words (interval convention for bands, missing-value rule). */
  conventions: string[];
}

/** The AUC of a group with its DeLong interval. */
export interface SubgroupAuc {
  estimate: number;
  se: number | null;
  lower: number | null;
  upper: number | null;
  ciMethod: 'delong-auc-scale' | 'delong-logit-scale' | 'max-variance-bound' | 'none';
}

/** Counts and proportions at the current cut-off (flag rule: risk ≥ cut-off). */
export interface SubgroupAtCutoff {
  threshold: number;
  tp: number;
  fp: number;
  fn: number;
  tn: number;
  /** Wilson intervals; estimate null when the group has no events (sensitivity) or no non-events (specificity). */
  sensitivity: ProportionEstimate;
  specificity: ProportionEstimate;
  fractionFlagged: ProportionEstimate;
}

/**
 * What the too-small rule says of a group:
 * - 'adequate': at least 100 events and 100 non-events;
 * - 'imprecise': every measure is computed but the intervals are wide (fewer than 100 of a class);
 * - 'counts-only': fewer than 10 events or non-events: AUC and calibration are not computed;
 * - 'one-class': no events or no non-events: only counts, O/E and the cut-off counts.
 */
export type SubgroupPrecision = 'adequate' | 'imprecise' | 'counts-only' | 'one-class';

/** The measures of one group (or of all rows). Null where not computed; `notComputed` says why. */
export interface SubgroupRow {
  label: string;
  definition: string;
  missing: boolean;
  n: number;
  events: number;
  nonEvents: number;
  /** events / n. */
  observedRate: number | null;
  /** Σ risks. */
  expected: number;
  /** O/E = events / Σ risks with the exact Poisson interval (Garwood 1936) divided by E. */
  observedExpected: RatioInterval;
  auc: SubgroupAuc | null;
  /** α in logit P(y) = α + offset(LP), Wald interval. */
  calibrationInTheLarge: IntervalEstimate | null;
  /** β in logit P(y) = a + β·LP, Wald interval. */
  calibrationSlope: IntervalEstimate | null;
  /** Null when no cut-off was given. */
  atCutoff: SubgroupAtCutoff | null;
  precision: SubgroupPrecision;
  /** Why AUC or calibration are missing (too few of a class, one class), or null. */
  notComputed: string | null;
  warnings: EngineWarning[];
}

/** The too-small rule with its thresholds and sources, as applied. */
export interface SubgroupSizeRule {
  /** Fewer events or non-events than this: 'imprecise'. */
  impreciseBelow: number;
  impreciseSource: string;
  /** Fewer events or non-events than this: 'counts-only'. */
  countsOnlyBelow: number;
  countsOnlySource: string;
  /** The rule in one sentence. */
  text: string;
}

/** The measures a forest plot can show; `reference` is the value of no difference / perfect calibration. */
export type SubgroupMeasure =
  | 'observedExpected'
  | 'auc'
  | 'calibrationInTheLarge'
  | 'calibrationSlope'
  | 'sensitivity'
  | 'specificity'
  | 'fractionFlagged';

/** Subgroup performance: one row per group, the overall row for comparison, the rule and the warnings. */
export interface SubgroupPerformance {
  column: string;
  level: number;
  /** The cut-off used for sensitivity, specificity and the flagged fraction (risk ≥ cut-off), or null. */
  threshold: number | null;
  rows: SubgroupRow[];
  /** Every used row together, computed the same way. */
  overall: SubgroupRow;
  rule: SubgroupSizeRule;
  /** How the numbers were computed, in words, with citations. */
  methods: string[];
  /** Emptied levels/bands and conventions from the assignment, repeated here so the record stands alone. */
  emptyGroups: string[];
  conventions: string[];
  /** Per-group warnings (each names its group), then record-level ones. */
  warnings: EngineWarning[];
}

/** One estimate of a forest plot row. */
export interface ForestRow {
  label: string;
  n: number;
  events: number;
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  precision: SubgroupPrecision;
}

/** The data of one forest plot: group rows, the overall row, the reference line and the scale. */
export interface ForestData {
  column: string;
  measure: SubgroupMeasure;
  /** Axis title, e.g. "O/E (observed ÷ expected events)". */
  title: string;
  /** Value of the vertical reference line (1 for O/E and the slope, 0 for calibration-in-the-large, 0.5 for AUC). */
  reference: number;
  /** 'log' for ratios (O/E), else 'linear'. */
  scale: 'linear' | 'log';
  rows: ForestRow[];
  overall: ForestRow;
  level: number;
}
