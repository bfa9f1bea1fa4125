import { select } from '../engine/numerics';

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

/** Exact count of distinct values: an open-addressing hash set over the IEEE-754 bits (−0 counted as 0) that grows. */
export function countDistinct(values: Float64Array): number {
  let cap = 1024;
  let keys = new Float64Array(cap).fill(NaN);
  let mask = cap - 1;
  let d = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i] === 0 ? 0 : values[i];
    if (v !== v) continue;
    if (2 * (d + 1) > cap) {
      const old = keys;
      cap *= 2;
      mask = cap - 1;
      keys = new Float64Array(cap).fill(NaN);
      for (let j = 0; j < old.length; j++) {
        const k = old[j];
        if (k === k) keys[slot(k, mask, keys)] = k;
      }
    }
    const h = slot(v, mask, keys);
    if (keys[h] !== keys[h]) {
      keys[h] = v;
      d++;
    }
  }
  return d;
}

/** Slot of `v` in the table: where it is, or the empty slot where it would go. */
function slot(v: number, mask: number, keys: Float64Array): number {
  f64[0] = v;
  let h = Math.imul(u32[0] ^ Math.imul(u32[1], 0x9e3779b1), 0x85ebca6b);
  h = (h ^ (h >>> 15)) & mask;
  for (;;) {
    const k = keys[h];
    if (k !== k || k === v) return h;
    h = (h + 1) & mask;
  }
}

export { select };

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

/** Median from ascending distinct values and their counts (`total` present values). */
function countedMedian(xs: ArrayLike<number>, counts: ArrayLike<number>, total: number): number {
  const h = total >> 1;
  let cum = 0,
    lower = NaN;
  for (let k = 0; k < xs.length; k++) {
    const c = counts[k];
    if (c === 0) continue;
    if (cum <= h - 1 && h - 1 < cum + c) lower = xs[k];
    if (h < cum + c) return total % 2 === 1 ? xs[k] : (lower + xs[k]) / 2;
    cum += c;
  }
  return NaN;
}

/** Median and distinct count of whole numbers in [min, max] by counting (range at most the count). */
function countIntegers(
  values: Float64Array,
  min: number,
  max: number,
  count: number,
): { median: number; distinct: number } {
  const counts = new Int32Array(max - min + 1);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v === v) counts[v - min]++;
  }
  let distinct = 0;
  for (let k = 0; k < counts.length; k++) if (counts[k] > 0) distinct++;
  const h = count >> 1;
  let cum = 0,
    lower = NaN;
  for (let k = 0; k < counts.length; k++) {
    const c = counts[k];
    if (c === 0) continue;
    if (cum <= h - 1 && h - 1 < cum + c) lower = min + k;
    if (h < cum + c) return { median: count % 2 === 1 ? min + k : (lower + (min + k)) / 2, distinct };
    cum += c;
  }
  return { median: NaN, distinct };
}

const SCALES = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6];

/**
 * Median and distinct count of values that all have at most a few decimals, by counting the scaled integers
 * k = round(v·10^d): every value is checked to be exactly k / 10^d, so k ↦ v is one-to-one and keeps the order.
 * Null when some value is not of that form or the range of k is wider than 2·count.
 */
function countDecimals(
  values: Float64Array,
  min: number,
  max: number,
  count: number,
): { median: number; distinct: number } | null {
  let d = 0;
  for (let i = 0, seen = 0; i < values.length && seen < 64; i++) {
    const v = values[i];
    if (v !== v) continue;
    seen++;
    while (d < SCALES.length && Math.round(v * SCALES[d]) / SCALES[d] !== v) d++;
    if (d === SCALES.length) return null;
  }
  const scale = SCALES[d];
  const lo = Math.round(min * scale),
    hi = Math.round(max * scale);
  if (!(hi - lo < 2 * count) || !(Math.abs(lo) < 2 ** 52 && Math.abs(hi) < 2 ** 52)) return null;
  const counts = new Int32Array(hi - lo + 1);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    const k = Math.round(v * scale);
    if (k / scale !== v) return null;
    counts[k - lo]++;
  }
  let distinct = 0;
  for (let k = 0; k < counts.length; k++) if (counts[k] > 0) distinct++;
  const h = count >> 1;
  let cum = 0,
    lower = NaN;
  for (let k = 0; k < counts.length; k++) {
    const c = counts[k];
    if (c === 0) continue;
    if (cum <= h - 1 && h - 1 < cum + c) lower = (lo + k) / scale;
    if (h < cum + c) return { median: count % 2 === 1 ? (lo + k) / scale : (lower + (lo + k) / scale) / 2, distinct };
    cum += c;
  }
  return null;
}

/**
 * Count, min, max, median, distinct count and whole-number flag of the present values. `work` (optional,
 * overwritten) is scratch space of at least `values.length`, so that a caller summarising many columns
 * allocates it once.
 */
export function summarizeNumbers(values: Float64Array, work?: Float64Array): NumericSummary {
  let count = 0,
    min = Infinity,
    max = -Infinity,
    integers = true,
    negativeZero = false;
  const few = new Float64Array(FEW);
  const fewCounts = new Float64Array(FEW);
  let nFew = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) continue;
    count++;
    if (v < min) min = v;
    if (v > max) max = v;
    if (integers && !Number.isInteger(v)) integers = false;
    if (v === 0 && 1 / v < 0) negativeZero = true;
    if (nFew <= FEW) {
      let k = 0;
      while (k < nFew && few[k] !== v) k++;
      if (k === nFew) {
        if (nFew < FEW) {
          few[nFew] = v;
          fewCounts[nFew] = 1;
        }
        nFew++;
      } else fewCounts[k]++;
    }
  }
  if (count === 0) return { count, min: NaN, max: NaN, median: NaN, distinct: 0, integers };
  // −0 and 0 compare equal; which one the selection returns depends on the order, so keep that path for them.
  if (!negativeZero && nFew <= FEW) {
    const order = Array.from({ length: nFew }, (_, k) => k).sort((a, b) => few[a] - few[b]);
    const median = countedMedian(
      order.map((k) => few[k]),
      order.map((k) => fewCounts[k]),
      count,
    );
    return { count, min, max, median, distinct: nFew, integers };
  }
  if (!negativeZero && integers && max - min < count) {
    const { median, distinct } = countIntegers(values, min, max, count);
    return { count, min, max, median, distinct, integers };
  }
  if (!negativeZero && !integers && count > 64) {
    const c = countDecimals(values, min, max, count);
    if (c) return { count, min, max, median: c.median, distinct: c.distinct, integers };
  }
  const scratch = work && work.length >= count ? work.subarray(0, count) : new Float64Array(count);
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
  const distinct =
    nFew <= FEW
      ? nFew
      : integers && max - min <= 4 * count + 1024
        ? countDistinctIntegers(scratch, min, max)
        : countDistinct(scratch);
  return { count, min, max, median, distinct, integers };
}
