// Here in core, not in monitoring/, because the page lists signals: core's index is light, while monitoring's index
// brings the distribution functions (and their CommonJS start-up code) into the page bundle.
import type { CusumChart, CusumSignal, MonitoringRecord } from '../monitoring/types';

/** One signal of a CUSUM: which chart, and the cases it was run on (all cases, or one unit's own). */
export interface SignalLine {
  chart: 'deterioration' | 'improvement';
  /** null: the chart over all cases; otherwise the unit whose own chart signalled (`s.case` counted within it). */
  unit: string | null;
  s: CusumSignal;
}

const chartName = (c: CusumChart): SignalLine['chart'] =>
  c.direction === 'deteriorate' ? 'deterioration' : 'improvement';

/** The signals of the two charts over all cases, in case order (page, PDF, CSV). */
export function overallSignals(r: MonitoringRecord): SignalLine[] {
  return [r.cusum.deteriorate, r.cusum.improve]
    .flatMap((c) => c.signals.map((s) => ({ chart: chartName(c), unit: null, s })))
    .sort((a, b) => a.s.case - b.s.case);
}

/**
 * The signals of the charts run on each unit's own cases (same h), in date order, then unit and chart; empty
 * without a unit column. A ward whose cases are a small share of the whole can signal on its own chart long before
 * (or without) the chart over all cases signalling (page, PDF, CSV and `npm run fit` list both).
 */
export function unitSignals(r: MonitoringRecord): SignalLine[] {
  return [r.cusum.deteriorate, r.cusum.improve]
    .flatMap((c) => (c.byUnit ?? []).flatMap((u) => u.signals.map((s) => ({ chart: chartName(c), unit: u.unit, s }))))
    .sort((a, b) => a.s.date - b.s.date || a.unit!.localeCompare(b.unit!) || a.chart.localeCompare(b.chart));
}
