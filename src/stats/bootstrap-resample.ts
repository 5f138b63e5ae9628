/**
 * Bootstrap distributions: the statistic recomputed on `resamples` resamples of n items.
 *
 * Schemes:
 * - `iid` (Efron 1979, Ann. Statist. 7:1–26): n item indices drawn uniformly with replacement,
 *   each by `rng.int(n)` in order.
 * - `moving-block` (Künsch 1989, Ann. Statist. 17:1217–1241): k = ⌈n/ℓ⌉ blocks of ℓ consecutive
 *   items, each starting at `rng.int(n − ℓ + 1)` (uniform over the n − ℓ + 1 overlapping blocks),
 *   laid end to end; the last block is truncated so the resample has exactly n items
 *   (it keeps its first n − (k − 1)ℓ items). No wrap-around (that would be the circular scheme).
 *
 * With ℓ = 1 both schemes draw the same indices (`rng.int(n)` each), so they give the same resamples.
 *
 * For sums (mean, ratio) no resample is materialised: iid (and ℓ = 1) accumulates the drawn
 * items; moving blocks take each block's sum as a difference of compensated prefix sums, O(1)
 * per block.
 * Cost: iid O(n) per resample; moving-block O(n/ℓ) per resample (+ O(n) once for the prefixes).
 */
import type { Random } from './random.ts';

export type ResamplingScheme = 'iid' | 'moving-block';

/**
 * Prefix sums P[0] = 0, P[i] = x[0] + … + x[i−1], accumulated with Neumaier's compensated sum
 * (Neumaier 1974, ZAMM 54:39–51) so that each P[i] is the correctly rounded running total to
 * within a few ulps. A block's sum is then P[s + L] − P[s]. Cost: O(n), one Float64Array(n + 1).
 */
export function compensatedPrefixSums(x: Float64Array): Float64Array {
  const P = new Float64Array(x.length + 1);
  let s = 0;
  let c = 0;
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    const t = s + v;
    if (Math.abs(s) >= Math.abs(v)) c += s - t + v;
    else c += v - t + s;
    s = t;
    P[i + 1] = s + c;
  }
  return P;
}

/**
 * Bootstrap distribution of Σnum* / Σden* over resamples (den = null: the mean, Σx* divided by n).
 * Arrays must be finite (not checked here). A resample whose denominator sum is 0 gives NaN
 * (±Infinity when the numerator is not 0), left for the caller to count.
 */
export function resampleRatioOfSums(
  num: Float64Array,
  den: Float64Array | null,
  scheme: ResamplingScheme,
  blockLength: number,
  resamples: number,
  rng: Random,
): Float64Array {
  const n = num.length;
  const out = new Float64Array(resamples);
  if (scheme === 'iid' || blockLength === 1) {
    // Moving blocks of length 1 are iid draws: starts `rng.int(n)`, the very same stream.
    const idx = new Int32Array(n);
    for (let b = 0; b < resamples; b++) {
      rng.fillInt(n, idx);
      let sn = 0;
      if (den === null) {
        for (let i = 0; i < n; i++) sn += num[idx[i]];
        out[b] = sn / n;
      } else {
        let sd = 0;
        for (let i = 0; i < n; i++) {
          sn += num[idx[i]];
          sd += den[idx[i]];
        }
        out[b] = sn / sd;
      }
    }
    return out;
  }
  const l = blockLength;
  const k = Math.ceil(n / l);
  const lastLength = n - (k - 1) * l;
  const starts = n - l + 1;
  const PN = compensatedPrefixSums(num);
  const PD = den === null ? null : compensatedPrefixSums(den);
  const idx = new Int32Array(k);
  for (let b = 0; b < resamples; b++) {
    rng.fillInt(starts, idx);
    let sn = 0;
    let sd = 0;
    for (let j = 0; j < k; j++) {
      const s = idx[j];
      const e = s + (j === k - 1 ? lastLength : l);
      sn += PN[e] - PN[s];
      if (PD !== null) sd += PD[e] - PD[s];
    }
    out[b] = PD === null ? sn / n : sn / sd;
  }
  return out;
}

/**
 * Bootstrap distribution of `fn` on materialised resamples (same draws as above). `fn` gets
 * one reused scratch array of length n per resample; it may reorder it but must not keep it.
 * Cost: O(n) per resample plus the cost of `fn`.
 */
export function resampleFunction(
  values: Float64Array,
  fn: (sample: Float64Array) => number,
  scheme: ResamplingScheme,
  blockLength: number,
  resamples: number,
  rng: Random,
): Float64Array {
  const n = values.length;
  const out = new Float64Array(resamples);
  const scratch = new Float64Array(n);
  const l = scheme === 'iid' ? 1 : blockLength;
  const k = Math.ceil(n / l);
  const lastLength = n - (k - 1) * l;
  const idx = new Int32Array(k);
  for (let b = 0; b < resamples; b++) {
    rng.fillInt(n - l + 1, idx);
    if (l === 1) {
      for (let i = 0; i < n; i++) scratch[i] = values[idx[i]];
    } else {
      for (let j = 0; j < k; j++) {
        const s = idx[j];
        scratch.set(values.subarray(s, s + (j === k - 1 ? lastLength : l)), j * l);
      }
    }
    out[b] = fn(scratch);
  }
  return out;
}
