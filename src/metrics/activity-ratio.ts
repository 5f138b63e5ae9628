/**
 * Activity ratio of a response vector r of length n (Treves & Rolls 1991; Rolls & Tovee 1995):
 *
 *     a = (Σ r_i / n)² / (Σ r_i² / n)  =  (Σ r_i)² / (n · Σ r_i²)
 *
 * a = 1 when all responses are equal, a = k/n for a binary vector with k of n active, and a
 * small a means a sparse code. Computed exactly as written (plug-in, no bias correction).
 *
 * - All-zero input (Σr² = 0) or empty input: 0/0 → `null` (undefined, never 0 or 1).
 * - Negative values are NOT clipped: the signed sum is used, so mixed signs lower a (it stays in
 *   [0, 1] by Cauchy–Schwarz) and push Vinje–Gallant S above 1. `scanValues` counts them.
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 * - Overflow-safe (exact power-of-two scaling for values beyond 2^±400); compensated sums.
 *
 * Sources: A. Treves & E. T. Rolls (1991), Network 2:371–397; E. T. Rolls & M. J. Tovee (1995),
 * J Neurophysiol 73:713–726. Cost: two passes, O(n), no allocation.
 *
 * @example activityRatio([1, 2, 3, 4]) // → 0.8333… (= 100 / (4·30) = 5/6)
 */
import { scaledSums } from './sums.ts';

export function activityRatio(x: ArrayLike<number>): number | null {
  const { n, sum, sumSq } = scaledSums('activityRatio', x);
  if (n === 0 || sumSq === 0) return null;
  return (sum * sum) / (n * sumSq);
}
