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

/** k-th smallest (0-based) of a scratch array, reordering it in place (Hoare's selection, median-of-three). */
export function select(a: Float64Array, k: number): number {
  let lo = 0,
    hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    const x = a[lo],
      y = a[mid],
      z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo,
      j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i++] = a[j];
        a[j--] = t;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}

/**
 * quantileSorted(sorted copy of v, q) without sorting: two O(n) selections in a scratch copy, so the result is the
 * same number. NaN for no data; values must not be NaN (the caller checks).
 */
export function quantileBySelection(v: Float64Array, q: number, scratch: Float64Array = v.slice()): number {
  const n = scratch.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const a = select(scratch, lo);
  if (lo + 1 >= n) return a + (h - lo) * (a - a); // the last value: as quantileSorted with hi = lo
  // after the selection every value right of `lo` is ≥ a: the next order statistic is their minimum
  let b = Infinity;
  for (let i = lo + 1; i < n; i++) if (scratch[i] < b) b = scratch[i];
  return a + (h - lo) * (b - a);
}
