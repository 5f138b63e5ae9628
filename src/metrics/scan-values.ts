/**
 * Count what a block of values holds before any measure sees it.
 *
 * Returns `{ n, nan, posInf, negInf, negative, zero, nonzero }`:
 *  - `nan`, `posInf`, `negInf`: the non-finite values, which every measure refuses (throws);
 *    the audit reports them as findings and removes them first;
 *  - `zero`: finite values with |x| ≤ tolerance (−0 included); `nonzero`: finite, |x| > tolerance;
 *  - `negative`: finite values < 0 (strictly, whatever the tolerance: any negative response
 *    pushes Vinje–Gallant S above its non-negative range, so every one is counted).
 * So n = nan + posInf + negInf + zero + nonzero. A hole or a non-number in a plain array counts as NaN.
 *
 * Cost: one pass, O(n), no allocation. Never throws on data; throws on a bad tolerance.
 */
import { checkTolerance } from './check.ts';

export interface ValueCounts {
  n: number;
  nan: number;
  posInf: number;
  negInf: number;
  negative: number;
  zero: number;
  nonzero: number;
}

export function scanValues(x: ArrayLike<number>, tolerance = 0): ValueCounts {
  checkTolerance('scanValues', tolerance);
  let nan = 0;
  let posInf = 0;
  let negInf = 0;
  let negative = 0;
  let zero = 0;
  const n = x.length;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (typeof v !== 'number' || v !== v) nan++;
    else if (v === Infinity) posInf++;
    else if (v === -Infinity) negInf++;
    else {
      if (v < 0) negative++;
      if (Math.abs(v) <= tolerance) zero++;
    }
  }
  return { n, nan, posInf, negInf, negative, zero, nonzero: n - nan - posInf - negInf - zero };
}
