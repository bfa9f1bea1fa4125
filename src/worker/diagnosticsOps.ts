import { FulcraError } from '../engine/core';
import { topIndices, type DiagnosticsSummary } from '../engine/diagnostics';
import { requireRecord, type Session } from './session';

/** Points drawn in the two plots: every row up to this many; above it the most influential and an even sample. */
export const DIAGNOSTICS_PLOT_POINTS = 20_000;

/** The diagnostics view: the record's summary and the per-row points of the two plots (rows used, data order). */
export interface DiagnosticsView {
  summary: DiagnosticsSummary;
  /** Spreadsheet rows left out of this fit on request (empty: all rows). */
  leftOut: number[];
  rowsUsed: number;
  /** True when the plots show a subset of the rows (the top rows by Cook's distance always among them). */
  sampled: boolean;
  points: {
    sheetRow: Int32Array;
    dataRow: Int32Array;
    y: Float64Array;
    /** Leverage and Cook's distance; null where they do not apply to the method. */
    leverage: Float64Array | null;
    cooks: Float64Array | null;
    /** Standardised deviance residual (raw deviance residual where leverage does not apply). */
    residual: Float64Array;
  };
}

/** The per-row diagnostics of the current fit, shaped for the view (the arrays are copies, safe to transfer). */
export function diagnosticsView(s: Session): DiagnosticsView {
  const record = requireRecord(s);
  const held = s.diagnostics;
  if (!held || held.fit !== record.fit || !record.diagnostics) {
    throw new FulcraError('no-diagnostics', 'The diagnostics of this fit are not available.', 'Fit the model again.');
  }
  const d = held.rows;
  const n = d.y.length;
  let rows: number[] | null = null;
  if (n > DIAGNOSTICS_PLOT_POINTS) {
    const keep = new Set(topIndices(d.cooks ?? Float64Array.from(d.deviance, Math.abs), 2000));
    const step = n / (DIAGNOSTICS_PLOT_POINTS - keep.size);
    for (let x = 0; x < n; x += step) keep.add(Math.floor(x));
    rows = [...keep].sort((a, b) => a - b);
  }
  const pickF = (a: Float64Array) => (rows ? Float64Array.from(rows, (i) => a[i]) : a.slice());
  const pickI = (a: Int32Array) => (rows ? Int32Array.from(rows, (i) => a[i]) : a.slice());
  const residual = d.stdDeviance ?? d.deviance;
  return {
    summary: record.diagnostics,
    leftOut: record.request.leaveOut ?? [],
    rowsUsed: n,
    sampled: rows !== null,
    points: {
      sheetRow: pickI(d.sheetRows),
      dataRow: pickI(d.dataRows),
      y: pickF(d.y),
      leverage: d.leverage ? pickF(d.leverage) : null,
      cooks: d.cooks ? pickF(d.cooks) : null,
      residual: pickF(residual),
    },
  };
}
