/**
 * Skewness of a sample: the third standardized central moment. With m_r = Σ(x − x̄)^r / n:
 *
 *     g1 = m3 / m2^{3/2}                      adjusted = false (default); scipy.stats.skew(bias=True)
 *     G1 = g1 · √(n(n − 1)) / (n − 2)         adjusted = true, the "adjusted Fisher–Pearson"
 *                                             coefficient; scipy bias=False, simple-statistics sampleSkewness
 *
 * - Zero variance (including all-zero input), n < 2, or n < 3 when adjusted → `null`.
 * - Negative values are data; nothing is clipped. NaN / ±Infinity throw a `RangeError`.
 *
 * Source: D. N. Joanes & C. A. Gill (1998), The Statistician 47:183–189. Cost: two passes, O(n).
 *
 * @example skewness([1, 2, 3, 10]) // → 1.01823… (g1)
 */
import { momentsChecked, skewnessFromMoments } from './moments.ts';

export function skewness(x: ArrayLike<number>, options: { adjusted?: boolean } = {}): number | null {
  return skewnessFromMoments(momentsChecked('skewness', x), options);
}
