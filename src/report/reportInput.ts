import type { EngineWarning } from '../engine/core';
import type { FitResult } from '../engine/core';
import type { CautionSetting } from './cautions';
import type { ExternalSummary } from './reportSectionExternal';
import type { MonitoringReport } from './reportSectionMonitoring';

/** An estimate with an optional interval (null where none can be given). */
export interface Estimate {
  estimate: number | null;
  lower: number | null;
  upper: number | null;
}

/** Performance at one level (apparent, or optimism-corrected by the bootstrap). */
export interface PerformanceSummary {
  auc: Estimate | null;
  calibrationSlope: Estimate | null;
  calibrationIntercept: Estimate | null;
  brier: Estimate | null;
  scaledBrier?: Estimate | null;
}

export interface RocPlotData {
  /** 1 − specificity and sensitivity, same length, ordered along the curve. */
  fpr: number[];
  tpr: number[];
  auc?: number;
}

export interface CalibrationPlotData {
  /** Predicted risk grid and the observed (recalibrated) risk with its pointwise band. */
  predicted: number[];
  observed: number[];
  lower?: number[];
  upper?: number[];
  /** Optional grouped points (e.g. tenths of risk): mean predicted vs observed proportion. */
  groups?: { predicted: number; observed: number }[];
}

export interface DecisionCurvePlotData {
  thresholds: number[];
  /** Net benefit of the model, of treating all and (implicitly 0) of treating none. */
  model: number[];
  treatAll: number[];
}

export interface ThresholdSummary {
  threshold: number;
  costMissedCase: number;
  costFalseAlarm: number;
  tp: number;
  fp: number;
  fn: number;
  tn: number;
  sensitivity: Estimate | number;
  specificity: Estimate | number;
  ppv: Estimate | number;
  npv: Estimate | number;
  fractionFlagged?: number;
  expectedCostPer100?: number;
  /** Likelihood ratios with their log-method CIs (null when undefined). */
  lrPositive?: { estimate: number | null; ci: { lower: number; upper: number } | null };
  lrNegative?: { estimate: number | null; ci: { lower: number; upper: number } | null };
  /** How the threshold was chosen, in words (e.g. "minimises expected cost"). */
  rule?: string;
  /** False when the costs are the default and nobody set them (the PDF says so); undefined means set. */
  costsSetByUser?: boolean;
}

export interface SampleSizeSummary {
  /** Minimum n from Riley et al. (2020) criteria, and which criterion binds. */
  requiredN: number | null;
  bindingCriterion?: string;
  /**
   * Criteria as label → required n, in the order to print, each with its own verdict on the data (null: not
   * assessed) and what falling short of it means ((i)/(ii) over-fitting, (iii) an imprecise overall risk).
   */
  criteria?: { label: string; n: number | null; met?: boolean | null; consequence?: string }[];
  assumedR2?: number | null;
  shrinkageTarget?: number | null;
  met: boolean | null;
}

/** What the PDF builder needs. Everything except `model`, `source` and `meta` may be omitted. */
/** The same model pooled over multiple imputations by Rubin's rules (a sensitivity analysis for missing values). */
export interface ImputationSummary {
  m: number;
  level: number;
  nRows: number;
  nImputedRows: number;
  columns: { column: string; cells: number; method: string }[];
  rows: {
    name: string;
    estimate: number;
    oddsRatio: number;
    lower: number | null;
    upper: number | null;
    p: number | null;
    fmi: number | null;
  }[];
}

export interface ReportInput {
  meta: {
    fulcraVersion: string;
    /** ISO date-time of the report. */
    created: string;
    seed: number | null;
    /** SHA-256 (hex) of the dataset, see datasetChecksum(). */
    dataChecksum: string;
    title?: string;
  };
  source: {
    fileName: string;
    rows: number;
    columns?: number;
    dateRange?: { column: string; from: string; to: string } | null;
  };
  /** User's free text (TRIPOD items 3–5: purpose, setting, population). */
  freeText?: { purpose?: string; setting?: string; population?: string; notes?: string };
  model: FitResult;
  /** How the outcome was laid out (a table of counts, frequency weights) and counted; absent: one case per row. */
  layout?: import('../engine/workflow').AnalysisRecord['layout'];
  /** How λ was chosen for penalised fits, in words (e.g. "10-fold cross-validation, minimum deviance"). */
  lambdaChoice?: string;
  /** How missing values were handled, in words (default: complete-case analysis). */
  missingData?: string;
  sampleSize?: SampleSizeSummary;
  apparent?: PerformanceSummary;
  /** Optimism-corrected point estimates; `optimism` holds the mean optimism with its 2.5–97.5% replicate range. */
  corrected?: PerformanceSummary & { optimism?: PerformanceSummary; method?: string; replicates?: number };
  /** Calibration-error summaries of the flexible curve (Austin & Steyerberg 2019, Stat Med 38:4051). */
  calibrationErrors?: { ici: number | null; e50: number | null; e90: number | null; emax: number | null };
  roc?: RocPlotData;
  calibration?: CalibrationPlotData;
  decisionCurve?: DecisionCurvePlotData;
  threshold?: ThresholdSummary;
  imputation?: ImputationSummary;
  /** The model checked on one file that was not used to fit it. */
  external?: ExternalSummary;
  /** Monitoring of later cases with a model (reportSectionMonitoring.ts). */
  monitoring?: MonitoringReport;
  /** Influential rows and the rows left out on request (reportSectionDiagnostics.ts). */
  diagnostics?: import('./reportSectionDiagnostics').DiagnosticsReport;
  /** Two kept models compared on the page, when a comparison was made (reportSectionComparison.ts). */
  comparison?: import('../engine/comparison').ModelComparison;
  /** Performance by subgroup of one column, when the user computed it (reportSectionSubgroups.ts). */
  subgroups?: import('../engine/subgroups').SubgroupPerformance;
  /** The bedside points score, when one was built (pointsCardPdf.ts: a section and the card page). */
  points?: import('../engine/workflow').PointsRecord;
  /** Warnings from evaluation, validation, imputation… (the fit's own warnings are read from `model`). */
  warnings?: EngineWarning[];
  /** Which cautions apply (default clinical); see src/report/cautions.ts. */
  cautionSetting?: CautionSetting;
  /** Odds ratios per these units, by numeric predictor (display only; absent = per 1). See oddsUnits.ts. */
  oddsUnits?: Record<string, number>;
}
