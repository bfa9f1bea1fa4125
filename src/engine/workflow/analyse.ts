import { FulcraError, sheetRow, type Dataset } from '../core/data';
import type { FitResult } from '../core/model';
import { warning, type EngineWarning } from '../core/warnings';
import { linearPredictorFromRecipe } from '../design/design';
import { caseRows, saturatedDeviance, type CaseRows, type LayoutRecord } from '../design/grouped';
import { patternFit, type PatternFit } from '../evaluation/patternFit';
import { diagnose, leaveRowsOut, type DiagnosticsSummary, type RowDiagnostics } from '../diagnostics';
import { evaluate, type EvaluationRecord } from '../evaluation/evaluate';
import type { SampleSizeResult } from '../evaluation/sampleSize';
import type { PreparedThresholds } from '../evaluation/threshold';
import { sigmoid } from '../numerics/loss';
import type { LongRunHooks } from '../penalised/crossValidation';
import { bootstrapValidation, repeatedCrossValidation, type InternalValidation } from '../validation/bootstrap';
import { externalValidation, type ExternalValidation } from '../validation/externalValidation';
import { sharedCases, sharedCasesWarning } from '../validation/sharedCases';
import { fitStep, pipelineOf, type FitStep, type LambdaRecord } from './fitStep';
import { resolveRequest, type AnalysisRequest, type AnalysisRequestInput } from './request';
import { sampleSizeCheck } from './sampleSizeStep';

/** An evaluation record as it is kept: without the threshold structure (rebuilt from the risks when needed). */
export type EvaluationSummary = Omit<EvaluationRecord, 'prepared'>;

/** External validation as it is kept: no per-row arrays. */
export type ExternalRecord = Omit<ExternalValidation, 'evaluation' | 'y' | 'eta' | 'risk' | 'rowsUsed'> & {
  evaluation: EvaluationSummary;
  /** Cases of the file that are also development cases (same outcome and linear predictor); null if not checked. */
  developmentCasesShared: number | null;
};

/**
 * One analysis, as a plain structured-clone-safe record: what the page shows, the PDF prints and
 * `npm run fit --json` writes.
 */
export interface AnalysisRecord {
  /** The request as run, defaults filled in. */
  request: AnalysisRequest;
  /** Every method in the FitResult shape (lasso / elastic net: inference fields null). */
  fit: FitResult;
  /** Ridge, lasso, elastic net: how λ was set, with the CV path. */
  lambda: LambdaRecord | null;
  /** Apparent performance on the rows used. */
  evaluation: EvaluationSummary;
  sampleSize: SampleSizeResult | null;
  /** Why the sample-size check could not be computed, or null. */
  sampleSizeNote: string | null;
  validation: InternalValidation | null;
  external: ExternalRecord | null;
  /** The fit's, the method decisions' and the apparent evaluation's warnings, each once. */
  warnings: EngineWarning[];
  /**
   * Leverage, residuals and influence summarised: the top rows by spreadsheet row number, the reference lines and
   * their rules, which measures apply to the method, warnings naming rows. The per-row arrays are not kept here
   * (runAnalysis returns them; the worker's diagnostics query and `npm run fit --diagnostics` give them). Absent in
   * records made before diagnostics existed.
   */
  diagnostics?: DiagnosticsSummary | null;
  /**
   * The outcome layout (yes/no per row, events and trials, events and non-events; frequency weights), the cases it
   * stands for, both deviance conventions and goodness of fit by covariate pattern. Absent in older records.
   */
  layout?: LayoutRecord & { goodnessOfFit: PatternFit | null };
}

/** The apparent predictions behind the record (per row used), for callers that query cut-offs later. */
export interface ApparentScores {
  y: Float64Array;
  /** Frequency weights of the rows (cases each stands for), or null: one case per row. */
  weights: Float64Array | null;
  eta: Float64Array;
  risk: Float64Array;
  rowsUsed: Int32Array;
  prepared: PreparedThresholds;
}

const strip = (e: EvaluationRecord): EvaluationSummary => {
  const { prepared: _prepared, ...rest } = e;
  return rest;
};

function dedupe(ws: EngineWarning[]): EngineWarning[] {
  return ws.filter((w, i) => ws.findIndex((u) => u.code === w.code && u.message === w.message) === i);
}

