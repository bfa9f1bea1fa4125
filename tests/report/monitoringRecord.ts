// A real monitoring record for the page/PDF/CSV tests: the invented SSI demo's model (fit()) applied to a second,
// independently seeded invented registry with made-up dates over 2025 and four units, one of them named like a
// spreadsheet formula (to test the CSV's escaping). Computed by the engine (scoreMonitoring + monitorCases).
import { generateDemo, generateSsiRegistry } from '../../src/engine/demo';
import { fit } from '../../src/engine/fitting/fit';
import {
  monitorCases,
  recalibrateOnPeriods,
  resolveMonitoringOptions,
  scoreMonitoring,
  type MonitoringRecord,
  type MonitoringOptionsInput,
  type RecalibrationOnPeriods,
} from '../../src/engine/monitoring';
import type { FitResult } from '../../src/engine/core/model';

export const UNIT_NAMES = ['Ward 1', 'Ward 2', '=HYPERLINK("http://x")', 'Ward 4'];
/** 2025-01-01 as days since 1970-01-01. */
export const FIRST_DAY = Date.UTC(2025, 0, 1) / 86_400_000;

let model: FitResult | null = null;
export function demoModel(): FitResult {
  if (!model) {
    const demo = generateDemo('ssi');
    model = fit(demo.dataset, demo.spec, { profile: false });
  }
  return model;
}

export function monitoringRecord(options: Partial<MonitoringOptionsInput> = {}): {
  record: MonitoringRecord;
  recalibration: RecalibrationOnPeriods;
} {
  const m = demoModel();
  const later = generateSsiRegistry(1200, 4242).dataset;
  const n = later.nRows;
  const dates = Float64Array.from({ length: n }, (_, i) => FIRST_DAY + Math.floor((i * 365) / n));
  const units = { codes: Int32Array.from({ length: n }, (_, i) => i % 4), levels: UNIT_NAMES };
  const o = resolveMonitoringOptions({
    dateColumn: 'date',
    unitColumn: 'ward',
    targetArl0: 500,
    simulationRuns: 40,
    ...options,
  });
  const { cases, summary } = scoreMonitoring(m, later, dates, o.unitColumn === null ? null : units);
  const record = monitorCases(
    cases,
    o,
    { source: 'current-fit', name: 'current fit', outcome: m.recipe.outcome, event: m.recipe.event },
    summary,
  );
  const recalibration = recalibrateOnPeriods(m, cases, o.period, { periods: 3 });
  return { record, recalibration };
}
