/**
 * Excess kurtosis of a sample: the fourth standardized central moment minus 3, so a normal
 * distribution scores 0 (uniform −1.2, Laplace 3, exponential 6). With m_r = Σ(x − x̄)^r / n:
 *
 *     g2 = m4 / m2² − 3                                   adjusted = false (default), the plug-in
 *                                                         moment ratio; scipy.stats.kurtosis(bias=True)
 *     G2 = ((n + 1)·g2 + 6)·(n − 1) / ((n − 2)(n − 3))    adjusted = true, unbiased under normality;
 *                                                         scipy bias=False, simple-statistics sampleKurtosis
 *
 * - Zero variance (all values equal, all-zero input included), n < 2, or n < 4 when adjusted → `null`.
 * - Negative values are data (kurtosis is location-free); nothing is clipped.
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 * - Two-pass, compensated moments (`momentsOf`); for streams merge per-chunk moments with
 *   `mergeMoments` and finish with `kurtosisFromMoments`.
 *
 * Source: D. N. Joanes & C. A. Gill (1998), "Comparing measures of sample skewness and
 * kurtosis", The Statistician 47:183–189. Cost: two passes, O(n), no allocation.
 *
 * @example excessKurtosis([2, 4, 5, 4, 5]) // → -0.5 ; with { adjusted: true } → 2
 */
import { kurtosisFromMoments, momentsChecked } from './moments.ts';

export function excessKurtosis(x: ArrayLike<number>, options: { adjusted?: boolean } = {}): number | null {
  return kurtosisFromMoments(momentsChecked('excessKurtosis', x), options);
}