/** The fitted model's risks on its own rows, evaluated with the request's level, curve points, costs and cut-off. */
export function apparentEvaluation(
  data: Dataset,
  f: FitResult,
  r: AnalysisRequest,
): { evaluation: EvaluationRecord; scores: ApparentScores } {
  const d = linearPredictorFromRecipe(
    f.recipe,
    f.coefficients.map((c) => c.estimate),
    data,
  );
  if (!d.y) throw new FulcraError('no-outcome', `The outcome column "${f.recipe.outcome}" is missing.`);
  const risk = new Float64Array(d.eta.length);
  for (let i = 0; i < risk.length; i++) risk[i] = sigmoid(d.eta[i]);
  const evaluation = evaluate(d.y, risk, {
    weights: d.weights ?? undefined,
    eta: d.eta,
    level: r.level,
    rocPoints: r.rocPoints,
    costs: r.costs ?? undefined,
    threshold: r.threshold ?? undefined,
  });
  const scores = { y: d.y, weights: d.weights, eta: d.eta, risk, rowsUsed: d.rowsUsed, prepared: evaluation.prepared! };
  return { evaluation, scores };
}

/**
 * Internal validation of the request's whole procedure (λ selection included when penalised): bootstrap
 * optimism (Efron 1983; Harrell, Lee & Mark 1996) or repeated stratified CV, as `request.validation` says.
 */
export async function internalValidation(
  data: Dataset,
  request: AnalysisRequestInput,
  hooks?: LongRunHooks,
): Promise<InternalValidation> {
  const r = resolveRequest(request);
  const v = r.validation;
  if (!v) throw new FulcraError('bad-request', 'The request asks for no internal validation (validation is null).');
  const rows = analysedRows(data, r);
  const pipeline = pipelineOf(rows.data, rows.request);
  return v.method === 'bootstrap'
    ? bootstrapValidation(pipeline, { B: v.replicates, seed: v.seed }, hooks)
    : repeatedCrossValidation(pipeline, { folds: v.folds, repeats: v.repeats, seed: v.seed }, hooks);
}

/**
 * The record's model applied unchanged to a second dataset with known outcomes (evaluated with the request's
 * level, curve points, costs and cut-off), with logistic recalibration (Steyerberg 2019). Given the development
 * data, a file that holds all or some of its cases says so in a warning: that is not an external validation.
 */
export function externalValidationStep(
  record: Pick<AnalysisRecord, 'fit' | 'request'>,
  data: Dataset,
  development?: Dataset,
): ExternalRecord {
  const r = record.request;
  data = caseRows(data, r.spec).data;
  if (development) development = caseRows(development, r.spec).data;
  const ext = externalValidation(record.fit, data, {
    level: r.level,
    rocPoints: r.rocPoints,
    costs: r.costs ?? undefined,
    threshold: r.threshold ?? undefined,
  });
  const { evaluation, y: _y, eta: _eta, risk: _risk, rowsUsed: _rows, ...rest } = ext;
  const out: ExternalRecord = { ...rest, evaluation: strip(evaluation), developmentCasesShared: null };
  if (development) {
    const overlap = sharedCases(record.fit, development, data);
    out.developmentCasesShared = overlap.shared;
    const shared = sharedCasesWarning(overlap, ext.nUsed);
    if (shared) out.warnings = [shared, ...out.warnings];
  }
  return out;
}

/** The rows an analysis runs on, as the engine fits them. */
export interface AnalysedRows {
  /**
   * `data` without the request's left-out rows (a copy; `data` is not changed) and, for a grouped table, written as
   * weighted case rows (events and non-events of each table row; design/grouped.ts).
   */
  data: Dataset;
  /** The index in `data` (as given) of each row fitted; null when they are the same rows. */
  index: Int32Array | null;
  /** The request with the specification the engine fits (0/1 outcome, frequency weights). */
  request: AnalysisRequest;
  cases: CaseRows;
}

/** The rows an analysis runs on: left-out rows removed, then the outcome layout turned into weighted case rows. */
export function analysedRows(data: Dataset, r: AnalysisRequest): AnalysedRows {
  let kept = data;
  let index: Int32Array | null = null;
  if (r.leaveOut.length > 0) {
    const wanted = new Set(r.leaveOut);
    kept = leaveRowsOut(data, r.leaveOut);
    index = new Int32Array(kept.nRows);
    let k = 0;
    for (let i = 0; i < data.nRows; i++) if (!wanted.has(sheetRow(data, i))) index[k++] = i;
  }
  const cases = caseRows(kept, r.spec);
  if (cases.source) {
    const inner = cases.source;
    const outer = index;
    index = outer ? Int32Array.from(inner, (i) => outer[i]) : Int32Array.from(inner);
  }
  return { data: cases.data, index, request: { ...r, spec: cases.spec }, cases };
}

/**
 * The layout part of the record: cases, events, both deviance conventions and fit by covariate pattern (`scores`
 * with rowsUsed indexing `all`, the data as given).
 */
