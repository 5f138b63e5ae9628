/**
 * The per-row loops of the fused activity pass (internal to `activity-pass.ts`).
 *
 * A row is one unit across all bins. Pass 1 (`scanRow`) classifies every cell and gathers
 * count, sum, Σ|x|, Σmax(0,x), min, max, cells at the max, negatives, nonzeros and whether the
 * row is integer-valued. Pass 2 (`momentsAndBins`) takes the raw mean and gathers the central
 * moment sums Σd², Σd³, Σd⁴ (d = x − mean; two-pass, float64) and, in the same loop, adds the
 * policy-transformed value y to the per-bin accumulators (Σy, Σy², active count). The row is in
 * cache for the second pass. No allocation: results go into a reused `RowScan`/`RowMoments`.
 *
 * Excluded cells (NaN, ±Infinity, missing) are skipped by every sum and counted; rows without
 * any excluded cell take loops with no per-cell checks.
 */
import type { Numeric } from '../types.ts';

export interface RowScan {
  n: number;
  sum: number;
  sumAbs: number;
  sumPos: number;
  min: number;
  max: number;
  negative: number;
  nan: number;
  infinite: number;
  missing: number;
}

export function newRowScan(): RowScan {
  return { n: 0, sum: 0, sumAbs: 0, sumPos: 0, min: 0, max: 0, negative: 0, nan: 0, infinite: 0, missing: 0 };
}

/**
 * Pass 1 over `data[off .. off + bins)`. Without a mask it first runs a loop of only Σx, min
 * and max: a finite Σx proves every cell finite (NaN and ±Infinity propagate); otherwise, or
 * with a mask, it classifies cell by cell. Cost O(bins), no allocation.
 */
export function scanRow(data: Numeric, mask: Uint8Array | undefined, off: number, bins: number, out: RowScan): void {
  if (mask === undefined) {
    let sum = 0, min = Infinity, max = -Infinity;
    for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      sum += x;
      if (x > max) max = x;
      if (x < min) min = x;
    }
    if (sum - sum === 0) {
      out.n = bins;
      out.sum = sum;
      out.min = min;
      out.max = max;
      out.nan = 0;
      out.infinite = 0;
      out.missing = 0;
      if (min >= 0) {
        out.sumAbs = sum;
        out.sumPos = sum;
        out.negative = 0;
      } else {
        let neg = 0, sumPos = 0;
        for (let j = 0; j < bins; j++) {
          const x = data[off + j];
          if (x < 0) neg++;
          else sumPos += x;
        }
        out.negative = neg;
        out.sumPos = sumPos;
        out.sumAbs = 2 * sumPos - sum;
      }
      return;
    }
  }
  let n = 0, sum = 0, sumAbs = 0, sumPos = 0, min = Infinity, max = -Infinity;
  let neg = 0, nan = 0, inf = 0, miss = 0;
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (mask !== undefined && mask[off + j] !== 0) {
      miss++;
      continue;
    }
    if (x - x !== 0) {
      if (x !== x) nan++;
      else inf++;
      continue;
    }
    n++;
    sum += x;
    if (x < 0) {
      neg++;
      sumAbs -= x;
    } else {
      sumAbs += x;
      sumPos += x;
    }
    if (x > max) max = x;
    if (x < min) min = x;
  }
  out.n = n;
  out.sum = sum;
  out.sumAbs = sumAbs;
  out.sumPos = sumPos;
  out.min = min;
  out.max = max;
  out.negative = neg;
  out.nan = nan;
  out.infinite = inf;
  out.missing = miss;
}

/** Per-bin accumulators the rows add into (length `bins` each). */
export interface BinAccumulators {
  partialDefined: Int32Array;
  sum: Float64Array;
  sumSq: Float64Array;
  active: Int32Array;
}

export interface RowMoments {
  s2: number;
  s3: number;
  s4: number;
  /** Σ(y − ȳ)² for rectified rows (mode 1); unused otherwise. */
  s2y: number;
  /** Defined cells with |x| > tol (raw), and cells equal to the row's maximum. */
  nonzero: number;
  atMax: number;
}

export function newRowMoments(): RowMoments {
  return { s2: 0, s3: 0, s4: 0, s2y: 0, nonzero: 0, atMax: 0 };
}

/**
 * How a row's values enter the sparseness measures:
 * 0 = y = x − shiftBy (keep; refuse for a unit without negatives; shift, with shiftBy = min < 0
 *     or 0); 1 = y = max(0, x) (rectify, row holds negatives); 2 = row left out (refused).
 */
export type RowMode = 0 | 1 | 2;

/**
 * Pass 2 over one row: central moment sums of the raw values, nonzero and at-max counts, and,
 * unless mode 2, the per-bin accumulators of y. `clean` = the row has no excluded cell (then
 * `partialDefined` is not touched: the caller counts the row in `fullRows`). Cost O(bins).
 */
