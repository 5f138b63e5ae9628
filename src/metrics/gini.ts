/**
 * Gini index as a sparsity measure (Hurley & Rickard 2009). With the magnitudes |c| sorted
 * ascending, c_(1) ≤ … ≤ c_(N):
 *
 *     G = 1 − 2 Σ_{k=1..N} (c_(k) / ‖c‖₁) · (N − k + ½) / N
 *
 * G = 0 when all magnitudes are equal, 1 − 1/N when one element is nonzero; a binary vector with
 * k of N active gives 1 − k/N. It is scale-invariant (G(αc) = G(c) for α ≠ 0).
 *
 * - All-zero or empty input (‖c‖₁ = 0) → `null` (0/0), never 0 or 1.
 * - Negative values: the published definition works on magnitudes, so −3 counts as 3 (not clipped,
 *   not dropped); `scanValues` counts negatives for the caller.
 * - NaN / ±Infinity throw a `RangeError` naming the index.
 *
 * Cost: a checking pass, then either
 *  - counting sort, O(N + M) time and 4(M + 1) bytes, when every |c| is an integer and the largest,
 *    M, is at most max(2N, 1024) and at most 2²² (spike counts, binary data); a run of m equal
 *    values at ranks s+1…s+m contributes v·[m(N + ½) − m·s − m(m + 1)/2] in closed form; or
 *  - a Float64Array copy of |c| sorted ascending, O(N log N) time, 8N bytes.
 * Both paths accumulate with Neumaier compensation. The input is never modified.
 *
 * Source: N. Hurley & S. Rickard (2009), "Comparing measures of sparsity", IEEE Trans. Inf.
 * Theory 55:4723–4741.
 *
 * @example giniIndex([1, 2, 3, 4]) // → 0.25
 */
import { nonFiniteError, scaleFor } from './check.ts';

/** Largest integer magnitude the counting-sort path accepts (its counts table is 4(M + 1) bytes). */
export const GINI_COUNTING_MAX = 2 ** 22;

export function giniIndex(x: ArrayLike<number>): number | null {
  const n = x.length;
  let maxAbs = 0;
  let allInteger = true;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (!Number.isFinite(v)) throw nonFiniteError('giniIndex', i, v);
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
    if (allInteger && a !== Math.floor(a)) allInteger = false;
  }
  if (n === 0 || maxAbs === 0) return null;
  const useCounting = allInteger && maxAbs <= Math.max(2 * n, 1024) && maxAbs <= GINI_COUNTING_MAX;
  const { weighted, total } = useCounting ? countingSums(x, maxAbs) : sortedSums(x, scaleFor(maxAbs));
  // G = 1 − (2 / (N‖c‖₁)) Σ c_(k)(N − k + ½)
  return 1 - (2 * weighted) / (n * total);
}

/** Σ c_(k)(N − k + ½) and ‖c‖₁ by counting sort of integer magnitudes 0…maxAbs. */
function countingSums(x: ArrayLike<number>, maxAbs: number): { weighted: number; total: number } {
  const n = x.length;
  const counts = new Uint32Array(maxAbs + 1);
  for (let i = 0; i < n; i++) counts[Math.abs(x[i])]++;
  let s = counts[0]; // ranks taken so far (zeros contribute nothing)
  let w = 0, cw = 0, t = 0, ct = 0;
  for (let v = 1; v <= maxAbs; v++) {
    const m = counts[v];
    if (m === 0) continue;
    const term = v * (m * (n + 0.5) - m * s - (m * (m + 1)) / 2);
    let u = w + term;
    cw += Math.abs(w) >= Math.abs(term) ? w - u + term : term - u + w;
    w = u;
    const vm = v * m;
    u = t + vm;
    ct += t >= vm ? t - u + vm : vm - u + t;
    t = u;
    s += m;
  }
  return { weighted: w + cw, total: t + ct };
}

/** Σ c_(k)(N − k + ½) and ‖c‖₁ from a sorted copy of k·|c| (k: exact power-of-two scale, overflow guard). */
function sortedSums(x: ArrayLike<number>, k: number): { weighted: number; total: number } {
  const n = x.length;
  const c = new Float64Array(n);
  for (let i = 0; i < n; i++) c[i] = Math.abs(x[i]) * k;
  c.sort();
  let w = 0, cw = 0, t = 0, ct = 0;
  for (let i = 0; i < n; i++) {
    const v = c[i];
    const term = v * (n - (i + 1) + 0.5);
    let u = w + term;
    cw += w >= term ? w - u + term : term - u + w;
    w = u;
    u = t + v;
    ct += t >= v ? t - u + v : v - u + t;
    t = u;
  }
  return { weighted: w + cw, total: t + ct };
}
