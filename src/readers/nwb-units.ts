/**
 * An NWB units table read as an activity matrix: units × time bins of spike counts.
 *
 * Columns used (NWB format specification 2.x, `Units` / `DynamicTable`): `spike_times` (seconds)
 * with its ragged index `spike_times_index` (index[i] = end offset of unit i's spikes, so unit i
 * owns spike_times[index[i−1] .. index[i])); `id` for unit labels; optional `obs_intervals`
 * ([n, 2] start/end seconds) with `obs_intervals_index`.
 *
 * Binning: bin k is `[k·w, (k+1)·w)`, `w = binMs` ms, counted from time 0 — NWB times are
 * seconds from the file's `timestamps_reference_time`, so bin 0 starts there, and every file of a
 * dataset shares that convention. Stretches before recording began are zero unless the file
 * marks them unobserved with `obs_intervals`. The matrix ends at the recording's end: the
 * manifest's `recording_end_s` when set (later spikes are left out and counted); else the latest
 * of the last spike (its bin included), the last observation end, and the end the file states
 * in its epochs or trials tables (nwb-end.ts). The `nwb-units-table` finding says which.
 *
 * Observation intervals: when the table has them, bin k of unit u is *observed* when one of u's
 * intervals covers a positive length of it (`start < (k+1)·w` and `end > k·w`); a bin partly
 * covered counts as observed (its count may then be lower than a fully observed bin's). Other
 * bins are missing: value 0, missing mask 1, counted in a `notice` finding. A spike that falls
 * in a missing bin (e.g. exactly at an interval's end, which starts the next bin) is left out and
 * counted in an `exclude` finding. A unit with no intervals at all is missing throughout.
 *
 * Errors (InputError): index not non-decreasing, negative, non-integer or past the end of its
 * column; spike times negative or not finite; interval ends before its start.
 * Cost at open: one pass over spike_times in 4 MiB slices; memory O(units + intervals).
 */
import type { File as H5File, Dataset } from 'h5wasm';
import { InputError } from '../errors.ts';
import type { Finding, Numeric } from '../types.ts';
import type { ActivityFile } from './types.ts';
import { closeQuietly, copyToFloat64, forEachSlice, getDataset, readRange, requireNumeric, rowsOf, SLICE_ELEMENTS } from './nwb-hdf5.ts';
import { readSlice } from './hdf5-guard.ts';
import { idProblem, readUnitLabels } from './nwb-ids.ts';
import { BYTES_PER_UNIT, checkActivityShape, checkClaimedBytes } from './memory-budget.ts';
import { binOf, binsToCover, coveredBins, inRanges, mergeRanges } from './nwb-time.ts';
import { pushAll } from '../util/arrays.ts';
import { statedRecordingEnd } from './nwb-end.ts';

const MAX_BINS = 2 ** 31 - 1;

/** Read a ragged index column and check it: integers, non-decreasing, within [0, target length]. */
function readIndex(ds: Dataset, targetLength: number, relPath: string): Float64Array {
  requireNumeric(ds, relPath);
  const idx = readRange(ds, 0, rowsOf(ds));
  let prev = 0;
  for (let i = 0; i < idx.length; i++) {
    const v = idx[i];
    const where = `${ds.path}[${i}]`;
    if (!Number.isInteger(v) || v < 0) throw new InputError(`ragged index holds ${v}; allowed: non-negative integers`, { file: relPath, where });
    if (v < prev) throw new InputError(`ragged index decreases (${prev} then ${v}); it must be non-decreasing (end offset of each row)`, { file: relPath, where });
    if (v > targetLength) throw new InputError(`ragged index ${v} is past the end of its column (length ${targetLength})`, { file: relPath, where });
    prev = v;
  }
  return idx;
}

