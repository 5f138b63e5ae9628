/**
 * Normalized sparseness of Vinje & Gallant (2000), from the activity ratio a:
 *
 *     S = (1 − a) / (1 − 1/n),   a = (Σ r_i)² / (n · Σ r_i²)
 *
 * For r ≥ 0, S ∈ [0, 1]: 0 when all responses are equal, 1 when exactly one is nonzero;
 * a binary vector with k of n active gives S = (n − k)/(n − 1). Equivalently S = n(1 − a)/(n − 1).
 *
 * - All-zero input (a = 0/0), n = 1 (1 − 1/n = 0) or empty input → `null`, never 0 or 1.
 * - Negative values are NOT clipped: with mixed signs a falls towards 0 and S can exceed 1
 *   (up to n/(n − 1)). Such a value means the responses were baseline-subtracted; the caller
 *   counts negatives with `scanValues` and reports them. S is not forced into [0, 1].
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 *
 * Lifetime vs population sparseness (which axis r runs along): Willmore & Tolhurst (2001);
 * see `lifetimeSparseness` and `populationSparseness`.
 *
 * Source: W. E. Vinje & J. L. Gallant (2000), Science 287:1273–1276. Cost: two passes, O(n).
 *
 * @example vinjeGallantSparseness([0, 0, 1, 1]) // → 0.6666… (= 2/3)
 */
import { scaledSums } from './sums.ts';

export function vinjeGallantSparseness(x: ArrayLike<number>): number | null {
  const { n, sum, sumSq } = scaledSums('vinjeGallantSparseness', x);
  if (n < 2 || sumSq === 0) return null;
  const a = (sum * sum) / (n * sumSq);
  return (n * (1 - a)) / (n - 1);
}
