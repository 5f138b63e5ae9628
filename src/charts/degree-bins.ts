/**
 * Bins for a histogram of integer degrees, chosen from the data: one bar per integer while the
 * degrees span at most `maxBars` values, otherwise bins of a whole-number width `w` aligned to
 * multiples of `w`. Each bar is drawn centred on its integers (from start − 0.5 to end + 0.5),
 * so a bar never spans two labels as if it covered the values between them, and a single degree
 * (every node of a dense layer has the same degree) is one narrow bar on a short axis around it.
 */

export interface DegreeBin {
  /** First and last degree in the bin (equal for one-integer bins). */
  first: number;
  last: number;
  /** Bar edges: first − 0.5 and last + 0.5. */
  x0: number;
  x1: number;
  /** Nodes with a degree in [first, last]. */
  count: number;
  /** "47" or "40–49". */
  label: string;
}

/**
 * Bins of `rows` (degree → count; degrees are whole numbers ≥ 0) and the x domain to draw them
 * on. `width` fixes the bin width (to share bins between panels); otherwise it is chosen from
 * the span of the degrees and `maxBars`.
 */
export function degreeBins(rows: { degree: number; count: number }[], options: { maxBars?: number; width?: number } = {}): { bins: DegreeBin[]; width: number; domain: [number, number] } {
  const maxBars = options.maxBars ?? 40;
  let lo = Infinity;
  let hi = -Infinity;
  for (const r of rows) {
    if (r.degree < lo) lo = r.degree;
    if (r.degree > hi) hi = r.degree;
  }
  if (lo > hi) return { bins: [], width: 1, domain: [0, 1] };
  const span = hi - lo + 1;
  const width = options.width ?? (span <= maxBars ? 1 : Math.ceil(span / maxBars));
  const counts = new Map<number, number>();
  for (const r of rows) {
    const start = Math.floor(r.degree / width) * width;
    counts.set(start, (counts.get(start) ?? 0) + r.count);
  }
  const bins = [...counts.entries()]
    .sort((a, b) => a[0] - b[0])
    .map(([start, count]) => {
      const last = start + width - 1;
      return { first: start, last, x0: start - 0.5, x1: last + 0.5, count, label: width === 1 ? String(start) : `${start}–${last}` };
    });
  // At least five integers of axis, so one bar is not stretched over the whole plot.
  const first = bins[0]!.x0;
  const end = bins[bins.length - 1]!.x1;
  const extra = Math.max(0, 5 - (end - first)) / 2;
  return { bins, width, domain: [first - extra, end + extra] };
}
