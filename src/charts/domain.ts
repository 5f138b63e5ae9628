/**
 * Axis domains fitted to the data, for measures whose values crowd one end of their possible
 * range (population sparseness near 0.99 on a 0–1 axis draws a flat line). Plain loops, no
 * spread of data-sized arrays into Math.min/Math.max.
 */

/**
 * [low, high] spanning every finite value in `values`, widened by `pad` × the span on each
 * side and cut to `bounds` (the measure's possible range) when given. When all values are equal,
 * the domain is widened by 1% of the value's magnitude (or 0.01 at zero), so the axis has a
 * span. Null when there is no finite value.
 */
export function fitDomain(values: Iterable<number | null | undefined>, options: { pad?: number; bounds?: [number, number] } = {}): [number, number] | null {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (v === null || v === undefined || !Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (lo > hi) return null;
  const span = hi - lo;
  const pad = span > 0 ? span * (options.pad ?? 0.08) : Math.abs(lo) * 0.01 || 0.01;
  let a = lo - pad;
  let b = hi + pad;
  if (options.bounds) {
    a = Math.max(a, options.bounds[0]);
    b = Math.min(b, options.bounds[1]);
    if (!(a < b)) return [options.bounds[0], options.bounds[1]];
  }
  return [a, b];
}
