import type { EngineWarning } from './warnings';

/** One term of the model, as the user states it. Term names are used in every table, test and report. */
export type TermSpec =
  | { type: 'main'; column: string; reference?: string }
  | { type: 'spline'; column: string; knots: 3 | 4 | 5 }
  | { type: 'interaction'; columns: [string, string] };

/**
 * How the outcome is laid out: one yes/no column per case (`binary`, the default), or a table of counts with the
 * events in `outcome` and the number of cases (`trials`) or of non-events (`nonEvents`) in a second column.
 */
export type OutcomeLayout =
  { kind: 'binary' } | { kind: 'events-trials'; trials: string } | { kind: 'events-nonevents'; nonEvents: string };

/** The second column of a grouped layout (trials or non-events), or null for a yes/no outcome. */
export function countsColumn(layout: OutcomeLayout | undefined): string | null {
  if (layout?.kind === 'events-trials') return layout.trials;
  return layout?.kind === 'events-nonevents' ? layout.nonEvents : null;
}

export interface ModelSpec {
  /** The yes/no outcome column; in a grouped layout, the column of event counts. */
  outcome: string;
  /** The outcome level counted as the event. For a numeric 0/1 outcome, "1". Not used by grouped layouts. */
  event?: string;
  terms: TermSpec[];
  /** Absent: one yes/no column per case. */
  layout?: OutcomeLayout;
  /** A column of frequency weights (whole numbers ≥ 1: how many identical cases the row stands for), any layout. */
  weights?: string;
}

/**
 * 'ml', 'ridge' and 'firth' come from fit(); 'lasso' and 'elastic-net' (and ridge with λ chosen by
 * cross-validation) from the penalised pipeline, whose records carry no inference.
 */
export type FitMethod = 'ml' | 'ridge' | 'firth' | 'lasso' | 'elastic-net';

/** Penalised fits: estimates are shrunk on purpose, so no SEs, p-values or CIs are reported. */
export function isPenalised(method: FitMethod): boolean {
  return method === 'ridge' || method === 'lasso' || method === 'elastic-net';
}

export interface FitOptions {
  /** 'ml' = maximum likelihood; 'ridge' = L2 at `lambda`; 'firth' = Jeffreys-prior penalised likelihood. */
  method: 'ml' | 'ridge' | 'firth';
  /** Ridge strength on the standardised scale: objective −(1/n)·loglik + (λ/2)·‖β_std‖², intercept unpenalised. */
  lambda: number;
  /** Convergence: relative change in deviance (and max |Δβ| on the standardised scale) below tol. */
  tol: number;
  maxIter: number;
  /** Confidence level for every interval. */
  level: number;
  /** Compute profile-likelihood CIs (root finding). */
  profile: boolean;
}

export const defaultFitOptions: FitOptions = {
  method: 'ml',
  lambda: 0,
  tol: 1e-10,
  maxIter: 50,
  level: 0.95,
  profile: true,
};

/** One design column (intercept first). */
export interface CoefficientRow {
  name: string;
  /** Name of the term this column belongs to ("(Intercept)" for the intercept). */
  term: string;
  estimate: number;
  /** null for penalised fits other than Firth, where no valid inference table exists. */
  se: number | null;
  z: number | null;
  p: number | null;
  waldLower: number | null;
  waldUpper: number | null;
  /** Profile-likelihood limits (log-odds); null where not computed or unbounded (see the two flags below). */
  profileLower: number | null;
  profileUpper: number | null;
  /**
   * The profile limit runs to −∞ (lower) or +∞ (upper): the side a coefficient diverges to under separation.
   * The number is then null (JSON has no infinity). Absent in records that predate the flags: read as false.
   */
  profileLowerUnbounded?: boolean;
  profileUpperUnbounded?: boolean;
  oddsRatio: number;
  /** Dropped because it is a linear combination of earlier columns (aliased). estimate is 0 then. */
  aliased: boolean;
}

