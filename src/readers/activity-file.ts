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
}

/** A file's precision; readers that do not say (e.g. NWB) get float64, which is always exact. */
export function precisionOf(f: ActivityFile): Precision {
  const p = (f as Partial<ReadableActivityFile>).precision;
  return p === 'f32' ? 'f32' : 'f64';
}
