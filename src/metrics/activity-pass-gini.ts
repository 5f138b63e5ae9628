/**
 * Gini index of one row for the fused activity pass (internal to `activity-pass.ts`).
 *
 * Hurley & Rickard (2009), "Comparing measures of sparsity", IEEE Trans. Inf. Theory 55:4723–4741:
 * with c = |y| sorted ascending (k = 1..N), G = 1 − 2 Σ_k (c_(k)/‖c‖₁)·((N − k + ½)/N).
 * 0 when all equal, 1 − 1/N for one nonzero; undefined (NaN) when ‖c‖₁ = 0.
 *
 * Integer-valued rows with a small range (spike counts) are counted into a histogram instead of
 * sorted: for a value v held by c cells at ranks K+1..K+c, Σ_k (N − k + ½) = c(N + ½) − cK − c(c+1)/2,
 * so the cost is O(bins + range). Other rows are copied into a scratch buffer and sorted,
 * O(bins log bins). y = the policy-transformed value (mode 0: x − shiftBy, mode 1: max(0, x)).
 */
import type { Numeric } from '../types.ts';

/** Largest value range counted with a histogram instead of a sort. */
export const COUNTING_RANGE_LIMIT = 1 << 16;

export interface GiniScratch {
  sorted: Float64Array;
  hist: Int32Array | null;
}

export function newGiniScratch(bins: number): GiniScratch {
  return { sorted: new Float64Array(bins), hist: null };
}

export function rowGini(
  data: Numeric,
  mask: Uint8Array | undefined,
  off: number,
  bins: number,
  n: number,
  l1: number,
  mode: 0 | 1,
  shiftBy: number,
  maxAbsY: number,
  scratch: GiniScratch,
): number {
  if (!(l1 > 0) || n === 0) return NaN;
  const range = Math.ceil(maxAbsY);
  if (range <= COUNTING_RANGE_LIMIT && range <= 2 * n) {
    const g = histogramGini(data, mask, off, bins, n, l1, mode, shiftBy, range, scratch);
    if (g === g) return g; // NaN: a value was not an integer, sort instead
  }
  const s = scratch.sorted;
  let m = 0;
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0)) continue;
    const y = mode === 1 ? (x > 0 ? x : 0) : x - shiftBy;
    s[m++] = y < 0 ? -y : y;
  }
  const view = s.subarray(0, m);
  view.sort();
  let acc = 0;
  for (let i = 0; i < m; i++) acc += view[i] * (m - i - 0.5);
  return 1 - (2 * acc) / (l1 * m);
}

/** Gini by counting sort; NaN as soon as a |y| is not an integer (the caller then sorts). */
function histogramGini(
  data: Numeric,
  mask: Uint8Array | undefined,
  off: number,
  bins: number,
  n: number,
  l1: number,
  mode: 0 | 1,
  shiftBy: number,
  range: number,
  scratch: GiniScratch,
): number {
  const h = zeroedHistogram(scratch, range, bins);
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0)) continue;
    const y = mode === 1 ? (x > 0 ? x : 0) : x - shiftBy;
    const v = y < 0 ? -y : y;
    const i = v | 0;
    if (i !== v) return NaN;
    h[i]++;
  }
  return giniFromHistogram(h, range, n, l1);
}

/** Gini from counts h[v] of the integer magnitudes v = 0..range (n values, ‖c‖₁ = l1 > 0). */
export function giniFromHistogram(h: Int32Array, range: number, n: number, l1: number): number {
  let acc = 0;
  let k = h[0];
  const np = n + 0.5;
  for (let v = 1; v <= range; v++) {
    const c = h[v];
    if (c === 0) continue;
    acc += v * (c * np - c * k - (c * (c + 1)) / 2);
    k += c;
  }
  return 1 - (2 * acc) / (l1 * n);
}

/** A zeroed histogram of at least range + 1 counts, grown in `scratch` when needed. */
export function zeroedHistogram(scratch: GiniScratch, range: number, bins: number): Int32Array {
  if (scratch.hist === null || scratch.hist.length < range + 1) {
    scratch.hist = new Int32Array(Math.min(COUNTING_RANGE_LIMIT, Math.max(range, 2 * bins, 64)) + 1);
  }
  scratch.hist.fill(0, 0, range + 1);
  return scratch.hist;
}
