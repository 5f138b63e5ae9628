/**
 * Find what an NWB file holds that Lacuna can read, by the `neurodata_type` attribute the
 * NWB standard puts on every typed group (NWB format specification 2.x, "neurodata_type"),
 * wherever in the group tree it sits: units tables (`Units`) and time series (`TimeSeries`
 * and its subtypes, extension types included, that hold a numeric `data` dataset with one or
 * two dimensions — time × channels/ROIs — and a time base).
 *
 * The walk follows hard links only: soft links are skipped (their targets are reached by
 * their own path), external and other user-defined links are never followed (they are listed
 * as passed over, with the reason), a typed group whose columns are virtual datasets is
 * refused (hdf5-guard.ts), a tree deeper than 64 groups is refused (a hard-link cycle: a
 * group that contains itself), and the object count is capped so a huge tree cannot hang
 * the reader.
 */
import h5wasm from 'h5wasm';
import type { File as H5File, Group } from 'h5wasm';
import { InputError } from '../errors.ts';
import { guarded } from './hdf5-sandbox.ts';
import { linkProblem, relPathOf } from './hdf5-guard.ts';
import { attrString, dtypeName, getDataset, isNumeric, rowsOf } from './nwb-hdf5.ts';

export interface NwbCandidate {
  /** HDF5 path of the table or series group, e.g. `/units`, `/acquisition/test_roi_response_series`. */
  path: string;
  neurodataType: string;
  kind: 'units' | 'series';
  /** Units tables: [units]. Time series: the shape of `data` ([time] or [time, channels]). */
  shape: number[];
  /** Units tables: dtype of `spike_times`. Time series: dtype of `data`. */
  dtype: string;
}

/** A typed group that looks like a table or series but cannot be read, and why. */
export interface NwbSkipped {
  path: string;
  neurodataType: string;
  reason: string;
}

/** Series types whose `data` are not activity over time (codes, indices, text, waveform snippets). */
const NOT_ACTIVITY = new Set(['IndexSeries', 'IntervalSeries', 'AnnotationSeries', 'SpikeEventSeries']);

const MAX_DEPTH = 64;
const MAX_OBJECTS = 200_000;

function join(parent: string, name: string): string {
  return parent === '/' ? `/${name}` : `${parent}/${name}`;
}

function classifyUnits(file: H5File, path: string, type: string): NwbCandidate | NwbSkipped {
  const spikes = getDataset(file, `${path}/spike_times`);
  if (!spikes) return { path, neurodataType: type, reason: 'units table without a spike_times column' };
  if (!isNumeric(spikes)) return { path, neurodataType: type, reason: `spike_times holds ${dtypeName(spikes)}, not numbers` };
  const index = getDataset(file, `${path}/spike_times_index`);
  const id = getDataset(file, `${path}/id`);
  const units = index ? rowsOf(index) : id ? rowsOf(id) : 0;
  return { path, neurodataType: type, kind: 'units', shape: [units], dtype: dtypeName(spikes) };
}

function classifySeries(file: H5File, path: string, type: string): NwbCandidate | NwbSkipped | null {
  const data = getDataset(file, `${path}/data`);
  if (!data) return null;
  const hasTime = getDataset(file, `${path}/timestamps`) !== null || getDataset(file, `${path}/starting_time`) !== null;
  if (!hasTime) return null;
  const shape = data.shape ?? [];
  if (NOT_ACTIVITY.has(type)) return { path, neurodataType: type, reason: `${type} data are not activity over time` };
  if (!isNumeric(data)) return { path, neurodataType: type, reason: `data holds ${dtypeName(data)}, not numbers` };
  if (shape.length < 1 || shape.length > 2) {
    return { path, neurodataType: type, reason: `data has shape [${shape.join(', ')}]; only [time] or [time, channels] can be read` };
  }
  return { path, neurodataType: type, kind: 'series', shape, dtype: dtypeName(data) };
}

/**
 * Every readable units table and time series in the file, in walk order (sorted names at each
 * level), plus the typed groups that were passed over and why. Cost: one visit per object.
 */
export function findCandidates(file: H5File): { candidates: NwbCandidate[]; skipped: NwbSkipped[] } {
  const candidates: NwbCandidate[] = [];
  const skipped: NwbSkipped[] = [];
  const relPath = relPathOf(file);
  let visited = 0;
  const walk = (group: Group, path: string, depth: number): void => {
    if (depth > MAX_DEPTH) {
      throw new InputError(`groups nest more than ${MAX_DEPTH} levels deep here, which in an NWB file means a group that contains itself (a hard-link cycle)`, {
        file: relPath,
        where: path.length > 200 ? `${path.slice(0, 200)}…` : path,
        hint: 'remove the link that makes the cycle',
      });
    }
    for (const name of guarded(relPath, path, () => [...group.keys()]).sort()) {
      if (++visited > MAX_OBJECTS) return;
      const child = join(path, name);
      const problem = linkProblem(file, child);
      if (problem !== null) {
        skipped.push({ path: child, neurodataType: 'link', reason: `not followed: ${problem}` });
        continue;
      }
      if (guarded(relPath, child, () => file.get_link(child)) !== null) continue; // soft link: reached by its target's own path
      const entity = guarded(relPath, child, () => file.get(child));
      if (!(entity instanceof h5wasm.Group)) continue;
      const type = attrString(entity, 'neurodata_type');
      let found: NwbCandidate | NwbSkipped | null = null;
      if (type === 'Units') found = classifyUnits(file, child, type);
      else if (type !== null && /Series$/.test(type)) found = classifySeries(file, child, type);
      if (found && 'kind' in found) {
        candidates.push(found);
        continue;
      }
      if (found) skipped.push(found);
      walk(entity, child, depth + 1);
    }
  };
  walk(file, '/', 0);
  return { candidates, skipped };
}

/** One line describing a candidate: `/acquisition/x (RoiResponseSeries, shape [10], float64)`. */
export function describeCandidate(c: NwbCandidate): string {
  const what = c.kind === 'units' ? `${c.shape[0]} units` : `shape [${c.shape.join(', ')}]`;
  return `${c.path} (${c.neurodataType}, ${what}, ${c.dtype})`;
}

/** Top-level names with their kind, for "nothing found" errors: `acquisition/ (group), identifier (dataset)`. */
export function describeTopLevel(file: H5File): string {
  const parts = [...file.keys()].sort().map((k) => {
    if (linkProblem(file, `/${k}`) !== null) return `${k} (external link)`;
    const e = guarded(relPathOf(file), `/${k}`, () => file.get(`/${k}`));
    return e instanceof h5wasm.Group ? `${k}/ (group)` : e instanceof h5wasm.Dataset ? `${k} (dataset)` : `${k} (link)`;
  });
  return parts.length ? parts.join(', ') : '(nothing)';
}
