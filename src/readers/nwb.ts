/**
 * Reader for NWB 2.x files (Neurodata Without Borders; Rübel et al. 2022, eLife 11:e78362),
 * which are HDF5 files. Pipeline:
 *
 *   1. check the HDF5 signature, open with h5wasm (nwb-hdf5.ts)
 *   2. find every units table and time series by `neurodata_type` (nwb-find.ts)
 *   3. choose one: the only candidate, or the manifest's `series` path
 *   4. read it as units × bins: spike counts (nwb-units.ts) or a resampled series (nwb-series.ts)
 *
 * Every path out of here either hands the open file to the returned ActivityFile (closed by its
 * `close()`) or closes it before throwing.
 */
import { stat } from 'node:fs/promises';
import type { File as H5File } from 'h5wasm';
import { InputError } from '../errors.ts';
import type { ActivityFile, FileInspection } from './types.ts';
import { closeQuietly, openHdf5 } from './nwb-hdf5.ts';
import { describeCandidate, describeTopLevel, findCandidates, type NwbCandidate } from './nwb-find.ts';
import { openUnitsTable } from './nwb-units.ts';
import { openTimeSeries } from './nwb-series.ts';
import { checkCandidate } from './nwb-inspect.ts';

export type { NwbCandidate } from './nwb-find.ts';

function normalisePath(p: string): string {
  const s = p.trim().replace(/\/+$/, '');
  return s.startsWith('/') ? s : `/${s}`;
}

/** Choose the candidate to read; InputError listing every candidate when the choice is missing or wrong. */
function choose(file: H5File, relPath: string, series: string | null): NwbCandidate {
  const { candidates, skipped } = findCandidates(file);
  const list = candidates.map((c) => `  ${describeCandidate(c)}`).join('\n');
  if (candidates.length === 0) {
    const passed = skipped.length ? `; passed over: ${skipped.map((s) => `${s.path} (${s.neurodataType}: ${s.reason})`).join('; ')}` : '';
    throw new InputError(`no units table (neurodata_type "Units") or time series with numeric data found; top level holds ${describeTopLevel(file)}${passed}`, {
      file: relPath,
      where: '/',
      hint: 'format: nwb reads a Units table or a TimeSeries such as RoiResponseSeries',
    });
  }
  if (series !== null) {
    const want = normalisePath(series);
    const hit = candidates.find((c) => c.path === want);
    if (hit) return hit;
    throw new InputError(`series "${series}" is not a units table or time series in this file; candidates:\n${list}`, {
      file: relPath,
      where: 'series',
      hint: 'set series to one of the paths above',
    });
  }
  if (candidates.length === 1) return candidates[0];
  throw new InputError(`the file holds ${candidates.length} units tables or time series and the manifest's series does not choose one; candidates:\n${list}`, {
    file: relPath,
    where: 'series',
    hint: 'set series to one of the paths above',
  });
}

/** recording_end_s belongs to units tables; a time series' samples say when it ends. */
function refuseEndForSeries(c: NwbCandidate, relPath: string, recordingEndS: number | null): void {
  if (c.kind !== 'units' && recordingEndS !== null) {
    throw new InputError(`recording_end_s is set, but ${c.path} is a time series, whose samples say when it ends`, { file: relPath, where: 'recording_end_s', hint: 'remove recording_end_s, or choose a units table with series' });
  }
}

function checkBinMs(binMs: number, relPath: string): void {
  if (!(Number.isFinite(binMs) && binMs > 0)) throw new InputError(`bin_ms is ${binMs}; allowed: a positive number of milliseconds`, { file: relPath, where: 'bin_ms' });
}

/**
 * Open one NWB file as an activity matrix (units × bins at `binMs`). `series` is the HDF5 path
 * of the units table or time series to read; null when the file holds exactly one. Units tables
 * give spike counts per bin (missing cells outside `obs_intervals`); time series give the mean
 * of the samples in each bin, in the series' unit after `conversion`/`offset`. Cost: one pass
 * over spike times or timestamps at open; data are read per `readUnits` call in 4 MiB slices.
 */
export async function openNwbActivity(path: string, opts: { binMs: number; series: string | null; relPath: string; recordingEndS?: number | null }): Promise<ActivityFile> {
  checkBinMs(opts.binMs, opts.relPath);
  const file = await openHdf5(path, opts.relPath);
  try {
    const c = choose(file, opts.relPath, opts.series);
    const o = { path, relPath: opts.relPath, binMs: opts.binMs };
    refuseEndForSeries(c, opts.relPath, opts.recordingEndS ?? null);
    return c.kind === 'units' ? openUnitsTable(file, c.path, { ...o, recordingEndS: opts.recordingEndS ?? null }) : openTimeSeries(file, c.path, c.neurodataType, o);
  } catch (err) {
    closeQuietly(file);
    throw err;
  }
}

/**
 * What `lacuna check` reports about an NWB file, from headers and attributes (no samples of a
 * series are read; a units table's spike times are, in one pass, as the build reads them at
 * open, since its bin count depends on them): the chosen candidate's shape and dtype, and every candidate as
 * `parts` (name = HDF5 path, dtype = `<neurodata_type> <dtype>`). Units tables have shape
 * [units] — their bin count depends on the spike times. `path` is `relPath`, as the other
 * readers' inspections give it. Same InputErrors as opening; also every refusal the build would
 * make from headers alone (the bin width against the sampling interval, `recording_end_s` on a
 * series, the memory budget), with the build's message, and a one-element probe of each dataset
 * the build reads (nwb-inspect.ts).
 */
export async function inspectNwb(path: string, relPath: string, series: string | null, binMs: number, recordingEndS: number | null = null): Promise<FileInspection> {
  checkBinMs(binMs, relPath);
  const file = await openHdf5(path, relPath);
  try {
    const c = choose(file, relPath, series);
    refuseEndForSeries(c, relPath, recordingEndS);
    checkCandidate(file, c, { path, relPath, binMs, recordingEndS });
    const { candidates } = findCandidates(file);
    return {
      path: relPath,
      format: 'nwb',
      shape: c.shape,
      dtype: c.dtype,
      parts: candidates.map((p) => ({ name: p.path, shape: p.shape, dtype: `${p.neurodataType} ${p.dtype}` })),
      bytes: (await stat(path)).size,
    };
  } finally {
    closeQuietly(file);
  }
}

/** Every units table and readable time series in the file, with its type and shape (see NwbCandidate). */
export async function listNwbCandidates(path: string): Promise<{ path: string; neurodataType: string; shape: number[] }[]> {
  const file = await openHdf5(path, path);
  try {
    return findCandidates(file).candidates.map((c) => ({ path: c.path, neurodataType: c.neurodataType, shape: c.shape }));
  } finally {
    closeQuietly(file);
  }
}
