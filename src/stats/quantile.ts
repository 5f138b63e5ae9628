/**
 * Sample quantile of sorted data, Hyndman & Fan (1996) definition 7 ("Sample quantiles in
 * statistical packages", The American Statistician 50(4):361–365): the linear interpolation of
 * the order statistics at h = (n − 1)·p,
 *
 *   Q(p) = x₍⌊h⌋₎ + (h − ⌊h⌋)·(x₍⌊h⌋+1₎ − x₍⌊h⌋₎)   (0-based order statistics),
 *
 * the default of numpy.percentile / numpy.quantile ("linear") and of R's `quantile`. So Q(0) is
 * the minimum and Q(1) the maximum.
 *
 * `sorted` must be ascending and free of NaN (not checked: O(1) per call). p outside [0, 1] or
 * an empty array is a `RangeError`. Zeros and negative values are ordinary values.
 * Cost: O(1).
 *
 * @example quantileSorted(Float64Array.of(1, 2, 3, 4), 0.5) // → 2.5
 */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) throw new RangeError('quantileSorted: empty input');
  if (!(p >= 0 && p <= 1)) throw new RangeError(`quantileSorted: p must be in [0, 1], got ${String(p)}`);
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  if (lo >= n - 1) return sorted[n - 1];
  const frac = h - lo;
  const a = sorted[lo];
  const b = sorted[lo + 1];
  return frac === 0 ? a : a + frac * (b - a);
}
