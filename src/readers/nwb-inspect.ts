/**
 * What `lacuna check` does to an NWB candidate beyond listing it, so that check refuses what
 * the build would refuse before computing anything:
 *
 * - a units table is opened the way the build opens it (`openUnitsTable`: header checks, the
 *   ragged index, one pass over the spike times), so check refuses what the build refuses from
 *   it, a spike past the budget (e.g. at 10¹⁵ s) included, with the same message; every column
 *   is read in full there, so no probe is needed;
 * - a series gets the header-only checks the build makes (bin counts against the memory budget,
 *   the bin width against the sampling interval), through the same functions, and a probe read
 *   of the first element of every dataset the build will read. HDF5 external storage shows only
 *   when a read opens its raw file (hdf5-guard.ts), and a damaged first chunk only when it is
 *   decoded; one element per dataset finds both at the cost of one chunk each. A damaged later
 *   chunk is found by the build, which refuses it the same way.
 */
import type { File as H5File } from 'h5wasm';
import type { NwbCandidate } from './nwb-find.ts';
import { readSlice, readValue } from './hdf5-guard.ts';
import { getDataset } from './nwb-hdf5.ts';
import { openUnitsTable } from './nwb-units.ts';
import { checkSeriesHeader } from './nwb-series.ts';

const SERIES_COLUMNS = ['data', 'timestamps', 'starting_time', 'rois', 'electrodes'];

/**
 * The build's checks of the chosen candidate; throws the build's InputError. A units table is
 * opened as the build opens it (the source returned is dropped; the caller closes `file`).
 */
export function checkCandidate(file: H5File, c: NwbCandidate, o: { path: string; relPath: string; binMs: number; recordingEndS: number | null }): void {
  const { binMs, relPath } = o;
  if (c.kind === 'units') {
    openUnitsTable(file, c.path, o);
    return;
  }
  checkSeriesHeader(file, c.path, binMs, relPath);
  for (const name of SERIES_COLUMNS) {
    const ds = getDataset(file, `${c.path}/${name}`);
    if (!ds) continue;
    const shape = ds.shape ?? [];
    if (shape.length === 0) readValue(ds, relPath);
    else if (shape.every((n) => n > 0)) readSlice(ds, shape.map((): [number, number] => [0, 1]), relPath);
  }
}
