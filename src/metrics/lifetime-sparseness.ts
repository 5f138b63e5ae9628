/**
 * Lifetime sparseness: for each unit (a ROW of the units × bins matrix), the Vinje–Gallant
 * sparseness of its responses across all time bins or stimuli (the COLUMNS):
 *
 *     a_i = (Σ_j r_ij)² / (n · Σ_j r_ij²),   S_i = (1 − a_i) / (1 − 1/n),   n = cols (bins)
 *
 * Lifetime sparseness asks how rarely one unit responds; population sparseness
 * (`populationSparseness`) how few units respond at once. Willmore & Tolhurst (2001) set out the
 * distinction; S is Vinje & Gallant's (2000).
 *
 * Returns `{ perUnit, mean, median, defined, undefined, negativeUnits }`:
 *  - `perUnit`: S_i for every row; NaN where undefined — a silent unit (all zeros, 0/0) or fewer than 2 bins;
 *  - `mean`, `median`: over defined units only; null when none is defined;
 *  - `defined`, `undefined`: counts of units with and without a value;
 *  - `negativeUnits`: units with at least one negative value (not clipped; their S can exceed 1).
 *
 * Non-finite cells throw a `RangeError` naming row, column and flat index. Matrix layout: row-major
 * `DenseMatrix` (rows = units, cols = bins), or an ml-matrix `Matrix`.
 *
 * Sources: W. E. Vinje & J. L. Gallant (2000), Science 287:1273–1276; B. Willmore & D. J. Tolhurst
 * (2001), Network 12:255–270. Cost: one pass in storage order (a second only for values beyond
 * 2^±400), O(rows·cols), plus a sort of the defined values for the median.
 */
import { nonFiniteCellError, scaleFor } from './check.ts';
import { summarizeDefined } from './defined-summary.ts';
import { toDenseMatrix, type MatrixInput } from './matrix.ts';

export interface LifetimeSparseness {
  perUnit: Float64Array;
  mean: number | null;
  median: number | null;
  defined: number;
  undefined: number;
  negativeUnits: number;
}

export function lifetimeSparseness(matrix: MatrixInput): LifetimeSparseness {
  const { rows, cols, data } = toDenseMatrix('lifetimeSparseness', matrix);
  const perUnit = new Float64Array(rows);
  let maxAbs = 0;
  let negativeUnits = 0;
  // Pass 1 (always): check, max |x|, negatives, and the unscaled per-row values.
  for (let i = 0; i < rows; i++) {
    const r = rowSparseness(data, i, cols, 1);
    perUnit[i] = r.S;
    if (r.negative) negativeUnits++;
    if (r.maxAbs > maxAbs) maxAbs = r.maxAbs;
  }
  const k = scaleFor(maxAbs);
  if (k !== 1) for (let i = 0; i < rows; i++) perUnit[i] = rowSparseness(data, i, cols, k).S;
  return { perUnit, ...summarizeDefined(perUnit), negativeUnits };
}

function rowSparseness(data: ArrayLike<number>, i: number, cols: number, k: number) {
  let s1 = 0, c1 = 0, s2 = 0, c2 = 0, maxAbs = 0;
  let negative = false;
  const start = i * cols;
  for (let j = 0; j < cols; j++) {
    const v = data[start + j];
    if (!Number.isFinite(v)) throw nonFiniteCellError('lifetimeSparseness', start + j, cols, v);
    if (v < 0) negative = true;
    const a = Math.abs(v);
    if (a > maxAbs) maxAbs = a;
    const y = v * k;
    let t = s1 + y;
    c1 += Math.abs(s1) >= Math.abs(y) ? s1 - t + y : y - t + s1;
    s1 = t;
    const q = y * y;
    t = s2 + q;
    c2 += s2 >= q ? s2 - t + q : q - t + s2;
    s2 = t;
  }
  const s = s1 + c1;
  const q = s2 + c2;
  const S = cols < 2 || q === 0 ? NaN : (cols * (1 - (s * s) / (cols * q))) / (cols - 1);
  return { S, negative, maxAbs };
}
