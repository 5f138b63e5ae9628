/**
 * Confidence limits from a bootstrap distribution: percentile and BCa.
 *
 * With α = (1 − level)/2 and θ*₍p₎ the p-quantile of the bootstrap values (Hyndman & Fan type 7,
 * as numpy.percentile's default; see quantile.ts):
 *
 * - percentile (Efron 1979; Efron & Tibshirani 1993 §13.3): [θ*₍α₎, θ*₍1−α₎].
 * - BCa (Efron 1987, JASA 82:171–185; Efron & Tibshirani 1993 §14.3): [θ*₍α₁₎, θ*₍α₂₎] with
 *     α₁ = Φ(ẑ₀ + (ẑ₀ + z_α)/(1 − â(ẑ₀ + z_α))),  α₂ = Φ(ẑ₀ + (ẑ₀ + z_{1−α})/(1 − â(ẑ₀ + z_{1−α}))),
 *   ẑ₀ = Φ⁻¹(p̂), p̂ = (#{θ* < θ̂} + #{θ* ≤ θ̂}) / (2B): ties with θ̂ count one half, as in
 *   scipy.stats.bootstrap. â is the jackknife acceleration (jackknife.ts).
 *
 * Edge rules (project choices, stated so results can be reproduced):
 * - p̂ is clamped to [1/(2B), 1 − 1/(2B)], so ẑ₀ is finite even when θ̂ lies outside every
 *   bootstrap value (SciPy returns NaN there).
 * - If 1 − â(ẑ₀ + z) ≤ 0 the adjusted level is taken as its limit, 1 when ẑ₀ + z > 0 else 0.
 * Cost: O(B log B) for the sort (done by the caller, once).
 */
import { normalCdf, normalPpf } from './normal.ts';
import { quantileSorted } from './quantile.ts';

export type IntervalMethodName = 'percentile' | 'bca';

/**
 * Proportion of `sorted` (ascending, finite) below `score`, ties counted one half.
 * Cost: O(log B) by binary search.
 */
export function proportionBelow(sorted: Float64Array, score: number): number {
  const B = sorted.length;
  let lo = 0;
  let hi = B;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] < score) lo = mid + 1;
    else hi = mid;
  }
  const less = lo;
  hi = B;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] <= score) lo = mid + 1;
    else hi = mid;
  }
  return (less + lo) / (2 * B);
}

/** BCa-adjusted level Φ(ẑ₀ + (ẑ₀ + z)/(1 − â(ẑ₀ + z))), with the edge rule above. */
export function bcaAdjustedLevel(z0: number, acceleration: number, z: number): number {
  const num = z0 + z;
  const den = 1 - acceleration * num;
  if (den <= 0) return num > 0 ? 1 : 0;
  return normalCdf(z0 + num / den);
}

export interface DistributionInterval {
  lower: number;
  upper: number;
  /** The quantile levels actually read off the bootstrap distribution. */
  levels: [number, number];
  /** ẑ₀ (BCa only). */
  biasCorrection?: number;
}

/**
 * Interval from a sorted (ascending, finite, non-empty) bootstrap distribution.
 * `acceleration` is needed for 'bca' and ignored for 'percentile'.
 */
export function intervalFromDistribution(
  sorted: Float64Array,
  estimate: number,
  method: IntervalMethodName,
  level: number,
  acceleration = 0,
): DistributionInterval {
  const alpha = (1 - level) / 2;
  if (method === 'percentile') {
    return { lower: quantileSorted(sorted, alpha), upper: quantileSorted(sorted, 1 - alpha), levels: [alpha, 1 - alpha] };
  }
  const B = sorted.length;
  const p = Math.min(1 - 1 / (2 * B), Math.max(1 / (2 * B), proportionBelow(sorted, estimate)));
  const z0 = normalPpf(p);
  const za = normalPpf(alpha);
  const a1 = bcaAdjustedLevel(z0, acceleration, za);
  const a2 = bcaAdjustedLevel(z0, acceleration, -za);
  return {
    lower: quantileSorted(sorted, a1),
    upper: quantileSorted(sorted, a2),
    levels: [a1, a2],
    biasCorrection: z0,
  };
}
