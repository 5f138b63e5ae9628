/**
 * What `lacuna check` does to an NWB candidate beyond listing it, so that check refuses what
 * the build would refuse before computing anything:
 *
 * 1. the header-only checks the build makes (unit and bin counts against the memory budget,
 *    the id column's type), through the same functions, so the messages are the same;
 * 2. for a units table, the ragged index validated in full (O(units) numbers, within the budget
 *    checked first), with the build's function and message (the spike times themselves are then
 *    read by `inspectNwb` through the build's own open, so a spike past the budget, e.g. at
 *    10¹⁵ s, is refused by check too);
 * 3. a probe read of the first element of every dataset the build will read. HDF5 external
 *    storage shows only when a read opens its raw file (hdf5-guard.ts), and a damaged first
 *    chunk only when it is decoded; one element per dataset finds both at the cost of one
 *    chunk each. A damaged later chunk is found by the build, which refuses it the same way.
 */
import type { File as H5File } from 'h5wasm';
import type { NwbCandidate } from './nwb-find.ts';
import { readSlice, readValue } from './hdf5-guard.ts';
import { getDataset } from './nwb-hdf5.ts';
import { checkUnitsHeader, checkUnitsIndex } from './nwb-units.ts';
import { checkSeriesHeader } from './nwb-series.ts';

const UNITS_COLUMNS = ['spike_times', 'spike_times_index', 'id', 'obs_intervals', 'obs_intervals_index'];
const SERIES_COLUMNS = ['data', 'timestamps', 'starting_time', 'rois', 'electrodes'];

/** Header checks and probe reads for the chosen candidate; throws the build's InputError. */
export function checkCandidate(file: H5File, c: NwbCandidate, binMs: number, relPath: string): void {
  if (c.kind === 'units') {
    checkUnitsHeader(file, c.path, binMs, relPath);
    checkUnitsIndex(file, c.path, relPath);
  } else checkSeriesHeader(file, c.path, binMs, relPath);
  for (const name of c.kind === 'units' ? UNITS_COLUMNS : SERIES_COLUMNS) {
    const ds = getDataset(file, `${c.path}/${name}`);
    if (!ds) continue;
    const shape = ds.shape ?? [];
    if (shape.length === 0) readValue(ds, relPath);
    else if (shape.every((n) => n > 0)) readSlice(ds, shape.map((): [number, number] => [0, 1]), relPath);
  }
}
