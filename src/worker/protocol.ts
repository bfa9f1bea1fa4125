/**
 * Plain records that cross the worker boundary (structured-clone safe). The main thread imports TYPES only
 * from here and from src/engine; it never runs engine code.
 */
import type { CoefficientRow, Costs, EngineWarning, FitResult, ModelSpec } from '../engine/core';
import type { CostThresholds, ThresholdMetrics } from '../engine/evaluation';
import type { AnalysisRequest, AnalysisRequestInput, LambdaRecord } from '../engine/workflow';
import type { ImportFormat } from '../io/types';

export type InferredType = 'numeric' | 'binary' | 'categorical' | 'date' | 'identifier' | 'text';

export interface ColumnView {
  name: string;
  kind: 'numeric' | 'categorical';
  type: InferredType;
  /** Why the type was chosen, in plain words. */
  reason: string;
  /** False for identifier-like and free-text columns. */
  modelling: boolean;
  levels: string[];
  missing: number;
  distinct: number;
  min: number | null;
  median: number | null;
  max: number | null;
  /** Histogram bins (numeric) or level counts (categorical), for the header sparkline. */
  bins: { label: string; count: number }[];
  /** The event level proposed for an outcome column, when unambiguous. */
  proposedEvent: string | null;
}

export interface DataSummary {
  source: { kind: 'demo' | 'file' | 'paste'; name: string; notice: string | null };
  nRows: number;
  columns: ColumnView[];
  warnings: EngineWarning[];
  /** The model the demo was generated from (demos only). */
  suggestedSpec: ModelSpec | null;
  truth: { column: string | null; level?: string; value: number }[] | null;
  /** How the file was read (null for demos). */
  format: ImportFormat | null;
  /** Spreadsheet row of the first data row (the Dataset's firstRow): 2 below a header row; absent means 2. */
  firstRow?: number;
}

export type { Costs, FitMethod } from '../engine/core';

/** What the page asks the worker to fit: the engine's one analysis request (defaults filled by the engine). */
export type FitRequest = AnalysisRequestInput;

/** One line of the odds-ratio table, ready to show (penalised fits carry no intervals). */
export interface OddsRow extends Pick<
  CoefficientRow,
  | 'name'
  | 'term'
  | 'estimate'
  | 'oddsRatio'
  | 'se'
  | 'p'
  | 'waldLower'
  | 'waldUpper'
  | 'profileLower'
  | 'profileUpper'
  | 'aliased'
> {
  /** The true coefficient of an invented demo, when known. */
  truth: number | null;
}

/** A window of the grid: each row's cell text ("" when missing) and its spreadsheet row number. */
export interface RowsWindow {
  cells: string[][];
  rowNumbers: number[];
}

export interface CurvePoint {
  x: number;
  y: number;
}

export type LambdaChoice = LambdaRecord;

export interface PerformanceView {
  auc: number;
  aucLower: number;
  aucUpper: number;
  roc: CurvePoint[];
  pr: CurvePoint[];
  averagePrecision: number;
  brier: number;
  scaledBrier: number;
  calSlope: number;
  calSlopeLower: number;
  calSlopeUpper: number;
  calInLarge: number;
  calInLargeLower: number;
  calInLargeUpper: number;
  calibration: { p: number; observed: number; lower: number; upper: number }[];
  ici: number;
  e50: number;
  e90: number;
  emax: number;
  hosmerLemeshow: { chi2: number; df: number; p: number; groups: number } | null;
  decision: { t: number; model: number; all: number }[];
  warnings: EngineWarning[];
}

export interface FitView {
  /** The request as run, defaults filled in. */
  request: AnalysisRequest;
  fit: FitResult;
  rows: OddsRow[];
  lambda: LambdaChoice | null;
  performance: PerformanceView | null;
  /** Cost-optimal thresholds for the current costs. */
  sampleSize: { lines: string[]; warnings: EngineWarning[] } | null;
  /** Predictors available for the risk curve, with their typical value. */
  typical: Record<string, string | number>;
  rowsUsed: number;
  /** Threads the row passes of this fit ran on (1 below two chunks of rows or without a pool). */
  threads: number;
  warnings: EngineWarning[];
}

export interface ThresholdView {
  /** The engine's record at the cut-off (counts, proportions with Wilson CIs, LR±, cost per 100). */
  metrics: ThresholdMetrics;
  /** Net benefit at the cut-off: TP/n − FP/n · t/(1 − t) (Vickers & Elkin 2006). */
  netBenefit: number;
  costs: Costs;
}

/** Computed once per fit and per cost setting (not per slider move). */
export interface CostView {
  costs: Costs;
  optimal: CostThresholds;
  curve: CurvePoint[];
}

export interface RiskCurveView {
  predictor: string;
  numeric: boolean;
  points: { x: number; label: string; risk: number; lower: number; upper: number }[];
  rug: number[];
  heldAt: Record<string, string | number>;
}

export interface LossSurfaceView {
  names: [string, string];
  xs: number[];
  ys: number[];
  /** Row-major values[yIndex * xs.length + xIndex]. */
  values: number[];
  path: [number, number][];
  optimum: [number, number];
  penalised: boolean;
}

export interface ValidationView {
  replicates: number;
  metrics: { name: string; apparent: number; optimism: number; corrected: number; spread: number }[];
  warnings: EngineWarning[];
}

export interface ScoreView {
  risk: number;
  lower: number;
  upper: number;
  eta: number;
  flagged: boolean;
  threshold: number;
}

export interface BatchScoreView {
  n: number;
  scored: number;
  skipped: number;
  preview: { row: number; risk: number; lower: number; upper: number }[];
  csv: string;
  warnings: EngineWarning[];
}

export interface ExternalView {
  n: number;
  performance: PerformanceView;
  recalibration: { intercept: number; slope: number } | null;
  warnings: EngineWarning[];
}

export type Progress = (done: number, total: number) => void;

/** The user's own words for the model summary (TRIPOD: purpose, setting, population). */
export interface ReportText {
  purpose?: string;
  setting?: string;
  population?: string;
  notes?: string;
}

/** The model refitted on m multiply-imputed datasets and pooled by Rubin's rules. */
export interface ImputedView {
  m: number;
  level: number;
  nRows: number;
  nImputedRows: number;
  imputedColumns: { column: string; cells: number; method: string }[];
  rows: {
    name: string;
    estimate: number;
    oddsRatio: number;
    lower: number | null;
    upper: number | null;
    p: number | null;
    fmi: number | null;
    df: number | null;
  }[];
  warnings: EngineWarning[];
}
