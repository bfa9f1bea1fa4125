import { FulcraError, type Dataset } from '../engine/core';
import type { FitResult } from '../engine/core';
import type { PreparedThresholds } from '../engine/evaluation';
import type { AnalysisRecord } from '../engine/workflow';
import type { RowDiagnostics } from '../engine/diagnostics';
import type { ModelFile } from '../io/export';
import type { DataSummary, ImputedView, OpenedModelView } from './protocol';
import type { MonitoringState } from './monitorOps';

/** What the worker holds between calls: the data set and the current model. */
export interface Session {
  data: Dataset | null;
  summary: DataSummary | null;
  /** The current analysis (fit, evaluation, sample size, validations): what the page, the PDF and the api read. */
  record: AnalysisRecord | null;
  /** Outcome and apparent risks of the rows the model used. */
  y: Float64Array | null;
  risk: Float64Array | null;
  prepared: PreparedThresholds | null;
  /** The current model pooled over multiple imputations, when the page asked for it (for the PDF). */
  imputed: ImputedView | null;
  /** A model opened from a model file ("Open model"), kept beside the current fit; null when none. */
  opened: { view: OpenedModelView; file: ModelFile; fit: FitResult } | null;
  signals: Map<string, { aborted: boolean }>;
  /** The monitoring file and the last monitoring run (src/worker/monitorOps.ts); absent or null when none. */
  monitoring?: MonitoringState | null;
  /** Per-row leverage, residuals and influence of the fit they belong to (valid while that fit is the record's). */
  diagnostics?: { fit: FitResult; rows: RowDiagnostics } | null;
}

export function createSession(): Session {
  return {
    data: null,
    summary: null,
    record: null,
    y: null,
    risk: null,
    prepared: null,
    imputed: null,
    opened: null,
    signals: new Map(),
  };
}

export function requireData(s: Session): Dataset {
  if (!s.data) throw new FulcraError('no-data', 'No data are loaded.', 'Open a file or one of the invented demos.');
  return s.data;
}

export function requireRecord(s: Session): AnalysisRecord {
  if (!s.record) throw new FulcraError('no-model', 'No model has been fitted yet.', 'Fit a model first.');
  return s.record;
}

export function requireFit(s: Session): FitResult {
  return requireRecord(s).fit;
}

/** Registers a cancellable job and returns its signal. */
export function openJob(s: Session, jobId: string): { aborted: boolean } {
  const signal = { aborted: false };
  s.signals.set(jobId, signal);
  return signal;
}

export const tick = (): Promise<void> => new Promise((r) => setTimeout(r, 0));
