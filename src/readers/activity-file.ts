/**
 * The per-file activity contract (`ActivityFile`, src/readers/types.ts) plus what the joiner
 * needs to pick its block type.
 */
import type { ActivityFile } from './types.ts';
import type { Precision } from './dtype.ts';

export interface ReadableActivityFile extends ActivityFile {
  /**
   * Float64Array or Float32Array is enough to hold this file's values exactly (see dtype.ts);
   * the joiner uses float64 blocks when any file of a dataset needs them.
   */
  precision: Precision;
  /**
   * Always true here: `close()` only releases file handles, and the next `readUnits` reopens
   * them. (The contract in types.ts does not promise this, so files from other readers are
   * reopened for each pass instead; see join.ts.)
   */
  reusableAfterClose: true;
  /**
   * True when any range of whole units is read as one forward sweep of the data (units-by-bins
   * C-order or bins-by-units Fortran-order `.npy`, stored or deflated `.npz` members in those
   * orders, CSV and spike tables held in memory), so a pass costs one read of the data however
   * small its blocks. False when each block re-reads rows of the file (strided layouts).
   * Absent: treated as false.
   */
  contiguous?: boolean;
}

/** True when `close()` leaves the file readable (see ReadableActivityFile). */
export function isReusable(f: ActivityFile): boolean {
  return (f as Partial<ReadableActivityFile>).reusableAfterClose === true;
}

/** True when the file says its unit ranges are contiguous (see ReadableActivityFile). */
export function isContiguous(f: ActivityFile): boolean {
  return (f as Partial<ReadableActivityFile>).contiguous === true;
}

/** A file's precision; readers that do not say (e.g. NWB) get float64, which is always exact. */
export function precisionOf(f: ActivityFile): Precision {
  const p = (f as Partial<ReadableActivityFile>).precision;
  return p === 'f32' ? 'f32' : 'f64';
}