export function momentsAndBins(
  data: Numeric,
  mask: Uint8Array | undefined,
  off: number,
  bins: number,
  clean: boolean,
  mean: number,
  max: number,
  mode: RowMode,
  shiftBy: number,
  yMean: number,
  tol: number,
  acc: BinAccumulators,
  out: RowMoments,
): void {
  let s2 = 0, s3 = 0, s4 = 0, s2y = 0, nz = 0, atMax = 0;
  const bs = acc.sum, bq = acc.sumSq, ba = acc.active, bd = acc.partialDefined;
  if (clean && mode === 0 && shiftBy === 0) {
    // The common case: y = x, every cell defined. Branches beat bool-to-number here (V8).
    for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      const d = x - mean;
      const d2 = d * d;
      s2 += d2;
      s3 += d2 * d;
      s4 += d2 * d2;
      bs[j] += x;
      bq[j] += x * x;
      if (x > tol || x < -tol) {
        ba[j]++;
        nz++;
      }
      if (x === max) atMax++;
    }
  } else {
    for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      if (!clean && (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0))) continue;
      const d = x - mean;
      const d2 = d * d;
      s2 += d2;
      s3 += d2 * d;
      s4 += d2 * d2;
      if (x > tol || x < -tol) nz++;
      if (x === max) atMax++;
      if (mode === 2) continue;
      let y: number;
      if (mode === 1) {
        y = x > 0 ? x : 0;
        const e = y - yMean;
        s2y += e * e;
      } else y = x - shiftBy;
      bs[j] += y;
      bq[j] += y * y;
      if (y > tol || y < -tol) ba[j]++;
      if (!clean) bd[j]++;
    }
  }
  out.s2 = s2;
  out.s3 = s3;
  out.s4 = s4;
  out.s2y = s2y;
  out.nonzero = nz;
  out.atMax = atMax;
}

/** Add 1 to `binNegative[j]` for every defined negative cell of the row (only called when it has some). */
export function countBinNegatives(data: Numeric, mask: Uint8Array | undefined, off: number, bins: number, binNegative: Int32Array): void {
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (x < 0 && x !== -Infinity && (mask === undefined || mask[off + j] === 0)) binNegative[j]++;
  }
}

const FNV_PRIME = 16777619;
const FNV_BASIS = 2166136261;
const MIX_PRIME = 0x5bd1e995;

/**
 * Two 32-bit hashes over the row's 32-bit words (a Float32 row: one word a cell; Float64: two)
 * and its missing mask: A is FNV-1a taken word by word (Fowler–Noll–Vo, IETF draft
 * draft-eastlake-fnv), B a multiply–xorshift mix with another constant, each run as two lanes
 * (even and odd words) folded at the end; two rows agree on both only if identical or by an
 * accident of about 2⁻⁶⁴ per pair. Writes into `out[0]`, `out[1]`.
 */
export function hashRow(words: Uint32Array, wordOff: number, wordCount: number, mask: Uint8Array | undefined, off: number, bins: number, out: Uint32Array): void {
  // Two lanes per hash (even and odd words) break the multiply dependency chain; folded at the end.
  let a0 = FNV_BASIS, a1 = FNV_BASIS ^ 0x5a5a5a5a, b0 = 0x9747b28c, b1 = 0x3c6ef372;
  let i = 0;
  for (; i + 1 < wordCount; i += 2) {
    const w0 = words[wordOff + i], w1 = words[wordOff + i + 1];
    a0 = Math.imul(a0 ^ w0, FNV_PRIME);
    a1 = Math.imul(a1 ^ w1, FNV_PRIME);
    b0 = Math.imul(b0 ^ w0, MIX_PRIME);
    b1 = Math.imul(b1 ^ w1, MIX_PRIME);
    b0 ^= b0 >>> 15;
    b1 ^= b1 >>> 15;
  }
  if (i < wordCount) {
    a0 = Math.imul(a0 ^ words[wordOff + i], FNV_PRIME);
    b0 = Math.imul(b0 ^ words[wordOff + i], MIX_PRIME);
  }
  if (mask !== undefined) {
    for (let j = 0; j < bins; j++) {
      const m = mask[off + j];
      a0 = Math.imul(a0 ^ m, FNV_PRIME);
      b0 = Math.imul(b0 ^ m, MIX_PRIME);
      b0 ^= b0 >>> 15;
    }
  }
  let a = Math.imul(a0 ^ (a1 >>> 16) ^ (a1 << 16), FNV_PRIME) ^ a1;
  let b = Math.imul(b0 ^ wordCount, MIX_PRIME) ^ b1;
  b ^= b >>> 13;
  a ^= a >>> 16;
  out[0] = a >>> 0;
  out[1] = b >>> 0;
}
