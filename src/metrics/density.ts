/**
 * Density: the fraction of elements that are active, |x_i| > tolerance (tolerance 0 → the
 * fraction of nonzeros), i.e. ℓ0(x)/n. For a weight tensor this is the fraction of weights left
 * after pruning; for activity, the fraction of (unit, bin) cells with any response.
 *
 * - Empty input → `null` (0/0). All-zero input → 0 (defined: nothing is active).
 * - Negative values count by magnitude (−0.3 is active); `scanValues` counts negatives.
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 *
 * The same definition, for an adjacency matrix, is `graphDensity` (edges over possible edges).
 * Source: the ℓ0 "norm" count, standard (e.g. Hurley & Rickard 2009, IEEE Trans. Inf. Theory
 * 55:4723–4741, §II). Cost: one pass, O(n).
 *
 * @example density([0, 0.5, 0, -2]) // → 0.5
 */
import { checkTolerance, nonFiniteError } from './check.ts';

export function density(x: ArrayLike<number>, options: { tolerance?: number } = {}): number | null {
  const tolerance = options.tolerance ?? 0;
  checkTolerance('density', tolerance);
  const n = x.length;
  let k = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('density', i, v);
    if (Math.abs(v) > tolerance) k++;
  }
  return n === 0 ? null : k / n;
}

/**
 * Density as a function of a magnitude threshold: for each t in `thresholds`, the fraction of
 * elements with |x_i| > t (strictly greater, as in `density`). Returns one value per threshold,
 * in the order given; `null` for every threshold when x is empty.
 *
 * Cost: one copy of |x| (8n bytes) sorted once, O(n log n), then a binary search per threshold,
 * O(log n) each. Thresholds may be any number but NaN (negative → 1, +Infinity → 0).
 * NaN / ±Infinity in x throw a `RangeError` naming the index; the input is not modified.
 *
 * @example densityCurve([0, 0.5, 0, -2], [0, 1, 2]) // → [0.5, 0.25, 0]
 */
export function densityCurve(x: ArrayLike<number>, thresholds: ArrayLike<number>): (number | null)[] {
  for (let j = 0; j < thresholds.length; j++) {
    const t = thresholds[j];
    if (typeof t !== 'number' || Number.isNaN(t)) {
      throw new RangeError(`densityCurve: thresholds[${j}] is ${String(t)}; thresholds must be numbers`);
    }
  }
  const n = x.length;
  if (n === 0) return Array.from({ length: thresholds.length }, () => null);
  const a = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('densityCurve', i, v);
    a[i] = Math.abs(v);
  }
  a.sort();
  const out: (number | null)[] = new Array(thresholds.length);
  for (let j = 0; j < thresholds.length; j++) {
    out[j] = (n - countAtMost(a, thresholds[j])) / n;
  }
  return out;
}

/** Number of elements ≤ t in an ascending array (upper bound by binary search). */
function countAtMost(sorted: Float64Array, t: number): number {
  let lo = 0;
  let hi = sorted.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] <= t) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
