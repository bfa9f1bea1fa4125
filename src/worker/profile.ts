import type { Column, Dataset } from '../engine/data';
import type { ColumnView } from './protocol';

/** At most this many levels travel to the page (for reference-level and scoring choices). */
export const MAX_LEVELS = 200;

/** Header profile of a column held by the engine (demo data or data whose io profile is missing). */
export function profileColumn(col: Column): ColumnView {
  if (col.kind === 'categorical') {
    const counts = new Array<number>(col.levels.length).fill(0);
    let missing = 0;
    for (const c of col.codes) if (c < 0) missing++; else counts[c]++;
    const type = col.levels.length === 2 ? 'binary' : 'categorical';
    return {
      name: col.name, kind: 'categorical', type, modelling: true, levels: col.levels.slice(0, MAX_LEVELS), missing,
      distinct: counts.filter((c) => c > 0).length, min: null, median: null, max: null,
      reason: `${col.levels.length} distinct values`,
      bins: col.levels.slice(0, 20).map((label, k) => ({ label, count: counts[k] })),
      proposedEvent: null,
    };
  }
  const v = col.values.filter((x) => !Number.isNaN(x)).sort();
  const missing = col.values.length - v.length;
  const bins: { label: string; count: number }[] = [];
  let distinct = 0;
  for (let i = 0; i < v.length; i++) if (i === 0 || v[i] !== v[i - 1]) distinct++;
  if (v.length > 0) {
    const lo = v[0], hi = v[v.length - 1];
    const k = lo === hi ? 1 : Math.min(20, Math.max(5, distinct));
    const w = (hi - lo) / k || 1;
    const counts = new Array<number>(k).fill(0);
    for (const x of v) counts[Math.min(k - 1, Math.floor((x - lo) / w))]++;
    counts.forEach((count, b) => bins.push({ label: `${fmt(lo + b * w)}–${fmt(lo + (b + 1) * w)}`, count }));
  }
  const levels = distinct === 2 ? [String(v[0]), String(v[v.length - 1])] : [];
  return {
    name: col.name, kind: 'numeric', type: distinct === 2 ? 'binary' : 'numeric', modelling: true, levels, missing, distinct,
    min: v.length ? v[0] : null, median: v.length ? v[Math.floor((v.length - 1) / 2)] : null,
    max: v.length ? v[v.length - 1] : null,
    reason: v.length ? `all ${v.length} non-missing cells are numbers` : 'every cell is missing',
    bins, proposedEvent: null,
  };
}

export function profileDataset(data: Dataset): ColumnView[] {
  return data.columns.map(profileColumn);
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(3);
}

/** Cell text of rows [start, start+count) for the grid; missing cells are "". */
export function rowsWindow(data: Dataset, start: number, count: number): string[][] {
  const from = Math.max(0, Math.floor(start));
  const to = Math.min(data.nRows, from + Math.max(0, Math.floor(count)));
  const out: string[][] = [];
  for (let i = from; i < to; i++) {
    out.push(data.columns.map((c) => {
      if (c.kind === 'numeric') return Number.isNaN(c.values[i]) ? '' : String(c.values[i]);
      return c.codes[i] < 0 ? '' : c.levels[c.codes[i]];
    }));
  }
  return out;
}
