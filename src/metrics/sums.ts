/**
 * Internal: the compensated sums the ratio measures share (not re-exported from the index).
 */
import { nonFiniteError, scaleFor } from './check.ts';

/**
 * One checking pass (max |x|, non-finite → RangeError naming `fn`), then one pass of
 * Neumaier-compensated sums of y, |y| and y², where y = k·x and k = `scaleFor(max|x|)` is an
 * exact power of two (1 for ordinary data). Ratios of these sums do not depend on k.
 */
export function scaledSums(fn: string, x: ArrayLike<number>): { n: number; k: number; maxAbs: number; sum: number; sumAbs: number; sumSq: number } {
  const n = x.length;
  let maxAbs = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError(fn, i, v);
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
  }
  const k = scaleFor(maxAbs);
  let s1 = 0, c1 = 0, sa = 0, ca = 0, s2 = 0, c2 = 0;
  for (let i = 0; i < n; i++) {
    const y = x[i] * k;
    let t = s1 + y;
    c1 += Math.abs(s1) >= Math.abs(y) ? s1 - t + y : y - t + s1;
    s1 = t;
    const a = Math.abs(y);
    t = sa + a;
    ca += sa >= a ? sa - t + a : a - t + sa;
    sa = t;
    const q = y * y;
    t = s2 + q;
    c2 += s2 >= q ? s2 - t + q : q - t + s2;
    s2 = t;
  }
  return { n, k, maxAbs, sum: s1 + c1, sumAbs: sa + ca, sumSq: s2 + c2 };
}
