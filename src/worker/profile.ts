import { sheetRow, type Column, type Dataset } from '../engine/core';
import { summarizeNumbers } from '../io/numericSummary';
import { profileColumn as ioProfileColumn } from '../io/profile';
import type { ColumnProfile } from '../io/types';
import type { ColumnView, RowsWindow } from './protocol';

/** At most this many levels travel to the page (for reference-level and scoring choices). */
export const MAX_LEVELS = 200;

/** The header bins of an io profile: its histogram, or its most frequent levels. */
export function viewBins(p: ColumnProfile): { label: string; count: number }[] {
  const h = p.histogram;
  if (h) return h.counts.map((count, b) => ({ label: `${fmt(h.edges[b])}–${fmt(h.edges[b + 1])}`, count }));
  return (p.topLevels ?? []).map((l) => ({ label: l.level, count: l.count }));
}

/**
 * Header view of a column held by the engine (demo data or data whose io profile is missing): io's profileColumn
 * (src/io/profile.ts) shaped for the page, with the type read from the column itself.
 */
export function profileColumn(col: Column): ColumnView {
  // O(n) summaries (no sort: V8 sorts 10⁶ doubles in ~0.4 s, and a file may have dozens of columns).
  const sum = col.kind === 'numeric' ? summarizeNumbers(col.values, scratch(col.values.length)) : undefined;
  const p = ioProfileColumn(col, sum);
  const count = p.n - p.missing;
  const binary = col.kind === 'categorical' ? col.levels.length === 2 : p.distinct === 2;
  const finite = (x: number) => (Number.isFinite(x) ? x : null);
  return {
    name: col.name,
    kind: col.kind,
    type: binary ? 'binary' : col.kind,
    modelling: true,
    levels: col.kind === 'categorical' ? col.levels.slice(0, MAX_LEVELS) : binary ? [String(p.min), String(p.max)] : [],
    missing: p.missing,
    distinct: p.distinct,
    min: finite(p.min),
    median: finite(p.median),
    max: finite(p.max),
    reason:
      col.kind === 'categorical'
        ? `${col.levels.length} distinct values`
        : count
          ? `all ${count} non-missing cells are numbers`
          : 'every cell is missing',
    bins: viewBins(p),
    proposedEvent: null,
  };
}

let work = new Float64Array(0);
/** One scratch buffer for every column's summary (the worker profiles one column at a time). */
function scratch(n: number): Float64Array {
  if (work.length < n) work = new Float64Array(n);
  return work;
}

export function profileDataset(data: Dataset): ColumnView[] {
  return data.columns.map(profileColumn);
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(3);
}

/** Cell text of rows [start, start+count) for the grid (missing cells are ""), with their spreadsheet rows. */
export function rowsWindow(data: Dataset, start: number, count: number): RowsWindow {
  const from = Math.max(0, Math.floor(start));
  const to = Math.min(data.nRows, from + Math.max(0, Math.floor(count)));
  const out: string[][] = [];
  const rowNumbers: number[] = [];
  for (let i = from; i < to; i++) {
    rowNumbers.push(sheetRow(data, i));
    out.push(
      data.columns.map((c) => {
        if (c.kind === 'numeric') return Number.isNaN(c.values[i]) ? '' : String(c.values[i]);
        return c.codes[i] < 0 ? '' : c.levels[c.codes[i]];
      }),
    );
  }
  return { cells: out, rowNumbers };
}
