import type { Column } from '../engine/core';
import { summarizeNumbers, type NumericSummary } from './numericSummary';
import type { ColumnProfile } from './types';

const MAX_BINS = 20;
const TOP_LEVELS = 20;

/**
 * Equal-width histogram over [min, max]: min(20, distinct values, ⌈log2 n⌉ + 1 (Sturges)) bins;
 * the maximum falls in the last bin.
 */
export function histogram(values: Float64Array, s: NumericSummary): { edges: number[]; counts: number[] } {
  const n = s.count;
  if (n === 0) return { edges: [], counts: [] };
  const lo = s.min,
    hi = s.max;
  const bins = lo === hi ? 1 : Math.max(1, Math.min(MAX_BINS, s.distinct, Math.ceil(Math.log2(n)) + 1));
  const width = (hi - lo) / bins;
  const edges = Array.from({ length: bins + 1 }, (_, i) => (i === bins ? hi : lo + i * width));
  const counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    counts[width > 0 ? Math.min(bins - 1, Math.floor((v - lo) / width)) : 0]++;
  }
  return { edges, counts };
}

/** The grid-header profile of one column. Pass `summary` when already computed for a numeric column. */
export function profileColumn(col: Column, summary?: NumericSummary): ColumnProfile {
  if (col.kind === 'numeric') {
    const s = summary ?? summarizeNumbers(col.values);
    const n = col.values.length,
      missing = n - s.count;
    return {
      n,
      missing,
      missingPct: n === 0 ? 0 : (100 * missing) / n,
      distinct: s.distinct,
      min: s.min,
      median: s.median,
      max: s.max,
      histogram: histogram(col.values, s),
    };
  }
  const n = col.codes.length;
  const counts = new Array<number>(col.levels.length).fill(0);
  let missing = 0;
  for (let i = 0; i < n; i++) {
    const c = col.codes[i];
    if (c < 0) missing++;
    else counts[c]++;
  }
  const order = counts.map((_, i) => i).sort((a, b) => counts[b] - counts[a] || a - b);
  const top = order.slice(0, TOP_LEVELS).map((i) => ({ level: col.levels[i], count: counts[i] }));
  const shown = top.reduce((s, t) => s + t.count, 0);
  return {
    n,
    missing,
    missingPct: n === 0 ? 0 : (100 * missing) / n,
    distinct: counts.filter((c) => c > 0).length,
    min: NaN,
    median: NaN,
    max: NaN,
    topLevels: top,
    otherCount: n - missing - shown,
  };
}