/** Per-unit merged observed bin ranges, flat pairs, with per-unit pair offsets; null when there are no intervals. */
function observedRanges(file: H5File, table: string, units: number, binMs: number, relPath: string): { ranges: Float64Array; offsets: Int32Array } | null {
  const iv = getDataset(file, `${table}/obs_intervals`);
  if (!iv) return null;
  requireNumeric(iv, relPath);
  const shape = iv.shape ?? [];
  if (shape.length !== 2 || shape[1] !== 2) throw new InputError(`obs_intervals has shape [${shape.join(', ')}]; allowed: [n, 2] (start, end)`, { file: relPath, where: iv.path });
  const ixDs = getDataset(file, `${table}/obs_intervals_index`);
  if (!ixDs) throw new InputError('obs_intervals has no obs_intervals_index, so its rows cannot be assigned to units', { file: relPath, where: iv.path });
  if (rowsOf(ixDs) !== units) throw new InputError(`obs_intervals_index has ${rowsOf(ixDs)} rows but the table has ${units} units`, { file: relPath, where: ixDs.path });
  checkClaimedBytes(units * BYTES_PER_UNIT + shape[0] * 16, `obs_intervals of ${shape[0]} rows (16 B each) beside ${units} units`, relPath, iv.path);
  const index = readIndex(ixDs, shape[0], relPath);
  const flat = new Float64Array(shape[0] * 2);
  const rows = SLICE_ELEMENTS / 2;
  for (let a = 0; a < shape[0]; a += rows) copyToFloat64(readSlice(iv, [[a, Math.min(shape[0], a + rows)], [0, 2]], relPath), flat, 2 * a);
  const out: number[] = [];
  const offsets = new Int32Array(units + 1);
  for (let u = 0; u < units; u++) {
    const pairs: number[] = [];
    for (let r = u === 0 ? 0 : index[u - 1]; r < index[u]; r++) {
      const [s, e] = [flat[2 * r], flat[2 * r + 1]];
      const where = `${iv.path}[${r}]`;
      if (!Number.isFinite(s) || !Number.isFinite(e)) throw new InputError(`observation interval [${s}, ${e}] is not finite`, { file: relPath, where });
      if (e < s) throw new InputError(`observation interval ends (${e} s) before it starts (${s} s)`, { file: relPath, where });
      pushAll(pairs, coveredBins(s, e, binMs));
    }
    pushAll(out, mergeRanges(pairs));
    offsets[u + 1] = out.length / 2;
  }
  return { ranges: Float64Array.from(out), offsets };
}

/**
 * The checks on a units table that need its headers only (shared by `lacuna check` and the
 * build, so both refuse with the same message): the declared unit count against the memory
 * budget (memory-budget.ts), before any column is read, and the id column's type.
 */
export function checkUnitsHeader(file: H5File, table: string, binMs: number, relPath: string): void {
  const indexDs = getDataset(file, `${table}/spike_times_index`);
  if (indexDs) checkActivityShape({ units: rowsOf(indexDs), bins: 0, binMs, file: relPath, where: indexDs.path });
  const idDs = getDataset(file, `${table}/id`);
  const problem = idDs ? idProblem(idDs) : null;
  if (idDs && problem) throw new InputError(problem, { file: relPath, where: idDs.path });
}

