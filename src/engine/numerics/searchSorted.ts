/**
 * Binary search in ascending `a`, O(log n): the number of elements < v ('left'), or ≤ v ('right'); i.e. the first
 * index at which v could be inserted keeping the order, before ('left') or after ('right') equal elements.
 */
export function searchSorted(a: ArrayLike<number>, v: number, side: 'left' | 'right' = 'left'): number {
  let lo = 0;
  let hi = a.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (a[mid] < v || (side === 'right' && a[mid] === v)) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
