import type { DrawPath } from './types';

/**
 * A path for drawing only: when there are more than `points` values, cases are cut into ⌈2n/points⌉-case
 * buckets and each bucket keeps its minimum and maximum (in case order), so peaks and signals stay visible; the
 * first and last case are always kept. Case numbers are 1-based.
 */
export function decimatePath(values: Float64Array, date: Float64Array, points: number): DrawPath {
  const n = values.length;
  const path: DrawPath = { case: [], date: [], value: [] };
  const push = (i: number) => {
    path.case.push(i + 1);
    path.date.push(date[i]);
    path.value.push(values[i]);
  };
  if (n <= points) {
    for (let i = 0; i < n; i++) push(i);
    return path;
  }
  const size = Math.ceil((2 * n) / points);
  push(0);
  for (let from = 1; from < n - 1; from += size) {
    const to = Math.min(n - 1, from + size);
    let lo = from,
      hi = from;
    for (let i = from + 1; i < to; i++) {
      if (values[i] < values[lo]) lo = i;
      if (values[i] > values[hi]) hi = i;
    }
    push(Math.min(lo, hi));
    if (lo !== hi) push(Math.max(lo, hi));
  }
  push(n - 1);
  return path;
}