/** Open the units table at `table` as an ActivityFile. Takes ownership of `file` (closed by `close()`). */
export function openUnitsTable(file: H5File, table: string, opts: { path: string; relPath: string; binMs: number; recordingEndS?: number | null }): ActivityFile {
  const { relPath, binMs } = opts;
  const spikes = getDataset(file, `${table}/spike_times`);
  const indexDs = getDataset(file, `${table}/spike_times_index`);
  if (!spikes || !indexDs) throw new InputError('units table needs spike_times and spike_times_index', { file: relPath, where: table });
  requireNumeric(spikes, relPath);
  const nSpikes = rowsOf(spikes);
  checkUnitsHeader(file, table, binMs, relPath);
  const index = readIndex(indexDs, nSpikes, relPath);
  const units = index.length;
  if (units === 0) throw new InputError('units table has no units (spike_times_index is empty)', { file: relPath, where: indexDs.path });

  const idDs = getDataset(file, `${table}/id`);
  let unitLabels: string[];
  if (idDs) {
    if (rowsOf(idDs) !== units) throw new InputError(`id has ${rowsOf(idDs)} rows but spike_times_index has ${units}`, { file: relPath, where: idDs.path });
    unitLabels = readUnitLabels(idDs, units, relPath);
  } else unitLabels = Array.from({ length: units }, (_, i) => String(i));

  const obs = observedRanges(file, table, units, binMs, relPath);
  // The recording's end: the manifest's, else the file's epochs/trials (null: neither says).
  const fixedEnd = opts.recordingEndS ?? null;
  const stated = fixedEnd === null ? statedRecordingEnd(file, relPath) : null;
  const endS = fixedEnd ?? stated?.seconds ?? null;
  const endBins = endS === null ? null : binsToCover((endS * 1000) / binMs);
  let afterEnd = 0;
  const observed = (u: number, bin: number): boolean => obs === null || inRanges(obs.ranges, obs.offsets[u], obs.offsets[u + 1], bin);

  // One pass over the spikes: validate, find the last, count spikes in unobserved bins.
  const assigned = index[units - 1];
  let maxBin = -1;
  let dropped = 0;
  const droppedUnits = new Set<number>();
  let u = 0;
  forEachSlice(spikes, 0, assigned, (v, first) => {
    for (let j = 0; j < v.length; j++) {
      const k = first + j;
      while (k >= index[u]) u++;
      const t = v[j];
      if (!Number.isFinite(t) || t < 0) {
        throw new InputError(`spike time ${t} of unit ${unitLabels[u]} is ${Number.isFinite(t) ? 'negative' : 'not a finite number'}; allowed: seconds ≥ 0 from the reference time`, { file: relPath, where: `${spikes.path}[${k}]` });
      }
      const b = binOf((t * 1000) / binMs);
      if (endBins !== null && b >= endBins) {
        afterEnd++;
        if (fixedEnd !== null) continue; // after the manifest's end: left out
      }
      if (b > maxBin) maxBin = b;
      if (!observed(u, b)) {
        dropped++;
        droppedUnits.add(u);
      }
    }
  });
  let bins = maxBin + 1;
  let endFrom = 'the last spike';
  const obsEnd = obs && obs.ranges.length > 0 ? obs.ranges.reduce((m, x, i) => (i % 2 === 1 ? Math.max(m, x) : m), 0) : 0;
  if (obsEnd > bins) (bins = obsEnd), (endFrom = `the last observation interval (${table}/obs_intervals)`);
  if (fixedEnd !== null) (bins = endBins as number), (endFrom = `the manifest's recording_end_s (${fixedEnd} s)`);
  else if (stated && (endBins as number) >= bins) (bins = endBins as number), (endFrom = `${stated.source} (${stated.seconds} s)`);
  if (bins <= 0) throw new InputError('units table has no spikes and no observation intervals, so there is no time span to bin', { file: relPath, where: table });
  checkActivityShape({ units, bins, binMs, file: relPath, where: spikes.path });
  if (bins > MAX_BINS) throw new InputError(`binning at ${binMs} ms up to ${((bins * binMs) / 1000).toFixed(3)} s gives ${bins} bins, more than ${MAX_BINS}`, { file: relPath, where: spikes.path, hint: 'raise bin_ms' });

  const findings: Finding[] = [];
  findings.push({
    level: 'notice',
    code: 'nwb-units-table',
    message: `Read the units table ${table} (${units} units, ${assigned} spikes) and counted spikes in ${bins} bins of ${binMs} ms from time 0; the recording's end was taken from ${endFrom}.`,
    where: [`${relPath}:${table}`],
    count: units,
  });
  if (afterEnd > 0 && fixedEnd !== null) {
    findings.push({ level: 'exclude', code: 'spikes-after-end', message: `${afterEnd} spikes at or after the manifest's recording_end_s (${fixedEnd} s) were left out.`, where: [`${relPath}:${spikes.path}`], count: afterEnd });
  } else if (afterEnd > 0 && stated) {
    findings.push({ level: 'notice', code: 'spikes-after-stated-end', message: `${afterEnd} spikes come at or after the latest stop_time of ${stated.source} (${stated.seconds} s); the matrix runs to the last spike instead.`, where: [`${relPath}:${stated.source}`], count: afterEnd });
  }
  if (assigned < nSpikes) {
    findings.push({ level: 'exclude', code: 'unassigned-spikes', message: `${nSpikes - assigned} spike times after the last unit's end offset belong to no unit and were left out.`, where: [`${relPath}:${spikes.path}[${assigned}…]`], count: nSpikes - assigned });
  }
  let missingCells = 0;
  const missingUnits: string[] = [];
  if (obs) {
    for (let v = 0; v < units; v++) {
      let seen = 0;
      for (let p = obs.offsets[v]; p < obs.offsets[v + 1]; p++) seen += Math.min(bins, obs.ranges[2 * p + 1]) - Math.min(bins, obs.ranges[2 * p]);
      if (seen < bins) missingUnits.push(unitLabels[v]);
      missingCells += bins - seen;
    }
  }
  if (missingCells > 0) {
    findings.push({
      level: 'notice',
      code: 'unobserved-bins',
      message: `${missingCells} unit-bins lie outside the units' observation intervals (obs_intervals) and are marked missing, not zero; a bin partly covered counts as observed.`,
      where: missingUnits.slice(0, 20).map((l) => `unit ${l}`),
      count: missingCells,
    });
  }
  if (dropped > 0) {
    findings.push({
      level: 'exclude',
      code: 'spikes-outside-observation',
      message: `${dropped} spikes fall in bins outside their unit's observation intervals and were left out.`,
      where: [...droppedUnits].slice(0, 20).map((v) => `unit ${unitLabels[v]}`),
      count: dropped,
    });
  }

  let open = true;
  return {
    path: opts.path,
    units,
    bins,
    unitLabels,
    binMs,
    findings,
    hasMissing: missingCells > 0,
    async readUnits(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number, missing?: Uint8Array): Promise<void> {
      if (!open) throw new Error('readUnits after close');
      if (!(unitStart >= 0 && count >= 0 && unitStart + count <= units)) throw new RangeError(`units [${unitStart}, ${unitStart + count}) outside [0, ${units})`);
      if (count === 0) return;
      for (let r = 0; r < count; r++) out.fill(0, r * outCols + colOffset, r * outCols + colOffset + bins);
      const lo = unitStart === 0 ? 0 : index[unitStart - 1];
      const hi = index[unitStart + count - 1];
      let w = unitStart;
      forEachSlice(spikes, lo, hi, (v, first) => {
        for (let j = 0; j < v.length; j++) {
          while (first + j >= index[w]) w++;
          const b = binOf((v[j] * 1000) / binMs);
          if (b < bins && observed(w, b)) out[(w - unitStart) * outCols + colOffset + b] += 1;
        }
      });
      if (missing && obs) {
        for (let r = 0; r < count; r++) {
          const row = r * outCols + colOffset;
          let from = 0;
          for (let p = obs.offsets[unitStart + r]; p < obs.offsets[unitStart + r + 1]; p++) {
            const a = Math.min(bins, obs.ranges[2 * p]);
            missing.fill(1, row + from, row + a);
            from = Math.max(from, Math.min(bins, obs.ranges[2 * p + 1]));
          }
          missing.fill(1, row + from, row + bins);
        }
      }
    },
    async close(): Promise<void> {
      open = false;
      closeQuietly(file);
    },
  };
}
