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
}

/** True when `close()` leaves the file readable (see ReadableActivityFile). */
export function isReusable(f: ActivityFile): boolean {
  return (f as Partial<ReadableActivityFile>).reusableAfterClose === true;
}

/** A file's precision; readers that do not say (e.g. NWB) get float64, which is always exact. */
export function precisionOf(f: ActivityFile): Precision {
  const p = (f as Partial<ReadableActivityFile>).precision;
  return p === 'f32' ? 'f32' : 'f64';
}
