/**
 * When an NWB recording ended, as the file states it: the latest `stop_time` of its epochs
 * (`/intervals/epochs`) and trials (`/intervals/trials`) tables, the `TimeIntervals` tables the
 * NWB 2.x specification places there. A units table's spikes say only when the last spike
 * happened; trailing silence is part of the recording and belongs in the matrix (a unit silent
 * for its last minutes is sparser than its spikes alone suggest). The units' own
 * `obs_intervals` are honoured by nwb-units.ts. Cost: one pass over each stop_time column in
 * 4 MiB slices; memory O(1).
 */
import type { File as H5File } from 'h5wasm';
import { InputError } from '../errors.ts';
import { forEachSlice, getDataset, requireNumeric, rowsOf } from './nwb-hdf5.ts';

export const END_TABLES = ['/intervals/epochs', '/intervals/trials'] as const;

/** The latest stop_time of the epochs and trials tables, with the column it came from; null when neither has one. */
export function statedRecordingEnd(file: H5File, relPath: string): { seconds: number; source: string } | null {
  let best: { seconds: number; source: string } | null = null;
  for (const table of END_TABLES) {
    const ds = getDataset(file, `${table}/stop_time`);
    if (!ds) continue;
    requireNumeric(ds, relPath);
    let max = -Infinity;
    forEachSlice(ds, 0, rowsOf(ds), (v, first) => {
      for (let j = 0; j < v.length; j++) {
        const t = v[j];
        if (!Number.isFinite(t) || t < 0) {
          throw new InputError(`stop_time ${t} is not allowed; stop times are finite seconds ≥ 0 from the reference time`, {
            file: relPath, where: `${ds.path}[${first + j}]`, hint: 'fix the table, or set recording_end_s for this dataset in the manifest',
          });
        }
        if (t > max) max = t;
      }
    });
    if (max > -Infinity && (best === null || max > best.seconds)) best = { seconds: max, source: ds.path };
  }
  return best;
}
