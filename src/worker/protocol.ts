/**
 * Plain records that cross the worker boundary (structured-clone safe). The main thread imports TYPES only
 * from here and from src/engine; it never runs engine code.
 */
import type { CoefficientRow, Costs, EngineWarning, FitResult, ModelSpec } from '../engine/core';
import type { CostThresholds, ThresholdMetrics } from '../engine/evaluation';
import type { AnalysisRecord, AnalysisRequest, AnalysisRequestInput, LambdaRecord } from '../engine/workflow';
import type { CountLayoutProposal } from '../io/countLayout';
import type { ImportFormat } from '../io/types';
import type { CautionSetting } from '../report';

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
  /** A table-of-counts layout the columns suggest (events with trials or non-events), or null/absent. */
  countLayout?: CountLayoutProposal | null;
  /** The setting a demo is invented for, whose cautions apply (demos only). */
  cautions?: CautionSetting;
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
  /**
   * Threads the passes of its profile limits and term tests ran on through shard helpers (pages without shared
   * memory, such as the single file; 1 when none ran there).
   */
  inferenceThreads: number;
  /** The outcome layout, the cases it stands for, deviance conventions, fit by covariate pattern (the record's). */
  layout?: AnalysisRecord['layout'] | null;
  warnings: EngineWarning[];
  /** The key under which the worker keeps this model (src/worker/compareOps.ts); showing it again needs no refit. */
  modelKey?: number;
}

export interface ThresholdView {
  /** The engine's record at the cut-off (counts, proportions with Wilson CIs, LR±, cost per 100). */
  metrics: ThresholdMetrics;
  /** Net benefit at the cut-off: TP/n − FP/n · t/(1 − t) (Vickers & Elkin 2006). */
  netBenefit: number;
  costs: Costs;
}

/** Counts of cases with and without the event per bin of predicted risk, bins [edges[i], edges[i + 1]). */
export interface RiskBins {
  edges: number[];
  events: number[];
  nonEvents: number[];
  /** Cases whose risk lies below the first edge or at/above the last (outside the bins). */
  below: { events: number; nonEvents: number };
  above: { events: number; nonEvents: number };
}

/** Computed once per fit and per cost setting (not per slider move). */
export interface CostView {
  costs: Costs;
  optimal: CostThresholds;
  /** The expected-cost curve over cut-offs 0.01–0.99. */
  curve: CurvePoint[];
  /** The predicted risks of cases with and without the event over 0–1. */
  distribution: RiskBins;
  /** The window where the cost changes (see `rule`), with the curve and the risks drawn finer inside it. */
  zoom: { from: number; to: number; rule: string; curve: CurvePoint[]; distribution: RiskBins };
}

/** How the current cut-off was set on the page; the PDF says so. */
export type CutoffHow = 'cost-based' | 'cheapest' | 'hand' | 'restored';

/** What the PDF needs to say how the cut-off and the costs came about. */
export interface CutoffOrigin {
  how: CutoffHow;
  /** False while the costs are still the default 10 : 1. */
  costsSetByUser: boolean;
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
  /** Axes per unit of each column or per SD of it, and the window (see LossSurfaceChoice). */
  scale: LossSurfaceChoice['scale'];
  window: LossSurfaceChoice['window'];
  /** Half-width of the window in SEs, and whether the SEs exist (penalised fits: the engine's fallback). */
  span: number;
  seBased: boolean;
}

/**
 * How the loss surface is drawn: per unit ('original') or per SD ('standardised') of each column; 'estimate': ±4 SE
 * around the estimate; 'path': from the optimiser's start to the estimate.
 */
export interface LossSurfaceChoice {
  scale: 'original' | 'standardised';
  window: 'estimate' | 'path';
}

export interface ValidationView {
  replicates: number;
  metrics: { name: string; apparent: number; optimism: number; corrected: number; spread: number }[];
  warnings: EngineWarning[];
}

/** A numeric value outside the [min, max] of its predictor over the rows the model was fitted on. */
export interface OutsideValue {
  column: string;
  value: number;
  min: number;
  max: number;
}

export interface ScoreView {
  risk: number;
  lower: number;
  upper: number;
  eta: number;
  flagged: boolean;
  threshold: number;
  /** The entered values that lie outside the fitted data (the risk is an extrapolation); empty when none. */
  outside: OutsideValue[];
}

export interface BatchScoreView {
  n: number;
  /** Rows scored, and rows skipped (missing values, or an unknown category: see `unknown`). */
  scored: number;
  skipped: number;
  preview: { row: number; risk: number; lower: number; upper: number }[];
  /** Scored rows with a value outside the fitted data, and the first of them by spreadsheet row. */
  outsideRows: number;
  outsideFirst: { row: number; columns: string[] }[];
  /** A file of counts scored with a model fitted on counts: Σ trials × risk over the scored rows; else null. */
  expectedEvents?: number | null;
  /** Rows skipped because a category was not seen when the model was fitted, and the first of them. */
  unknownRows: number;
  unknownFirst: { row: number; column: string; value: string }[];
  /** The scored CSV in parts of 20 000 rows (header in the first), for `new Blob(csvParts)`: never one huge string. */
  csvParts: string[];
  warnings: EngineWarning[];
}

export interface ExternalView {
  n: number;
  performance: PerformanceView;
  recalibration: { intercept: number; slope: number } | null;
  /** Cases of the file that are also development cases (same outcome and design row); `sameCases`: all, both ways. */
  sharedCases: number;
  sameCases: boolean;
  warnings: EngineWarning[];
}

export type Progress = (done: number, total: number) => void;

/** The user's own words for the model summary (TRIPOD: purpose, setting, population). */
export interface ReportText {
  purpose?: string;
  setting?: string;
  population?: string;
  notes?: string;
  /** Which cautions apply: clinical (the default) or industrial / quality (src/report/cautions.ts). */
  cautions?: CautionSetting;
}

/** What the model-summary PDF is asked with: the user's words, and the page's display settings it follows. */
export interface ReportRequestText extends ReportText {
  /** The page's odds-ratio units by numeric predictor (the PDF's coefficient table follows them). */
  oddsUnits?: Record<string, number>;
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

/** A model file opened on the page ("Open model"): what the page shows of it; the worker keeps the model itself. */
export interface OpenedModelView {
  /** Unique on this page: a result computed with this model carries it. */
  id: number;
  fileName: string;
  outcome: string;
  event: string;
  /** The model's terms, as fitted. */
  terms: string[];
  method: FitResult['method'];
  /** When the model file was saved (ISO 8601) and by which Fulcra. */
  created: string;
  fulcraVersion: string;
  /** The development data's file name and rows, as the model file records them. */
  trainedOn: string | null;
  trainingRows: number | null;
  purpose: string | null;
}

/** The monitoring file the worker holds (src/worker/monitorOps.ts), as the page shows it before monitoring. */
export type { MonitoringFileView } from './monitorOps';
