/**
 * Element counts and vector norms, the building blocks of the sparseness measures.
 *
 * Non-finite input (NaN, ±Infinity) throws a `RangeError` naming the function and index:
 * count and remove such values first (`scanValues`). Negative values count by magnitude,
 * as the norms' definitions say. Every function is O(n), reads its input only, float64.
 */
import { checkTolerance, nonFiniteError, scaleFor } from './check.ts';

/**
 * ℓ0 "norm": the number of elements with |x_i| > tolerance (tolerance 0 → the count of
 * nonzeros). Zeros (and −0) are inactive; negative values count by magnitude. Empty → 0.
 */
export function l0Count(x: ArrayLike<number>, options: { tolerance?: number } = {}): number {
  const tolerance = options.tolerance ?? 0;
  checkTolerance('l0Count', tolerance);
  let k = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('l0Count', i, v);
    if (Math.abs(v) > tolerance) k++;
  }
  return k;
}

/**
 * ℓ1 norm ‖x‖₁ = Σ|x_i|, summed with Neumaier compensation (see `fsum`). Empty → 0.
 * Overflows to Infinity only when the true sum exceeds the float64 range (~1.8e308).
 */
export function l1Norm(x: ArrayLike<number>): number {
  let s = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('l1Norm', i, v);
    const a = Math.abs(v);
    const t = s + a;
    c += s >= a ? s - t + a : a - t + s;
    s = t;
  }
  return s + c;
}

/**
 * Euclidean norm ‖x‖₂ = √(Σx_i²), overflow- and underflow-safe: when max|x| lies outside
 * [2⁻⁴⁰⁰, 2⁴⁰⁰] the squares are taken of x scaled by an exact power of two (two passes),
 * so e.g. ‖[1e200, 1e200]‖₂ = √2·1e200 rather than Infinity. The squares are summed
 * with Neumaier compensation. Empty → 0.
 */
export function l2Norm(x: ArrayLike<number>): number {
  let maxAbs = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('l2Norm', i, v);
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
  }
  if (maxAbs === 0) return 0;
  const k = scaleFor(maxAbs);
  let s = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++) {
    const y = x[i] * k;
    const q = y * y;
    const t = s + q;
    c += s >= q ? s - t + q : q - t + s;
    s = t;
  }
  return Math.sqrt(s + c) / k;
}
