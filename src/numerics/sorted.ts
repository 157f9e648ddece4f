/**
 * Bisection over a sorted array: the largest index i in [lo, hi] whose value
 * is not past x (xs[i] ≤ x for an ascending array, xs[i] ≥ x for a
 * descending one). The caller guarantees xs[lo] is not past x.
 * O(log n), no allocation: it sits on the spectrum's hot path.
 */
export function lastIndexNotPast(xs: ArrayLike<number>, x: number, lo = 0, hi = xs.length - 1, descending = false): number {
  if (descending ? xs[hi] >= x : xs[hi] <= x) return hi;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (descending ? xs[mid] >= x : xs[mid] <= x) lo = mid;
    else hi = mid;
  }
  return lo;
}
