import type { Dataset } from '../engine/core';

/**
 * First and last date of a date column (import stores dates as days since 1970-01-01 UTC in a numeric
 * column), as ISO dates for the report's data-source line; null when the column is absent, not numeric or empty.
 */
export function dateRangeOf(data: Dataset, column: string): { column: string; from: string; to: string } | null {
  const col = data.columns.find((c) => c.name === column);
  if (!col || col.kind !== 'numeric') return null;
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of col.values) {
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (lo === Infinity) return null;
  const iso = (days: number) => new Date(Math.floor(days) * 86_400_000).toISOString().slice(0, 10);
  return { column, from: iso(lo), to: iso(hi) };
}
