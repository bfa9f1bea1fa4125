/** Summary of a numeric column's present (non-NaN) values, computed in O(n) without sorting. */
export interface NumericSummary {
  count: number;
  min: number;
  max: number;
  median: number;
  distinct: number;
  integers: boolean;
}

const f64 = new Float64Array(1);
const u32 = new Uint32Array(f64.buffer);

/** Exact count of distinct values: open-addressing hash set over the IEEE-754 bits (−0 counted as 0). */
export function countDistinct(values: Float64Array): number {
  let cap = 16;
  while (cap < 2 * values.length) cap *= 2;
  const keys = new Float64Array(cap).fill(NaN);
  const mask = cap - 1;
  let d = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] === 0 ? 0 : values[i];
    if (v !== v) continue;
    f64[0] = v;
    let h = Math.imul(u32[0] ^ Math.imul(u32[1], 0x9e3779b1), 0x85ebca6b);
    h = (h ^ (h >>> 15)) & mask;
    for (;;) {
      const k = keys[h];
      if (k !== k) {
        keys[h] = v;
        d++;
        break;
      }
      if (k === v) break;
      h = (h + 1) & mask;
    }
  }
  return d;
}

/** k-th smallest (0-based) of a scratch array, reordering it in place (Hoare's selection, median-of-three). */
function select(a: Float64Array, k: number): number {
  let lo = 0, hi = a.length - 1;
  while (hi > lo) {
    const mid = (lo + hi) >> 1;
    const x = a[lo], y = a[mid], z = a[hi];
    const pivot = x < y ? (y < z ? y : x < z ? z : x) : x < z ? x : y < z ? z : y;
    let i = lo, j = hi;
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

const FEW = 8;

/** Distinct count of whole numbers in [min, max] with a bitmap (when the range is small). */
function countDistinctIntegers(values: Float64Array, min: number, max: number): number {
  const seen = new Uint8Array(max - min + 1);
  let d = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    const k = v - min;
    if (seen[k] === 0) {
      seen[k] = 1;
      d++;
    }
  }
  return d;
}

export function summarizeNumbers(values: Float64Array): NumericSummary {
  let count = 0, min = Infinity, max = -Infinity, integers = true;
  const few = new Float64Array(FEW);
  let nFew = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    count++;
    if (v < min) min = v;
    if (v > max) max = v;
    if (integers && !Number.isInteger(v)) integers = false;
    if (nFew <= FEW) {
      let k = 0;
      while (k < nFew && few[k] !== v) k++;
      if (k === nFew) {
        if (nFew < FEW) few[nFew] = v;
        nFew++;
      }
    }
  }
  if (count === 0) return { count, min: NaN, max: NaN, median: NaN, distinct: 0, integers };
  const scratch = new Float64Array(count);
  let k = 0;
  for (let i = 0; i < values.length; i++) if (values[i] === values[i]) scratch[k++] = values[i];
  const h = count >> 1;
  const upper = select(scratch, h);
  let median = upper;
  if (count % 2 === 0) {
    let lower = -Infinity;
    for (let i = 0; i < h; i++) if (scratch[i] > lower) lower = scratch[i];
    median = (lower + upper) / 2;
  }
  const distinct = nFew <= FEW ? nFew
    : integers && max - min <= 4 * count + 1024 ? countDistinctIntegers(scratch, min, max) : countDistinct(scratch);
  return { count, min, max, median, distinct, integers };
}
