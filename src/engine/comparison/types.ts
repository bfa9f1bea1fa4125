import type { Costs } from '../core/costs';
import type { Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import type { EngineWarning } from '../core/warnings';
import type { BrierResult } from '../evaluation/brier';
import type { CalibrationRegression } from '../evaluation/calibration';
import type { AucInterval, PairedDelongTest } from '../evaluation/delong';

/** What the comparison reads of a fit: its method, terms, deviance, coefficients (aliasing) and AIC / BIC. */
export type ComparedFit = Pick<
  FitResult,
  'method' | 'converged' | 'deviance' | 'coefficients' | 'recipe' | 'aic' | 'bic' | 'nUsed'
>;

/**
 * One fitted model's per-row material on a dataset: the fit, and for every row it used (in the same order) the
 * linear predictor, the 0/1 outcome and the row's index in the dataset. runAnalysis's `scores` give `eta`, `y`
 * and `rowsUsed` (indices into the data as given, also when the request leaves rows out).
 */
export interface ComparedModel {
  /** The name the page uses for the model, e.g. "Model A"; every message names the model by it. */
  label: string;
  fit: ComparedFit;
  eta: Float64Array;
  y: Float64Array;
  rowsUsed: Int32Array;
}

export interface CompareOptions {
  /** Confidence level of every interval; default 0.95. */
  level?: number;
  /**
   * The user's cut-off (flag rule: risk ≥ cut-off) for the reclassification tables; null or absent: the
   * decision-theory threshold of `costs` when given, otherwise no reclassification tables (with a warning).
   */
  threshold?: number | null;
  /** The costs of a missed case and a false alarm: each model's expected cost per 100 at the cut-off. */
  costs?: Costs | null;
  /** Decision-curve thresholds; default 0.01, 0.02, …, 0.99. */
  grid?: Float64Array;
  /** Row numbering of the dataset both models were fitted on (spreadsheet rows in messages); default: row 2 first. */
  rows?: Pick<Dataset, 'firstRow' | 'rowNumbers'>;
}

/** Which rows two models used, and which they share. Row lists are spreadsheet row numbers, ascending. */
export interface CommonRows {
  usedByA: number;
  usedByB: number;
  common: number;
  /** Dataset indices of the rows both models used, ascending. */
  dataRows: Int32Array;
  /** Rows used by A and not by B, and the other way round. */
  onlyA: number[];
  onlyB: number[];
  /**
   * The rows to add to BOTH analysis requests' `leaveOut` lists so that refits of both use only the common rows
   * (onlyA and onlyB together; a row used by neither is already dropped for its missing values). Keep each
   * request's own earlier `leaveOut` rows as well: the analysis request accepts at most 10 000 rows.
   */
  leaveOut: number[];
}

/** One model as the comparison describes it. */
export interface ComparedSide {
  label: string;
  method: FitResult['method'];
  /** Term names in the order of the fit. */
  terms: string[];
  /** Estimated coefficients that are not aliased, intercept included: the model's degrees of freedom. */
  nonAliasedCoefficients: number;
  deviance: number;
  /** null for penalised fits (no likelihood maximum). */
  aic: number | null;
  bic: number | null;
}

/** How the two models' terms relate. */
export type Nesting = 'a-within-b' | 'b-within-a' | 'same-terms' | 'not-nested';

/** Likelihood-ratio test of the smaller (nested) model against the larger, both maximum likelihood, same rows. */
export interface LikelihoodRatioTest {
  /** Deviance of the smaller model minus that of the larger. */
  chi2: number;
  /** Non-aliased coefficients of the larger model minus those of the smaller. */
  df: number;
  p: number;
  smaller: 'a' | 'b';
  larger: 'a' | 'b';
  /** The terms the larger model adds. */
  addedTerms: string[];
}

export interface NestingRecord {
  relation: Nesting;
  /** One plain sentence: which model's terms lie within the other's, or that neither does. */
  explanation: string;
  /** null when not nested, not both maximum likelihood, not converged or no difference in coefficients. */
  lrTest: LikelihoodRatioTest | null;
  /** Why there is no likelihood-ratio test (null when there is one). */
  lrTestNote: string | null;
  /** AIC and BIC of each and their differences (b − a; lower is better); null where a fit has none. */
  aicDifference: number | null;
  bicDifference: number | null;
}

/** A paired difference (model b − model a) of per-case values, with its normal-theory interval. */
export interface PairedDifference {
  estimate: number;
  se: number | null;
  z: number | null;
  p: number | null;
  lower: number | null;
  upper: number | null;
  level: number;
  /** How the interval was built, in words. */
  method: string;
}

/** Counts of cases by whether each model flags them (risk ≥ cut-off). */
export interface FlagTable {
  both: number;
  aOnly: number;
  bOnly: number;
  neither: number;
  total: number;
}

export interface Reclassification {
  threshold: number;
  /** 'given': the user's cut-off; 'costs': the decision-theory threshold of the costs. */
  thresholdSource: 'given' | 'costs';
  flagRule: string;
  events: FlagTable;
  nonEvents: FlagTable;
  all: FlagTable;
  /**
   * Net reclassification improvement (Pencina et al. 2008, Stat Med 27:157), two categories at the cut-off:
   * events flagged by b only minus events flagged by a only, over the events (= sensitivity of b − sensitivity
   * of a); null without events.
   */
  eventNri: number | null;
  /** Non-events flagged by a only minus by b only, over the non-events (= specificity of b − of a). */
  nonEventNri: number | null;
  /** eventNri + nonEventNri (Pencina's categorical NRI); null when either part is. */
  nri: number | null;
  /** Expected cost per 100 cases of each model at the cut-off, and b − a; null without costs. */
  costPer100: { a: number; b: number; difference: number } | null;
  /** Why the NRI is easily misread; to be shown beside it. */
  caution: string;
}

export interface NetBenefitComparison {
  thresholds: number[];
  a: number[];
  b: number[];
  treatAll: number[];
  /** Net benefit of b minus that of a at each threshold. */
  difference: number[];
  prevalence: number;
}

/**
 * Two models compared on the same rows: a plain structured-clone-safe record. Every difference is model b minus
 * model a.
 */
export interface ModelComparison {
  a: ComparedSide;
  b: ComparedSide;
  n: number;
  events: number;
  nonEvents: number;
  level: number;
  nesting: NestingRecord;
  auc: { a: AucInterval; b: AucInterval; difference: PairedDelongTest };
  brier: { a: BrierResult; b: BrierResult; difference: PairedDifference };
  calibration: { a: CalibrationRegression; b: CalibrationRegression };
  netBenefit: NetBenefitComparison;
  reclassification: Reclassification | null;
  warnings: EngineWarning[];
}
