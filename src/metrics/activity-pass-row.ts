/**
 * The per-row loops of the fused activity pass (internal to `activity-pass.ts`).
 *
 * A row is one unit across all bins. Pass 1 (`scanRow`) classifies every cell and gathers
 * count, Σx, Σ|x|, Σmax(0,x), min, max and negatives. Pass 2 (`rowMoments`) takes the raw
 * mean and gathers the moment sums Σd, Σd², Σd³, Σd⁴ (d = x − mean; two-pass, float64); Σd
 * corrects the plain Σx/n of pass 1 (see `correctMoments`),
 * nonzero and at-max counts and, in the same loop, adds the policy-transformed value y to the
 * per-bin accumulators (Σy, Σy², active count). The row is in cache for the second pass. No
 * allocation: results go into a reused `RowScan`/`RowMoments`.
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
      cleanScan(data, off, bins, sum, min, max, out);
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

/** Fill `out` for a row known to have no excluded cell, from Σx, min and max (one more loop only when min < 0). */
export function cleanScan(data: Numeric, off: number, bins: number, sum: number, min: number, max: number, out: RowScan): void {
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
    return;
  }
  let neg = 0, sumPos = 0;
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (x < 0) neg++;
    else sumPos += x;
  }
  out.negative = neg;
  out.sumPos = sumPos;
  out.sumAbs = 2 * sumPos - sum; // Σ|x| = Σ⁺ − Σ⁻ and Σx = Σ⁺ + Σ⁻
}

/** Per-bin accumulators the rows add into (length `bins` each). */
export interface BinAccumulators {
  partialDefined: Int32Array;
  sum: Float64Array;
  sumSq: Float64Array;
  /** Raw |x| > tol, every unit (density). */
  active: Int32Array;
  /** Defined cells of refused units (density's denominator with the others). */
  refusedDefined: Int32Array;
}

export interface RowMoments {
  /** Σd, d = x − mean: n times the error of the pass-1 mean (exact d: x and mean are close). */
  s1: number;
  s2: number;
  s3: number;
  s4: number;
  /** Σ(y − ȳ)² for rectified rows (mode 1); unused otherwise. */
  s2y: number;
  /** Defined cells with |x| > tol (raw), and cells equal to the row's maximum. */
  nonzero: number;
  atMax: number;
  /** True when `hist` was given and every value was an integer in range: it then holds the row's counts. */
  histOk: boolean;
}

export function newRowMoments(): RowMoments {
  return { s1: 0, s2: 0, s3: 0, s4: 0, s2y: 0, nonzero: 0, atMax: 0, histOk: false };
}

/**
 * How a row's values enter the sparseness measures:
 * 0 = y = x − shiftBy (keep; refuse for a unit without negatives; shift, with shiftBy = min < 0
 *     or 0); 1 = y = max(0, x) (rectify, row holds negatives); 2 = row left out (refused).
 */
export type RowMode = 0 | 1 | 2;


/** Add 1 to `binNegative[j]` for every defined negative cell of the row (only called when it has some). */
export function countBinNegatives(data: Numeric, mask: Uint8Array | undefined, off: number, bins: number, binNegative: Int32Array): void {
  for (let j = 0; j < bins; j++) {
    const x = data[off + j];
    if (x < 0 && x !== -Infinity && (mask === undefined || mask[off + j] === 0)) binNegative[j]++;
  }
}

/**
 * Pass 2 over one row: central moment sums of the raw values about the raw mean (two-pass),
 * nonzero and at-max counts, Σ(y − ȳ)² for rectified rows (mode 1), and, when `hist` is given
 * (zeroed, length > max; clean rows with min ≥ 0), the counting-sort histogram for the Gini
 * index. When every value is an integer the moments then come from the histogram in O(range):
 * Σ h[v]·(v − mean)^k, one term per distinct value. `histFilled`: the scan already counted the
 * row into `hist` (every value an integer in range), so only the O(range) part runs. The per-bin
 * sums are added separately, tile by tile (activity-pass-bins.ts). Cost O(bins).
 */
export function rowMoments(
  data: Numeric,
  mask: Uint8Array | undefined,
  off: number,
  bins: number,
  clean: boolean,
  mean: number,
  max: number,
  mode: RowMode,
  yMean: number,
  tol: number,
  hist: Int32Array | null,
  out: RowMoments,
  histFilled = false,
): void {
  let s1 = 0, s2 = 0, s3 = 0, s4 = 0, s2y = 0, nz = 0, atMax = 0;
  out.histOk = false;
  let done = false;
  if (hist !== null && clean && mode === 0) {
    let intOk = true;
    if (!histFilled) for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      const i = x | 0;
      if (i === x) hist[i]++;
      else {
        intOk = false;
        break;
      }
    }
    out.histOk = intOk;
    if (intOk) {
      const top = max | 0;
      for (let v = 0; v <= top; v++) {
        const h = hist[v];
        if (h === 0) continue;
        const d = v - mean;
        const d2 = d * d;
        s1 += h * d;
        s2 += h * d2;
        s3 += h * d2 * d;
        s4 += h * d2 * d2;
        if (v > tol) nz += h;
      }
      atMax = hist[top];
      done = true;
    }
  }
  if (!done) {
    for (let j = 0; j < bins; j++) {
      const x = data[off + j];
      if (!clean && (x - x !== 0 || (mask !== undefined && mask[off + j] !== 0))) continue;
      const d = x - mean;
      const d2 = d * d;
      s1 += d;
      s2 += d2;
      s3 += d2 * d;
      s4 += d2 * d2;
      if (x > tol || x < -tol) nz++;
      if (x === max) atMax++;
      if (mode === 1) {
        const e = (x > 0 ? x : 0) - yMean;
        s2y += e * e;
      }
    }
  }
  out.s1 = s1;
  out.s2 = s2;
  out.s3 = s3;
  out.s4 = s4;
  out.s2y = s2y;
  out.nonzero = nz;
  out.atMax = atMax;
}

/**
 * Move the moment sums of `m` from the pass-1 mean `h` to the mean h + e, e = Σd / n, in place,
 * and return that mean. Pass 1's Σx is a plain sum: on values sitting on a large offset its
 * error, though tiny relative to the offset, is not tiny relative to the spread (at offset 1e9,
 * noise sd 2, g2 was off by 1.6e-6). The d = x − h are exact, so Σd gives the error and the
 * binomial theorem shifts Σd², Σd³, Σd⁴ to the corrected mean: the "corrected two-pass"
 * algorithm (Chan, Golub & LeVeque 1983, The American Statistician 37:242–247), carried to the
 * third and fourth moments as in `momentsOf` (moments.ts). O(1).
 */
export function correctMoments(m: RowMoments, h: number, n: number): number {
  const e = m.s1 / n;
  if (e === 0) return h;
  const S2 = m.s2, S3 = m.s3, e2 = e * e;
  m.s2 = S2 - n * e2;
  m.s3 = S3 - 3 * e * S2 + 2 * n * e2 * e;
  m.s4 = m.s4 - 4 * e * S3 + 6 * e2 * S2 - 3 * n * e2 * e2;
  m.s1 = 0;
  return h + e;
}
