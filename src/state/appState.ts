import type { MissingReport } from '../engine/imputation';
import type { ColumnType, ImportOptions } from '../io/types';
import type { EngineWarning, ModelSpec, OutcomeLayout, TermSpec } from '../engine/core';
import type {
  BatchScoreView,
  Costs,
  CostView,
  CutoffHow,
  ImputedView,
  DataSummary,
  ExternalView,
  FitView,
  LossSurfaceView,
  FitMethod,
  OpenedModelView,
  ReportText,
  RiskCurveView,
  ScoreView,
  ThresholdView,
  ValidationView,
} from '../worker/protocol';
import type { OddsUnits } from '../report/oddsUnits';
import { initialMonitor, type MonitorState } from './monitorState';
import { initialInfluence, type InfluenceState } from './influenceState';
import { initialModels, type ModelsState } from './modelsState';

export type ViewId =
  | 'data'
  | 'model'
  | 'models'
  | 'influence'
  | 'shape'
  | 'performance'
  | 'subgroups'
  | 'cutoff'
  | 'score'
  | 'points'
  | 'monitor';

export interface PredictorRole {
  include: boolean;
  reference: string | null;
  /** 0 = linear; 3–5 = restricted cubic spline with that many knots. */
  knots: 0 | 3 | 4 | 5;
}

export interface Notice {
  id: number;
  kind: 'error' | 'warning' | 'info';
  text: string;
  suggestion?: string;
  /** A one-click remedy the notice offers. */
  action?: 'use-firth' | 'use-ridge' | 'reload' | 'start-afresh' | 'refit' | 'save-workspace';
  code?: string;
}

export interface Job {
  id: string;
  label: string;
  done: number;
  total: number;
  cancellable: boolean;
}

/** How to read the next file (manual overrides of what the importer detects). */
export interface ImportSettings {
  delimiter: 'auto' | ',' | ';' | '\t' | '|';
  decimal: 'auto' | '.' | ',';
  encoding: 'auto' | 'utf-8' | 'windows-1252';
  header: 'auto' | 'yes' | 'no';
  sheet: string | null;
  /** Per column name: the type the user chose instead of the inferred one. */
  columnTypes: Record<string, ColumnType>;
}

export const defaultImportSettings: ImportSettings = {
  delimiter: 'auto',
  decimal: 'auto',
  encoding: 'auto',
  header: 'auto',
  sheet: null,
  columnTypes: {},
};

export interface AppState {
  view: ViewId;
  importSettings: ImportSettings;
  data: DataSummary | null;
  outcome: string | null;
  event: string | null;
  /** How the outcome is laid out: one yes/no column, or events with trials / non-events (a table of counts). */
  layout: OutcomeLayout;
  /** A column of frequency weights (cases per row), or null. */
  weights: string | null;
  roles: Record<string, PredictorRole>;
  interactions: [string, string][];
  method: FitMethod;
  alpha: number;
  lambdaRule: 'min' | '1se';
  level: number;
  /** Iteration limit of the standard, Firth and ridge fits (1–10000). */
  maxIter: number;
  fit: FitView | null;
  costs: Costs;
  /** False while the costs are still the default (nobody typed a cost). */
  costsSetByUser: boolean;
  threshold: number;
  /** How the current cut-off was set: cost-based, cheapest on the data, by hand, or restored from a workspace. */
  cutoffHow: CutoffHow;
  thresholdView: ThresholdView | null;
  /** Rows the current roles would drop (complete-case analysis). */
  dropReport: MissingReport | null;
  costView: CostView | null;
  riskCurve: RiskCurveView | null;
  lossSurface: LossSurfaceView | null;
  validation: ValidationView | null;
  /** The same model pooled over multiple imputations (shown beside the complete-case fit). */
  imputed: ImputedView | null;
  validationStatus: 'idle' | 'running' | 'done' | 'cancelled';
  score: ScoreView | null;
  batch: BatchScoreView | null;
  external: ExternalView | null;
  /** The user's own words for the model summary (purpose, setting, population, notes). */
  reportText: ReportText;
  /** Odds ratios per a chosen unit, by numeric predictor (display only; absent = per 1). */
  oddsUnits: OddsUnits;
  /** A model file opened on the page ("Open model"), kept beside the current fit for monitoring. */
  openedModel: OpenedModelView | null;
  /** Monitoring later cases with a model: the file, the choices, the result (src/state/monitorActions.ts). */
  monitor: MonitorState;
  /** Which rows drive the model: the diagnostics view, ticked rows, the all-rows odds ratios (influenceState.ts). */
  influence: InfluenceState;
  /** The models kept in this session, the one shown, and the comparison of two (modelsState.ts). */
  models: ModelsState;
  /** When the workspace was last kept in this browser (ISO 8601), or null. */
  savedAt: string | null;
  jobs: Job[];
  notices: Notice[];
  nextNoticeId: number;
}

export const initialState: AppState = {
  view: 'data',
  importSettings: defaultImportSettings,
  data: null,
  outcome: null,
  event: null,
  layout: { kind: 'binary' },
  weights: null,
  roles: {},
  interactions: [],
  method: 'ml',
  alpha: 0.5,
  lambdaRule: '1se',
  level: 0.95,
  maxIter: 50,
  fit: null,
  costs: { missedCase: 10, falseAlarm: 1 },
  costsSetByUser: false,
  threshold: 0.5,
  cutoffHow: 'cost-based',
  thresholdView: null,
  dropReport: null,
  costView: null,
  riskCurve: null,
  lossSurface: null,
  validation: null,
  imputed: null,
  validationStatus: 'idle',
  score: null,
  batch: null,
  external: null,
  reportText: {},
  oddsUnits: {},
  openedModel: null,
  monitor: initialMonitor,
  influence: initialInfluence,
  models: initialModels,
  savedAt: null,
  jobs: [],
  notices: [],
  nextNoticeId: 1,
};

export type { EngineWarning, ModelSpec, TermSpec };

/** The importer's options for the current settings. */
export function importOptionsOf(s: ImportSettings): ImportOptions {
  return {
    delimiter: s.delimiter,
    decimal: s.decimal,
    encoding: s.encoding,
    header: s.header === 'auto' ? 'auto' : s.header === 'yes',
    ...(s.sheet !== null ? { sheet: s.sheet } : {}),
    columnTypes: s.columnTypes,
  };
}
