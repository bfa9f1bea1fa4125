import type { RowSample } from './columnBuilder';

/** "row 14", "rows 14, 88, 301", "rows 14, 88, 301, 302, 310 and 12 more". */
export function rowList(s: RowSample): string {
  if (s.rows.length === 0) return 'no rows';
  const head = (s.rows.length === 1 ? 'row ' : 'rows ') + s.rows.join(', ');
  return s.count > s.rows.length ? `${head} and ${s.count - s.rows.length} more` : head;
}

/** `rows 14 ("abc"), 88 ("x")` — rows with the cell text, for short samples. */
export function rowListWithText(s: RowSample): string {
  if (s.rows.length === 0) return 'no rows';
  const parts = s.rows.map((r, i) => `${r} ("${s.examples[i]}")`);
  const head = (s.rows.length === 1 ? 'row ' : 'rows ') + parts.join(', ');
  return s.count > s.rows.length ? `${head} and ${s.count - s.rows.length} more` : head;
}

export { plural } from '../engine/core';

/** Percentage rounded down, so "100%" means all and "0%" means none. */
export function pct(part: number, whole: number): string {
  if (whole === 0) return '0%';
  const p = (100 * part) / whole;
  if (p > 0 && p < 1) return '<1%';
  return `${Math.floor(p)}%`;
}
