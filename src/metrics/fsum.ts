/**
 * Compensated summation.
 *
 * `fsum(x)` adds the elements of `x` with Neumaier's improvement of Kahan summation:
 * a running sum `s` and a running compensation `c` that collects the low-order bits lost
 * in each addition, taking whichever of `s` and the addend is larger in magnitude as the
 * exact part (so, unlike plain Kahan summation, it stays accurate when an addend is larger
 * than the running sum). The error bound is about 2u·|Σx| + O(n·u²)·Σ|x|, u = 2⁻⁵³,
 * independent of n to first order; a naive loop's bound grows as n·u·Σ|x|.
 *
 * Source: A. Neumaier (1974), "Rundungsfehleranalyse einiger Verfahren zur Summation
 * endlicher Summen", ZAMM 54:39–51; Kahan (1965), Comm. ACM 8:40.
 *
 * Cost: one pass, O(n), no allocation. Zeros and negative values are added as they are.
 * Non-finite input (NaN, ±Infinity) throws a `RangeError` naming the index.
 *
 * @example fsum([1e100, 1, -1e100]) // → 1 (a naive loop gives 0)
 */
import { nonFiniteError } from './check.ts';

export function fsum(x: ArrayLike<number>): number {
  let s = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('fsum', i, v);
    const t = s + v;
    if (Math.abs(s) >= Math.abs(v)) c += s - t + v;
    else c += v - t + s;
    s = t;
  }
  return s + c;
}
