/**
 * Shared input checks for the measures (internal; not re-exported from the index).
 *
 * Convention: non-finite input (NaN, ±Infinity, or a hole / non-number in a plain array) is a
 * caller error. The audit layer counts and excludes such values as findings (see `scanValues`)
 * before it calls a measure, so a measure that meets one throws a `RangeError` that names the
 * function, the place and the value.
 */

/** Human-readable form of a bad value (`NaN`, `Infinity`, `undefined`, `"3"`). */
export function describeValue(v: unknown): string {
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return JSON.stringify(v);
  return String(v);
}

/** The error for a non-finite element `x[index]`. */
export function nonFiniteError(fn: string, index: number, value: unknown, name = 'x'): RangeError {
  return new RangeError(
    `${fn}: ${name}[${index}] is ${describeValue(value)}; count and remove non-finite values first (scanValues)`,
  );
}

/** The error for a non-finite cell of a row-major matrix. */
export function nonFiniteCellError(fn: string, flat: number, cols: number, value: unknown): RangeError {
  const row = Math.floor(flat / cols);
  const col = flat - row * cols;
  return new RangeError(
    `${fn}: matrix cell [row ${row}, column ${col}] (data[${flat}]) is ${describeValue(value)}; ` +
      'count and remove non-finite values first (scanValues)',
  );
}

/** Throw unless `tolerance` is a finite number ≥ 0. */
export function checkTolerance(fn: string, tolerance: number): void {
  if (typeof tolerance !== 'number' || !Number.isFinite(tolerance) || tolerance < 0) {
    throw new RangeError(`${fn}: tolerance must be a finite number >= 0, got ${describeValue(tolerance)}`);
  }
}

/**
 * Throw on the first non-finite element. Cost: one pass, O(n). Used by the measures that
 * sort or copy before their main loop; the others check inside their own loop.
 */
export function assertFinite(fn: string, x: ArrayLike<number>): void {
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError(fn, i, v);
  }
}

/**
 * A power of two to multiply the data by so that sums of squares (and squares of sums, with
 * up to 2⁵³ terms) can neither overflow nor underflow: 1 when `maxAbs` is within
 * [2⁻⁴⁰⁰, 2⁴⁰⁰], else 2^−⌈log₂ maxAbs⌉ (capped at 2¹⁰⁰⁰ for subnormal data). Multiplying by a power of two is exact, so scale-free
 * measures (a, S, Hoyer) are unchanged by it.
 */
export function scaleFor(maxAbs: number): number {
  if (maxAbs === 0 || (maxAbs <= 2 ** 400 && maxAbs >= 2 ** -400)) return 1;
  return 2 ** Math.min(1000, -Math.ceil(Math.log2(maxAbs)));
}
