/**
 * Mann–Kendall test for a monotonic trend in a series observed in time order.
 *
 *   S = Σ_{i<j} sgn(x_j − x_i)
 *   Var(S) = [n(n−1)(2n+5) − Σ_p t_p(t_p−1)(2t_p+5)] / 18     (t_p = size of tie group p in x)
 *   Z = (S − 1)/√Var(S) if S > 0;  0 if S = 0;  (S + 1)/√Var(S) if S < 0   (continuity correction)
 *   p = 2·(1 − Φ(|Z|))   (two-sided)
 *
 * Sources: Mann (1945), Econometrica 13:245–259; Kendall (1975), Rank Correlation Methods, 4th ed.;
 * Gilbert (1987), Statistical Methods for Environmental Pollution Monitoring, ch. 16 (the
 * tie-corrected variance and the continuity correction as written above).
 *
 * Relation to Kendall's τ: S is the numerator of τ between x and its time index (concordant −
 * discordant pairs); with no ties S = τ·n(n−1)/2. scipy's asymptotic `kendalltau` p-value uses S
 * and the same variance but no continuity correction, so its z is S/√Var and its p is a little
 * smaller; for n ≤ 10 Gilbert recommends exact tables, which this function does not give — the
 * normal approximation here is a screening aid on short series, not an exact test.
 *
 * Input: finite numbers in time order, n ≥ 2 (a `RangeError` otherwise: NaN or ±Infinity names the
 * index). Zeros and negative values are ordinary values. When every value is tied, Var(S) = 0 and
 * z = 0, p = 1. Cost: O(n²) comparisons plus O(n log n) for the tie groups.
 *
 * @example mannKendall([1, 3, 2, 4]) // → { S: 4, varS: 8.666…, z: 1.0190…, p: 0.3082…, n: 4 }
 */
import { normalCdf } from './normal.ts';

export interface MannKendallResult {
  S: number;
  varS: number;
  z: number;
  /** Two-sided p-value from the normal approximation with continuity correction. */
  p: number;
  n: number;
}

export function mannKendall(x: readonly number[]): MannKendallResult {
  const n = x.length;
  if (n < 2) throw new RangeError(`mannKendall: needs at least 2 values, got ${n}`);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(x[i])) throw new RangeError(`mannKendall: x[${i}] is ${x[i]}; only finite values are allowed`);
  }
  let S = 0;
  for (let i = 0; i < n - 1; i++) {
    const xi = x[i];
    for (let j = i + 1; j < n; j++) S += Math.sign(x[j] - xi);
  }
  const varS = (n * (n - 1) * (2 * n + 5) - tieTerm(x)) / 18;
  let z = 0;
  if (varS > 0) {
    if (S > 0) z = (S - 1) / Math.sqrt(varS);
    else if (S < 0) z = (S + 1) / Math.sqrt(varS);
  }
  const p = Math.min(1, 2 * normalCdf(-Math.abs(z)));
  return { S, varS, z, p, n };
}

/** Σ_p t_p(t_p − 1)(2t_p + 5) over the tie groups of x (shared with Sen's slope interval). */
export function tieTerm(x: readonly number[]): number {
  const sorted = Float64Array.from(x).sort();
  let total = 0;
  let run = 1;
  for (let i = 1; i <= sorted.length; i++) {
    if (i < sorted.length && sorted[i] === sorted[i - 1]) run++;
    else {
      if (run > 1) total += run * (run - 1) * (2 * run + 5);
      run = 1;
    }
  }
  return total;
}