export interface TermRow {
  name: string;
  /** Indices into `coefficients`. */
  columns: number[];
  df: number;
  /**
   * Likelihood-ratio test of dropping the whole term (multi-df for categorical and spline terms), on the likelihood
   * named by FitResult.testLikelihood: a deviance difference for ML, a penalised-likelihood ratio for Firth.
   */
  lrChi2: number | null;
  lrP: number | null;
}

/** What is needed to re-create the design for new data (scoring, external validation). */
export interface DesignRecipe {
  outcome: string;
  event: string;
  terms: Array<
    | { type: 'numeric'; name: string; column: string }
    | { type: 'categorical'; name: string; column: string; levels: string[]; reference: string }
    | { type: 'spline'; name: string; column: string; knots: number[] }
    | { type: 'interaction'; name: string; parts: [string, string] }
  >;
  /** Design column names, intercept first; same order as coefficients. */
  columnNames: string[];
  /**
   * [min, max] of each numeric predictor over the rows the model was fitted on (scoring warns outside it).
   * Absent in recipes that predate it.
   */
  ranges?: Record<string, [number, number]>;
  /**
   * A model fitted on a table of counts: its layout (the outcome column holds event counts; scoring and monitoring
   * files of counts are read the same way). Absent: one yes/no outcome per row.
   */
  layout?: OutcomeLayout;
  /**
   * The column of case counts each row stands for (frequency weights), when the model was fitted on weighted rows
   * (grouped tables are fitted as two weighted rows per table row: events and non-events). Absent: one case per row.
   */
  weights?: string;
}

export interface FitResult {
  method: FitMethod;
  lambda: number;
  /** Elastic-net mixing (1 = lasso, 0 = ridge) for penalised-pipeline fits; absent otherwise. */
  alpha?: number;
  level: number;
  converged: boolean;
  iterations: number;
  coefficients: CoefficientRow[];
  terms: TermRow[];
  /**
   * Unpenalised −2·loglik at the estimate and for the intercept-only model (for Firth too). Under separation the
   * deviance is its limit (the determined rows' risks at 0/1 to machine precision).
   */
  deviance: number;
  nullDeviance: number;
  logLik: number;
  /**
   * Firth: the penalised log-likelihood ℓ + ½·log det X'WX at the estimate (original design); null otherwise.
   * Absent in records that predate it.
   */
  penalisedLogLik?: number | null;
  /**
   * The likelihood whose ratios modelLrChi2 and terms[].lrChi2 are: 'ordinary' (ML: differences of the unpenalised
   * deviance) or 'penalised' (Firth: 2·(ℓ* of the fit − ℓ* with the columns fixed at 0), not a deviance
   * difference). Absent in records that predate it: read 'penalised' when method is 'firth'.
   */
  testLikelihood?: 'ordinary' | 'penalised';
  /** null for penalised fits (the penalised estimate is not a likelihood maximum). */
  aic: number | null;
  bic: number | null;
  /** Model likelihood-ratio test against the intercept-only model (see testLikelihood); null for penalised fits. */
  modelLrChi2: number | null;
  modelDf: number;
  modelLrP: number | null;
  /** Cases used: complete rows, or with frequency weights the cases they stand for (Σ weights). */
  nUsed: number;
  /** With frequency weights (and grouped tables, fitted as weighted rows): the weighted rows fitted; else absent. */
  rowsFitted?: number;
  nDropped: number;
  /** Rows dropped because of a missing value, per column name. */
  droppedByColumn: Record<string, number>;
  events: number;
  nonEvents: number;
  /** Number of estimated non-intercept parameters. */
  parameters: number;
  eventsPerParameter: number;
  /** Covariance matrix of the estimates, row-major, intercept first (null where not valid). */
  covariance: number[] | null;
  recipe: DesignRecipe;
  warnings: import('./warnings').EngineWarning[];
}

export type { EngineWarning };