function layoutRecord(rows: AnalysedRows, f: FitResult, scores: ApparentScores, all: Dataset) {
  const { cases } = rows;
  const k = f.coefficients.filter((c) => !c.aliased).length;
  let deviance: LayoutRecord['deviance'] = null;
  if (cases.table && f.method !== 'lasso' && f.method !== 'elastic-net') {
    const saturated = saturatedDeviance(cases.table.events, cases.table.trials);
    deviance = {
      perCase: f.deviance,
      grouped: f.deviance - saturated,
      groupedDf: cases.table.rows.length - k,
      saturated,
    };
  }
  const weighted = scores.weights !== null;
  const goodnessOfFit = weighted ? patternFit(all, f, scores) : null;
  return {
    ...cases.layout,
    tableRowsUsed: cases.layout.tableRowsUsed ?? f.rowsFitted ?? f.nUsed,
    cases: f.nUsed,
    events: f.events,
    nonEvents: f.nonEvents,
    deviance,
    goodnessOfFit,
  };
}

function leftOutWarning(r: AnalysisRequest): EngineWarning {
  const rows = r.leaveOut;
  return warning(
    'rows-left-out',
    `${rows.length === 1 ? 'One row was' : `${rows.length} rows were`} left out of this analysis on request ` +
      `(spreadsheet row${rows.length === 1 ? '' : 's'} ${rows.join(', ')}); the data themselves are unchanged.`,
    'Compare the odds ratios with the fit on all rows; clear the list to fit all rows again.',
  );
}

/**
 * analyse() with the apparent per-row scores the page keeps for its cut-off queries, and the per-row diagnostics
 * (leverage, residuals, influence) behind the record's summary. Row indices refer to `data` as given, also when
 * the request leaves rows out.
 * `fitted`: the fit step of an earlier run of the same request on the same data (an engine restarted after a crash
 * gets back the model it held without fitting again; everything after the fit is computed afresh).
 */
export async function runAnalysis(
  data: Dataset,
  request: AnalysisRequestInput,
  hooks?: LongRunHooks,
  testData?: Dataset,
  fitted?: FitStep,
): Promise<{ record: AnalysisRecord; scores: ApparentScores; diagnostics: RowDiagnostics }> {
  const r = resolveRequest(request);
  const all = data;
  const rows = analysedRows(all, r);
  data = rows.data;
  const step = fitted ?? (await fitStep(data, rows.request, hooks));
  const layout = r.spec.layout;
  if (layout && layout.kind !== 'binary') step.fit.recipe.layout = layout;
  const { evaluation, scores } = apparentEvaluation(data, step.fit, r);
  const diag = diagnose(step.fit, data);
  if (rows.index) {
    const index = rows.index;
    scores.rowsUsed = scores.rowsUsed.map((i) => index[i]);
    diag.rows.dataRows = diag.rows.dataRows.map((i) => index[i]);
    for (const t of diag.summary.top) t.dataRow = index[t.dataRow];
  }
  const size = sampleSizeCheck(step.fit);
  const record: AnalysisRecord = {
    request: r,
    fit: step.fit,
    lambda: step.lambda,
    evaluation: strip(evaluation),
    sampleSize: size.result,
    sampleSizeNote: size.note,
    validation: null,
    external: null,
    warnings: dedupe([
      ...(r.leaveOut.length > 0 ? [leftOutWarning(r)] : []),
      ...rows.cases.warnings,
      ...step.fit.warnings,
      ...step.warnings,
      ...evaluation.warnings,
    ]),
    diagnostics: diag.summary,
    layout: layoutRecord(rows, step.fit, scores, all),
  };
  for (const w of record.layout?.goodnessOfFit?.warnings ?? []) record.warnings.push(w);
  if (r.validation) record.validation = await internalValidation(all, r, hooks);
  if (testData) record.external = externalValidationStep(record, testData, data);
  return { record, scores, diagnostics: diag.rows };
}

/**
 * One analysis of `data`: decides the method and fits it (fitStep), evaluates the apparent performance,
 * checks the sample size (Riley et al. 2020), runs the internal validation the request asks for and, when
 * `testData` is given, the external validation. The only place that assembles an analysis: the page (through
 * the worker) and `npm run fit` both call it, so both give the same record.
 */
export async function analyse(
  data: Dataset,
  request: AnalysisRequestInput,
  hooks?: LongRunHooks,
  testData?: Dataset,
): Promise<AnalysisRecord> {
  return (await runAnalysis(data, request, hooks, testData)).record;
}
