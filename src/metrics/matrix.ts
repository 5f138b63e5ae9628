/**
 * Matrix input for the matrix measures.
 *
 * Lacuna's `DenseMatrix` (src/types.ts) is row-major: element (i, j) is `data[i * cols + j]`.
 * For activity, rows are units and columns are time bins or stimuli. For a square connectivity
 * (weight) matrix, entry [i][j] is the weight FROM node i TO node j, so row i holds node i's
 * outgoing weights and column j node j's incoming weights.
 *
 * An ml-matrix `Matrix` (anything with `rows`, `columns` and `to1DArray()`) is accepted too and
 * copied once into a Float64Array (8·rows·cols bytes).
 */
import type { DenseMatrix } from '../types.ts';

/** The structural part of an ml-matrix `AbstractMatrix` that is used here. */
export interface MlMatrixLike {
  readonly rows: number;
  readonly columns: number;
  to1DArray(): number[];
}

export type MatrixInput = DenseMatrix | MlMatrixLike;

/** Validate a matrix input and return it as a `DenseMatrix` (no copy for a `DenseMatrix`). */
export function toDenseMatrix(fn: string, m: MatrixInput): DenseMatrix {
  if (m === null || typeof m !== 'object') throw new RangeError(`${fn}: expected a matrix, got ${String(m)}`);
  if ('data' in m && 'cols' in m) {
    const { rows, cols, data } = m;
    checkShape(fn, rows, cols);
    if (!data || typeof data.length !== 'number' || data.length !== rows * cols) {
      throw new RangeError(`${fn}: matrix data has ${data?.length} elements, expected rows × cols = ${rows} × ${cols} = ${rows * cols}`);
    }
    return m;
  }
  if ('columns' in m && typeof m.to1DArray === 'function') {
    checkShape(fn, m.rows, m.columns);
    return { rows: m.rows, cols: m.columns, data: Float64Array.from(m.to1DArray()) };
  }
  throw new RangeError(`${fn}: expected a DenseMatrix { rows, cols, data } or an ml-matrix Matrix`);
}

function checkShape(fn: string, rows: number, cols: number): void {
  if (!Number.isInteger(rows) || rows < 0 || !Number.isInteger(cols) || cols < 0) {
    throw new RangeError(`${fn}: matrix shape must be non-negative integers, got ${String(rows)} × ${String(cols)}`);
  }
}
