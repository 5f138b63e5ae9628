/**
 * Population sparseness: for each time bin or stimulus (a COLUMN of the units × bins matrix),
 * the Vinje–Gallant sparseness of the responses of all units (the ROWS) in that bin:
 *
 *     a_j = (Σ_i r_ij)² / (n · Σ_i r_ij²),   S_j = (1 − a_j) / (1 − 1/n),   n = rows (units)
 *
 * Population sparseness asks how few units are active at one moment; lifetime sparseness
 * (`lifetimeSparseness`) asks how rarely one unit is active across moments. The two differ and
 * must not be confused: Willmore & Tolhurst (2001). S: Vinje & Gallant (2000).
 *
 * Returns `{ perBin, mean, median, defined, undefined, negativeBins }`:
 *  - `perBin`: S_j for every column; NaN where undefined — an all-zero bin (0/0) or fewer than 2 units;
 *  - `mean`, `median`: over defined bins only; null when no bin is defined;
 *  - `defined`, `undefined`: the counts of bins with and without a value;
 *  - `negativeBins`: bins holding at least one negative value. Negatives are NOT clipped, so such a
 *    bin's S can exceed 1 (see `vinjeGallantSparseness`); the caller reports them.
 *
 * Non-finite cells throw a `RangeError` naming row, column and flat index. Matrix layout: row-major
 * `DenseMatrix` (rows = units, cols = bins), or an ml-matrix `Matrix`.
 *
 * Sources: W. E. Vinje & J. L. Gallant (2000), Science 287:1273–1276; B. Willmore & D. J. Tolhurst
 * (2001), "Characterizing the sparseness of neural codes", Network 12:255–270.
 * Cost: one pass over the matrix in storage order (a second only for values beyond 2^±400),
 * 4·8·cols bytes of per-column compensated sums, plus a sort of the defined values for the median.
 */
import { nonFiniteCellError, scaleFor } from './check.ts';
import { summarizeDefined } from './defined-summary.ts';
import { toDenseMatrix, type MatrixInput } from './matrix.ts';

export interface PopulationSparseness {
  perBin: Float64Array;
  mean: number | null;
  median: number | null;
  defined: number;
  undefined: number;
  negativeBins: number;
}

export function populationSparseness(matrix: MatrixInput): PopulationSparseness {
  const { rows, cols, data } = toDenseMatrix('populationSparseness', matrix);
  let sums = columnSums(data, rows, cols, 1);
  const k = scaleFor(sums.maxAbs);
  if (k !== 1) sums = columnSums(data, rows, cols, k);
  const perBin = new Float64Array(cols);
  for (let j = 0; j < cols; j++) {
    const s = sums.s1[j] + sums.c1[j];
    const q = sums.s2[j] + sums.c2[j];
    if (rows < 2 || q === 0) perBin[j] = NaN;
    else perBin[j] = (rows * (1 - (s * s) / (rows * q))) / (rows - 1);
  }
  let negativeBins = 0;
  for (let j = 0; j < cols; j++) if (sums.negative[j]) negativeBins++;
  return { perBin, ...summarizeDefined(perBin), negativeBins };
}

/** Per-column Neumaier sums of k·x and (k·x)², with the finite check, max |x| and negative flags. */
function columnSums(data: ArrayLike<number>, rows: number, cols: number, k: number) {
  const s1 = new Float64Array(cols), c1 = new Float64Array(cols);
  const s2 = new Float64Array(cols), c2 = new Float64Array(cols);
  const negative = new Uint8Array(cols);
  let maxAbs = 0;
  for (let i = 0, p = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++, p++) {
      const v = data[p];
      if (!Number.isFinite(v)) throw nonFiniteCellError('populationSparseness', p, cols, v);
      if (v < 0) negative[j] = 1;
      const a = Math.abs(v);
      if (a > maxAbs) maxAbs = a;
      const y = v * k;
      let s = s1[j];
      let t = s + y;
      c1[j] += Math.abs(s) >= a * k ? s - t + y : y - t + s;
      s1[j] = t;
      const q = y * y;
      s = s2[j];
      t = s + q;
      c2[j] += s >= q ? s - t + q : q - t + s;
      s2[j] = t;
    }
  }
  return { s1, c1, s2, c2, negative, maxAbs };
}
