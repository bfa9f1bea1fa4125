import type { Dataset } from '../core/data';
import {
  monitorCases,
  resolveMonitoringOptions,
  scoreMonitoring,
  type MonitoringCases,
  type MonitoringModelInfo,
  type MonitoringOptionsInput,
  type MonitoringRecord,
  type UnitCodes,
  unitsFromColumn,
} from '../monitoring';
import { writeOutCounts } from '../monitoring/writeOutCounts';
import type { ScoringModel } from '../validation/recalibration';

/** A model to monitor with: anything that scores (a fit or a model file's coefficients) and where it came from. */
export interface MonitoringModel extends ScoringModel {
  source: MonitoringModelInfo['source'];
  name: string;
}

/**
 * Risk-adjusted monitoring of a later file of cases with `model` (unchanged): scores the rows (listing those that
 * cannot be scored), orders them by date, and builds the one MonitoringRecord that the page, the PDF and
 * `npm run fit -- --monitor FILE --json` show. `dates` are epoch days per data row (NaN where missing; the io
 * layer's `monitoringDates` reads date columns, spreadsheet serial dates and date text); `units` the unit per row
 * (`unitsFromColumn`; null: read from options.unitColumn when set). `monitorScored` also returns the scored
 * cases for `recalibrateOnPeriods`.
 */
export function monitorScored(
  model: MonitoringModel,
  data: Dataset,
  dates: Float64Array,
  units: UnitCodes | null,
  options: MonitoringOptionsInput,
): { record: MonitoringRecord; cases: MonitoringCases } {
  const o = resolveMonitoringOptions(options);
  let u = units ?? (o.unitColumn !== null ? unitsFromColumn(data, o.unitColumn) : null);
  const layout = model.recipe.layout;
  let written: ReturnType<typeof writeOutCounts> | null = null;
  if (layout && layout.kind !== 'binary') {
    // a table of counts (ward-months): one row per case, so that every chart counts cases
    written = writeOutCounts(data, model.recipe.outcome, layout, dates, u);
    ({ data, dates, units: u } = written);
  }
  const { cases, summary } = scoreMonitoring(model, data, dates, u, { date: o.dateColumn, unit: o.unitColumn });
  const info: MonitoringModelInfo = {
    source: model.source,
    name: model.name,
    outcome: model.recipe.outcome,
    event: model.recipe.event,
  };
  const record = monitorCases(cases, o, info, summary);
  if (written) record.warnings.unshift(...written.warnings);
  return { record, cases };
}

/** monitorScored's record alone. */
export function monitorStep(
  model: MonitoringModel,
  data: Dataset,
  dates: Float64Array,
  units: UnitCodes | null,
  options: MonitoringOptionsInput,
): MonitoringRecord {
  return monitorScored(model, data, dates, units, options).record;
}
