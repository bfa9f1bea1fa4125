/** Number formatting for tables and labels (display only). */
export function num(x: number | null | undefined, digits = 3): string {
  if (x === null || x === undefined || Number.isNaN(x)) return '—';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const a = Math.abs(x);
  if (a < 1e-9) return (0).toFixed(digits);
  if (a !== 0 && (a < 1e-3 || a >= 1e5)) return x.toExponential(2).replace('-', '−');
  return x.toFixed(digits).replace('-', '−');
}

export function pct(x: number | null | undefined, digits = 1): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return '—';
  return `${(100 * x).toFixed(digits)}%`;
}

export function pValue(p: number | null | undefined): string {
  if (p === null || p === undefined || Number.isNaN(p)) return '—';
  return p < 0.001 ? '< 0.001' : p.toFixed(3);
}

export function ci(lo: number | null | undefined, hi: number | null | undefined, digits = 2): string {
  if (lo === null || lo === undefined || hi === null || hi === undefined) return '—';
  return `${num(lo, digits)} to ${num(hi, digits)}`;
}

export function count(n: number): string {
  return Math.round(n).toLocaleString('en-GB');
}

/** Okabe–Ito colour-blind-safe palette (Okabe & Ito 2008). */
export const palette = {
  blue: '#0072B2',
  orange: '#E69F00',
  sky: '#56B4E9',
  green: '#009E73',
  yellow: '#F0E442',
  vermillion: '#D55E00',
  purple: '#CC79A7',
  grey: '#6b6b6b',
} as const;

/** Largest finite value, or `fallback` when there is none (plot domains never get NaN or ±Infinity). */
export function finiteMax(values: readonly number[], fallback: number): number {
  let m = -Infinity;
  for (const v of values) if (Number.isFinite(v) && v > m) m = v;
  return m === -Infinity ? fallback : m;
}
export { ordinal, plural } from '../engine/core';
