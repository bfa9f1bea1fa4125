/**
 * Monitoring later cases with a model (issue 15), as named actions: the model file opened on the page, the
 * monitoring file and its column choices, the result and the recalibration on the latest periods. A result
 * carries the model, the file and the choices it was computed for; `isMonitorStale` compares them with now.
 */
import type { RecalibrationOnPeriods } from '../engine/monitoring';
import type { OpenedModelView } from '../worker/protocol';
import { withWarnings } from './actions';
import type { AppState } from './appState';
import {
  initialMonitor,
  type MonitorFile,
  type MonitorResult,
  type MonitorSettings,
  type MonitorState,
} from './monitorState';
import { isStale } from './stale';

export {
  initialMonitor,
  type MonitorFile,
  type MonitorModel,
  type MonitorResult,
  type MonitorSettings,
  type MonitorState,
} from './monitorState';

type Perform<I> = (state: AppState, input: I) => AppState;

const withMonitor = (s: AppState, m: Partial<MonitorState>): AppState => ({ ...s, monitor: { ...s.monitor, ...m } });

/** A model file was opened: it is kept and becomes the model that monitors. */
export const modelOpened: Perform<OpenedModelView> = (s, view) =>
  withMonitor({ ...s, openedModel: view }, { settings: { ...s.monitor.settings, model: 'model-file' } });

/** The opened model is put away: monitoring goes back to the current fit. */
export const modelClosed: Perform<void> = (s) =>
  withMonitor({ ...s, openedModel: null }, { settings: { ...s.monitor.settings, model: 'current-fit' } });

/** The engine was restarted empty: the opened model file and the monitoring file (and results on them) are gone. */
export const engineEmptied: Perform<void> = (s) =>
  s.openedModel || s.monitor.file || s.monitor.result
    ? {
        ...s,
        openedModel: null,
        monitor: { ...initialMonitor, settings: { ...s.monitor.settings, model: 'current-fit' } },
      }
    : s;

/** A monitoring file was read: its proposed date and unit columns are chosen (the user may change them). */
export const monitorFileLoaded: Perform<MonitorFile> = (s, file) =>
  withMonitor(s, {
    file,
    settings: { ...s.monitor.settings, dateColumn: file.suggested.dateColumn, unitColumn: file.suggested.unitColumn },
    result: null,
    recalibration: null,
  });

/** One or more monitoring choices changed (the result, if any, is then out of date until run again). */
export const setMonitorSettings: Perform<Partial<MonitorSettings>> = (s, settings) => {
  const next = { ...s.monitor.settings, ...settings };
  if (!(Number.isFinite(next.targetArl0) && next.targetArl0 >= 10 && next.targetArl0 <= 1e7)) return s;
  if (next.model === 'model-file' && !s.openedModel) return s;
  return withMonitor(s, { settings: next });
};

export const monitorDone: Perform<MonitorResult> = (s, result) =>
  withWarnings(withMonitor(s, { result, recalibration: null }), result.record.warnings);

export const setRecalPeriods: Perform<number> = (s, n) =>
  Number.isInteger(n) && n >= 1 && n <= 120 ? withMonitor(s, { recalPeriods: n }) : s;

export const recalibrationDone: Perform<RecalibrationOnPeriods> = (s, recalibration) =>
  withWarnings(withMonitor(s, { recalibration }), recalibration.warnings);

const sameSettings = (a: MonitorSettings, b: MonitorSettings): boolean =>
  (Object.keys(a) as (keyof MonitorSettings)[]).every((k) => a[k] === b[k]);

/** The model monitoring would use now, or the reason there is none. */
export function monitorModelProblem(s: AppState): string | null {
  if (s.monitor.settings.model === 'model-file') return s.openedModel ? null : 'Open a model file first.';
  if (!s.fit) return 'Fit a model, or open a model file, first.';
  if (isStale(s)) return 'The model settings changed after the fit: refit, or monitor with an opened model file.';
  return null;
}

/**
 * True when a monitoring result is shown but it was computed for another model (a newer fit, changed model
 * settings, another opened file), another monitoring file or other choices.
 */
export function isMonitorStale(s: AppState): boolean {
  const r = s.monitor.result;
  if (!r) return false;
  const now = s.monitor.settings;
  if (!sameSettings(now, r.ranFor.settings)) return true;
  if (s.monitor.file?.id !== r.ranFor.fileId) return true;
  if (now.model === 'model-file') return s.openedModel?.id !== r.ranFor.openedId;
  return s.fit !== r.ranFor.fit || isStale(s);
}
