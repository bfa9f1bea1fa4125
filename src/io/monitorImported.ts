import { warning } from '../engine/core';
import type { Dataset } from '../engine/core';
import type { MonitoringCases, MonitoringOptionsInput, MonitoringRecord } from '../engine/monitoring';
import { monitorScored, type MonitoringModel } from '../engine/workflow';
import { monitoringDates } from './monitoringDates';
import type { ColumnInfo } from './types';

/**
 * Monitoring of an imported file (or an invented demo file) with `model`: reads the date column as dates
 * (monitoringDates), then the engine's monitorScored. The one path the worker and `npm run fit --monitor` share,
 * so both print the same record. `columns` are the importer's column types (null for a demo dataset).
 */
export function monitorImported(
  model: MonitoringModel,
  file: { dataset: Dataset; columns: ColumnInfo[] | null },
  options: MonitoringOptionsInput,
): { record: MonitoringRecord; cases: MonitoringCases } {
  const dates = monitoringDates(file.dataset, file.columns, options.dateColumn);
  const out = monitorScored(model, file.dataset, dates.days, null, options);
  if (dates.how === 'spreadsheet-serial')
    out.record.warnings.push(
      warning(
        'dates-as-serial-numbers',
        `Column "${options.dateColumn}" holds numbers; they were read as spreadsheet serial dates ` +
          `(${out.record.dateRange.firstLabel} to ${out.record.dateRange.lastLabel}).`,
        'If these are not dates, choose the column that holds each case’s date.',
      ),
    );
  if (dates.unreadable > 0)
    out.record.warnings.push(
      warning(
        'dates-unreadable',
        `${dates.unreadable} cells of "${options.dateColumn}" are not dates; those rows were not monitored ` +
          '(listed as missing-date).',
        'Write the dates as YYYY-MM-DD or day/month/year.',
      ),
    );
  return out;
}
