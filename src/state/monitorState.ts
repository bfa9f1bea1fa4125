/** The shape of the monitoring state (kept apart from its actions so that appState.ts can import it plainly). */
import type { MonitoringRecord, RecalibrationOnPeriods } from '../engine/monitoring';
import type { MonitoringFileView } from '../worker/monitorOps';
import type { FitView } from '../worker/protocol';

/** The monitoring file the worker holds, as the page shows it, with an id unique on this page (for staleness). */
export type MonitorFile = MonitoringFileView & { id: number };

/** Which model monitors: the current fit, or the model file opened on the page. */
export type MonitorModel = 'current-fit' | 'model-file';

export interface MonitorSettings {
  model: MonitorModel;
  dateColumn: string | null;
  unitColumn: string | null;
  period: 'month' | 'quarter';
  /** Target in-control average run length (cases) that sets the CUSUM limits. */
  targetArl0: number;
  overdispersion: boolean;
}

export interface MonitorResult {
  record: MonitoringRecord;
  /** What the record was computed for: the model (the fit shown then, or the opened file's id), file and choices. */
  ranFor: { settings: MonitorSettings; fit: FitView | null; openedId: number | null; fileId: number };
}

export interface MonitorState {
  file: MonitorFile | null;
  settings: MonitorSettings;
  result: MonitorResult | null;
  /** How many of the latest periods the recalibration uses, and its result (for the result shown). */
  recalPeriods: number;
  recalibration: RecalibrationOnPeriods | null;
}

export const initialMonitor: MonitorState = {
  file: null,
  settings: {
    model: 'current-fit',
    dateColumn: null,
    unitColumn: null,
    period: 'month',
    targetArl0: 5000,
    overdispersion: false,
  },
  result: null,
  recalPeriods: 3,
  recalibration: null,
};
