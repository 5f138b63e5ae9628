/**
 * Event bins in fluorescence traces, per unit (internal to `activity-pass.ts`).
 *
 * Noise is estimated robustly from the unit's own defined values (the whole row, or a baseline
 * window of bins): median m and median absolute deviation MAD = median(|x − m|) (Hampel 1974,
 * JASA 69:383–393). σ̂ = 1.4826 · MAD, the factor that makes the MAD consistent for the standard
 * deviation of normal data (1/Φ⁻¹(3/4) ≈ 1.4826; Rousseeuw & Croux 1993, JASA 88:1273–1283).
 * A cell is an event bin when x > m + k·σ̂ (raw values; the negatives policy does not apply).
 * Each bin above threshold counts once: runs of bins are not merged into one transient.
 *
 * Even counts take the mean of the two middle values (as numpy's `median`). A unit with no
 * defined baseline cell or σ̂ = 0 has no threshold: its events are undefined (count −1) and it
 * is left out of the per-bin event counts. Cost: two quickselects over the window, O(bins)
 * expected, in a reused scratch buffer.
 */
import type { Numeric } from '../types.ts';

/** Consistency constant for the MAD under normality (Rousseeuw & Croux 1993). */
export const MAD_TO_SD = 1.4826;

/** Put the k-th smallest of a[lo..hi] (inclusive) at a[k]; smaller ones before it. Hoare partition, median-of-three. */
function select(a: Float64Array, lo: number, hi: number, k: number): void {
  while (hi > lo) {
    const mid = (lo + hi) >>> 1;
    // median of three into a[mid]
    if (a[mid] < a[lo]) swap(a, mid, lo);
    if (a[hi] < a[lo]) swap(a, hi, lo);
    if (a[hi] < a[mid]) swap(a, hi, mid);
    const p = a[mid];
    let i = lo, j = hi;
    while (i <= j) {
      while (a[i] < p) i++;
      while (a[j] > p) j--;
      if (i <= j) {
        swap(a, i, j);
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

function swap(a: Float64Array, i: number, j: number): void {
  const t = a[i];
  a[i] = a[j];
  a[j] = t;
}

/** Median of a[0..n) (reorders a). NaN when n = 0. */
export function medianInPlace(a: Float64Array, n: number): number {
  if (n === 0) return NaN;
  const k = n >>> 1;
  select(a, 0, n - 1, k);
  const upper = a[k];
  if (n % 2 === 1) return upper;
  let lower = a[0];
  for (let i = 1; i < k; i++) if (a[i] > lower) lower = a[i];
  return (lower + upper) / 2;
}

export interface RowEvents {
  median: number;
  robustSd: number;
  /** Event bins in the row; −1 when undefined. */
  count: number;
}

/**
 * Median, σ̂ and event bins of one row; adds the row to `binEvents` (and to `binPartial` when
 * the row has excluded cells; a clean row is counted by the caller in `eventFullRows`).
 */
export function rowEvents(
  data: Numeric,
  mask: Uint8Array | undefined,
  off: number,
  bins: number,
  k: number,
  window: [number, number] | undefined,
  clean: boolean,
  scratch: Float64Array,
  binEvents: Int32Array,
  binPartial: Int32Array,
  out: RowEvents,
): void {
  const start = window ? window[0] : 0;
  const end = window ? window[1] : bins;
  let m = 0;
  for (let j = start; j < end; j++) {
    const x = data[off + j];
    if (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0)) continue;
    scratch[m++] = x;
  }
  const med = medianInPlace(scratch, m);
  for (let i = 0; i < m; i++) scratch[i] = Math.abs(scratch[i] - med);
  const sd = MAD_TO_SD * medianInPlace(scratch, m);
  out.median = med;
  out.robustSd = sd;
  if (!(sd > 0)) {
    out.count = -1;
    return;
  }
  const thr = med + k * sd;
  let count = 0;
  if (clean) {
    for (let j = 0; j < bins; j++) {
      if (data[off + j] > thr) {
        count++;
        binEvents[j]++;
      }
    }
  } else {
    for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      if (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0)) continue;
      binPartial[j]++;
      if (x > thr) {
        count++;
        binEvents[j]++;
      }
    }
  }
  out.count = count;
}
