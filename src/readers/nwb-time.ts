/**
 * Time → bin arithmetic shared by the NWB units and time-series readers.
 *
 * Bins are half-open, `[k·w, (k+1)·w)` with `w = binMs / 1000` seconds, counted from a time
 * origin chosen by the caller. Times stored as decimal seconds are rarely exact in binary
 * floating point (0.3 / 0.1 = 2.9999999999999996), so a time within `EDGE_TOLERANCE` bins
 * of a bin edge is treated as lying on that edge, and an edge belongs to the bin it starts.
 * Without this, a 10 Hz series binned at 100 ms would put two samples into one bin and none
 * into the next.
 *
 * The tolerance is a few units in the last place of the quotient `x = t · 1000 / binMs`: a
 * decimal time read into a double, multiplied and divided, is off by at most about 1.5 ulp of
 * `x` (each of the three roundings adds half an ulp; Goldberg 1991, "What every computer
 * scientist should know about floating-point arithmetic", §1.2). A wider tolerance moves real
 * spikes: at 2102.6999995 s, 0.5 µs before a 100 ms edge, a tolerance of 1e-9 · x (2e-5 bins)
 * would put the spike in the next bin.
 */

/** Distance to an edge, relative to max(1, |x|), under which a time counts as on the edge: 4 ε (4–8 ulps). */
export const EDGE_TOLERANCE = 4 * Number.EPSILON;

function nearEdge(x: number): number | null {
  const r = Math.round(x);
  return Math.abs(x - r) <= EDGE_TOLERANCE * Math.max(1, Math.abs(x)) ? r : null;
}

/**
 * Index of the bin holding time `x` expressed in bins (`x = t_seconds · 1000 / binMs`):
 * `⌊x⌋`, or the nearest edge when `x` is within tolerance of one. O(1).
 */
export function binOf(x: number): number {
  const r = nearEdge(x);
  return r !== null ? r : Math.floor(x);
}

/**
 * Number of bins needed to cover `[0, x)` where `x` is a time in bins: `⌈x⌉`, or the nearest
 * edge when `x` is within tolerance of one. O(1).
 */
export function binsToCover(x: number): number {
  const r = nearEdge(x);
  return r !== null ? r : Math.ceil(x);
}

/**
 * The bins an observation interval `[s, e]` (seconds) covers with positive length:
 * bin k is covered when `s < (k+1)·w` and `e > k·w`. Returned as a half-open range of bin
 * indices `[first, end)`, clamped below at 0; empty (`end <= first`) for zero-length intervals
 * that sit on a bin edge. A bin partly covered counts as covered (see nwb-units.ts).
 */
export function coveredBins(startS: number, endS: number, binMs: number): [number, number] {
  const first = Math.max(0, binOf((startS * 1000) / binMs));
  const end = Math.max(0, binsToCover((endS * 1000) / binMs));
  if (endS <= startS) return [first, first];
  return [first, end];
}

/**
 * Merge half-open ranges `[a, b)` given as flat pairs into sorted, disjoint ranges
 * (touching ranges are joined). Cost O(n log n) for n ranges. Empty ranges are dropped.
 */
export function mergeRanges(pairs: number[]): number[] {
  const items: [number, number][] = [];
  for (let i = 0; i < pairs.length; i += 2) if (pairs[i + 1] > pairs[i]) items.push([pairs[i], pairs[i + 1]]);
  items.sort((p, q) => p[0] - q[0]);
  const out: number[] = [];
  for (const [a, b] of items) {
    const n = out.length;
    if (n > 0 && a <= out[n - 1]) out[n - 1] = Math.max(out[n - 1], b);
    else out.push(a, b);
  }
  return out;
}

/** Whether `bin` lies in one of the sorted disjoint ranges `ranges[lo..hi)` (flat pairs). O(log n). */
export function inRanges(ranges: Float64Array, lo: number, hi: number, bin: number): boolean {
  // lo, hi index pairs: pair j is ranges[2j], ranges[2j+1].
  let a = lo;
  let b = hi;
  while (a < b) {
    const m = (a + b) >>> 1;
    if (ranges[2 * m + 1] <= bin) a = m + 1;
    else b = m;
  }
  return a < hi && ranges[2 * a] <= bin;
}
