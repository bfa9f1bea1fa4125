/**
 * Sample quantile of sorted data by linear interpolation between order statistics: Hyndman & Fan 1996 type 7,
 * R's `quantile()` default. h = (n − 1)·q; the value is x₍⌊h⌋₎ + (h − ⌊h⌋)·(x₍⌊h⌋+1₎ − x₍⌊h⌋₎). NaN for no data.
 */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * Weighted quantile: the smallest value whose cumulative weight reaches q of the total (inverse of the weighted
 * empirical distribution function, type 1 with weights); `v` need not be sorted.
 */
export function weightedQuantile(v: Float64Array, w: Float64Array, q: number): number {
  const idx = Array.from(v.keys()).sort((a, b) => v[a] - v[b]);
  let total = 0;
  for (let i = 0; i < w.length; i++) total += w[i];
  let acc = 0;
  for (const i of idx) {
    acc += w[i];
    if (acc >= q * total) return v[i];
  }
  return v[idx[idx.length - 1]];
}
