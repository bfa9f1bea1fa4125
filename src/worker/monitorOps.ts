/**
 * Risk-adjusted monitoring in the worker: a monitoring file (or the invented demo year) is read and kept, then
 * monitored with the current fit or the opened model file through the one io path `monitorImported` that
 * `npm run fit --monitor` uses; the scored cases are kept for "recalibrate on the latest periods".
 */
import { FulcraError, type Dataset } from '../engine/core';
import { generateSsiMonitoring } from '../engine/demo';
import {
  recalibrateOnPeriods,
  type MonitoringCases,
  type MonitoringOptionsInput,
  type MonitoringRecord,
  type RecalibrationOnPeriods,
} from '../engine/monitoring';
import type { MonitoringModel } from '../engine/workflow';
import { monitorImported } from '../io';
import type { ColumnInfo, ColumnType, ImportResult } from '../io/types';
import type { Session } from './session';

/** The monitoring file the worker holds, as the page shows it before monitoring (column choice). */
export interface MonitoringFileView {
  fileName: string;
  /** Says plainly that the data are invented (the demo year), else null. */
  notice: string | null;
  rows: number;
  columns: { name: string; type: ColumnType | 'text' }[];
  /** Columns that can hold dates (date-typed, date text, numbers), best first; the demo's date column first. */
  dateCandidates: string[];
  /** Columns that can name a unit (categorical or whole-number with few values), the demo's ward first. */
  unitCandidates: string[];
  /** The choice the page should start with (the demo's columns, or the first candidates). */
  suggested: { dateColumn: string | null; unitColumn: string | null };
}

/** What the session keeps for monitoring. */
export interface MonitoringState {
  file: { name: string; dataset: Dataset; columns: ColumnInfo[] | null; notice: string | null };
  last: { record: MonitoringRecord; cases: MonitoringCases; model: MonitoringModel } | null;
}

const DATE_TEXT = /^\d{4}[-/]\d{1,2}[-/]\d{1,2}|^\d{1,2}[/.-]\d{1,2}[/.-]\d{2,4}$|^\d{1,2}[ -][A-Za-z]{3,9}/;

function fileView(m: MonitoringState['file'], suggested?: MonitoringFileView['suggested']): MonitoringFileView {
  const { dataset, columns } = m;
  const typeOf = (k: number): ColumnType | 'text' =>
    columns?.[k]?.type ?? (dataset.columns[k].kind === 'numeric' ? 'numeric' : 'categorical');
  const dateCandidates: string[] = [],
    unitCandidates: string[] = [];
  dataset.columns.forEach((c, k) => {
    const t = typeOf(k);
    if (t === 'date' || (c.kind === 'categorical' && c.levels.length > 0 && DATE_TEXT.test(c.levels[0])))
      dateCandidates.push(c.name);
    if (c.kind === 'categorical' && c.levels.length >= 2 && c.levels.length <= 500 && !dateCandidates.includes(c.name))
      unitCandidates.push(c.name);
  });
  return {
    fileName: m.name,
    notice: m.notice,
    rows: dataset.nRows,
    columns: dataset.columns.map((c, k) => ({ name: c.name, type: typeOf(k) })),
    dateCandidates,
    unitCandidates,
    suggested: suggested ?? { dateColumn: dateCandidates[0] ?? null, unitColumn: unitCandidates[0] ?? null },
  };
}

/** Keeps an imported file as the monitoring file. */
export function openMonitoringFile(s: Session, imported: ImportResult, name: string): MonitoringFileView {
  s.monitoring = { file: { name, dataset: imported.dataset, columns: imported.columns, notice: null }, last: null };
  return fileView(s.monitoring.file);
}

/** Keeps the invented second year of the hospital's operations (generateSsiMonitoring) as the monitoring file. */
export function loadDemoMonitoring(s: Session): MonitoringFileView {
  const demo = generateSsiMonitoring();
  s.monitoring = {
    file: { name: demo.title, dataset: demo.dataset, columns: null, notice: demo.notice },
    last: null,
  };
  return fileView(s.monitoring.file, { dateColumn: demo.dateColumn, unitColumn: demo.unitColumn });
}

/** The model to monitor with: the current fit, or the model file opened beside it. */
function monitoringModel(s: Session, source: MonitoringModel['source']): MonitoringModel {
  if (source === 'model-file') {
    if (!s.opened)
      throw new FulcraError(
        'no-model-file',
        'No model file is open.',
        'Open a Fulcra model file, or use the current fit.',
      );
    return { ...s.opened.fit, source, name: s.opened.view.fileName };
  }
  if (!s.record)
    throw new FulcraError(
      'no-model',
      'No model has been fitted yet, so there is nothing to monitor with.',
      'Fit a model, or open a model file.',
    );
  return { ...s.record.fit, source, name: 'current fit' };
}

/** Monitors the kept monitoring file with the chosen model; the record is what the page, PDF and CLI show. */
export function monitor(
  s: Session,
  options: MonitoringOptionsInput,
  source: MonitoringModel['source'],
): MonitoringRecord {
  if (!s.monitoring)
    throw new FulcraError(
      'no-monitoring-file',
      'No monitoring file is open.',
      'Open a file of later cases with their outcome and date, or the invented demo year.',
    );
  const model = monitoringModel(s, source);
  const { record, cases } = monitorImported(model, s.monitoring.file, options);
  s.monitoring.last = { record, cases, model };
  return record;
}

/** Recalibrates the monitored model on the latest `periods` periods of the last monitoring run. */
export function recalibrateMonitored(s: Session, periods: number): RecalibrationOnPeriods {
  const last = s.monitoring?.last;
  if (!last) throw new FulcraError('no-monitoring', 'Nothing has been monitored yet.', 'Run the monitoring first.');
  return recalibrateOnPeriods(last.model, last.cases, last.record.options.period, {
    periods,
    level: last.record.options.level,
  });
}
