/**
 * Extremes and appends over arrays of any length, by loops.
 *
 * Why: `Math.min(...values)`, `Math.max(...values)`, `fn.apply(null, values)` and
 * `out.push(...values)` pass every item as a function argument, and V8 throws `RangeError:
 * Maximum call stack size exceeded` once an argument list passes roughly 10⁵ items (the limit
 * depends on the stack size). Data-sized arrays (units, bins, files) go through these instead.
 */

/** Smallest item (`Infinity` for an empty array, as `Math.min()`); NaN if any item is NaN, as `Math.min`. */
export function minOf(values: ArrayLike<number>): number {
  let m = Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) return NaN;
    if (v < m) m = v;
  }
  return m;
}

/** Largest item (`-Infinity` for an empty array, as `Math.max()`); NaN if any item is NaN, as `Math.max`. */
export function maxOf(values: ArrayLike<number>): number {
  let m = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (v !== v) return NaN;
    if (v > m) m = v;
  }
  return m;
}

/** Append every item of `items` to `into` (what `into.push(...items)` does, for any length). */
export function pushAll<T>(into: T[], items: ArrayLike<T>): T[] {
  for (let i = 0; i < items.length; i++) into.push(items[i]);
  return into;
}
