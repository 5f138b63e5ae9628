/**
 * Hoyer's sparseness (Hoyer 2004), from the ratio of the ℓ1 and ℓ2 norms:
 *
 *     H = (√n − ‖x‖₁ / ‖x‖₂) / (√n − 1)
 *
 * H = 1 iff exactly one element is nonzero, H = 0 iff all |x_i| are equal; a binary vector
 * with k of n active gives H = (√n − √k)/(√n − 1). For r ≥ 0, H = √n(1 − √a)/(√n − 1) with
 * a the activity ratio.
 *
 * - All-zero input (‖x‖₂ = 0), n = 1 (√n − 1 = 0) or empty input → `null`.
 * - Negative values are NOT clipped, but the norms count them by magnitude (that is the
 *   definition), so H of x equals H of |x| and stays in [0, 1]; `scanValues` counts negatives.
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 * - Overflow-safe (exact power-of-two scaling), compensated sums.
 *
 * Source: P. O. Hoyer (2004), "Non-negative matrix factorization with sparseness constraints",
 * JMLR 5:1457–1469. Cost: two passes, O(n), no allocation.
 *
 * @example hoyerSparseness([0, 0, 1, 1]) // → 0.5857… (= 2 − √2)
 */
import { scaledSums } from './sums.ts';

export function hoyerSparseness(x: ArrayLike<number>): number | null {
  const { n, sumAbs, sumSq } = scaledSums('hoyerSparseness', x);
  if (n < 2 || sumSq === 0) return null;
  const rootN = Math.sqrt(n);
  return (rootN - sumAbs / Math.sqrt(sumSq)) / (rootN - 1);
}
