import { FulcraError, type Dataset } from '../engine/core';
import type { FitResult } from '../engine/core';
import type { InternalValidation } from '../engine/validation';
import type { EvaluationRecord } from '../engine/evaluation';
import type { SampleSizeResult } from '../engine/evaluation';
import type { PreparedThresholds } from '../engine/evaluation';
import type { DataSummary, FitRequest, ImputedView } from './protocol';

/** What the worker holds between calls: the data set and the current model. */
export interface Session {
  data: Dataset | null;
  summary: DataSummary | null;
  fit: FitResult | null;
  request: FitRequest | null;
  /** Outcome and apparent risks of the rows the model used. */
  y: Float64Array | null;
  risk: Float64Array | null;
  prepared: PreparedThresholds | null;
  /** The engine's records behind the current model's views (for the model-summary PDF). */
  evaluation: EvaluationRecord | null;
  validation: InternalValidation | null;
  sampleSize: SampleSizeResult | null;
  /** The current model pooled over multiple imputations, when the page asked for it (for the PDF). */
  imputed: ImputedView | null;
  signals: Map<string, { aborted: boolean }>;
}

export function createSession(): Session {
  return {
    data: null,
    summary: null,
    fit: null,
    request: null,
    y: null,
    risk: null,
    prepared: null,
    evaluation: null,
    validation: null,
    sampleSize: null,
    imputed: null,
    signals: new Map(),
  };
}

export function requireData(s: Session): Dataset {
  if (!s.data) throw new FulcraError('no-data', 'No data are loaded.', 'Open a file or one of the invented demos.');
  return s.data;
}

export function requireFit(s: Session): FitResult {
  if (!s.fit) throw new FulcraError('no-model', 'No model has been fitted yet.', 'Fit a model first.');
  return s.fit;
}

/** Registers a cancellable job and returns its signal. */
export function openJob(s: Session, jobId: string): { aborted: boolean } {
  const signal = { aborted: false };
  s.signals.set(jobId, signal);
  return signal;
}

export const tick = (): Promise<void> => new Promise((r) => setTimeout(r, 0));
