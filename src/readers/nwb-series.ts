/**
 * An NWB time series (`TimeSeries` or a subtype: `RoiResponseSeries` under `Fluorescence` or
 * `DfOverF`, `ElectricalSeries`, …) read as an activity matrix: channels/ROIs × time bins.
 *
 * Layout (NWB format specification 2.x, `TimeSeries`): `data` is [time] (one channel) or
 * [time, channels]; values in the series' unit are `data · conversion + offset` (attributes of
 * `data`; `offset` exists from NWB 2.5, default 0). Sample times come from `timestamps`
 * (seconds), or from `starting_time` (seconds) and its `rate` attribute (Hz): tᵢ = t₀ + i / rate.
 *
 * Resampling: bin k is `[t₀ + k·w, t₀ + (k+1)·w)` where t₀ is the first sample's time and
 * w = binMs; a bin's value is the arithmetic mean (float64 sums) of the samples whose time falls
 * in it. A bin with no sample is missing (value 0, mask 1) and counted in a `notice` finding.
 * A NaN sample makes its bin NaN (nothing is skipped silently; later stages count NaN).
 * Negative values are kept as they are (the manifest's `negatives` policy applies later).
 * `binMs` finer than the sampling interval (1000 / rate, or the median of the first 100,000
 * timestamp differences) is an InputError: most bins would be empty.
 *
 * Cost: open reads `timestamps` once in 4 MiB slices (no read for `starting_time`); each
 * `readUnits` streams `data` in slices of about 4 MiB and writes bin means through a 256-bin tile
 * (memory O(bins) for the per-bin sample counts, plus one slice and one tile). Measured on this
 * machine: 200,000 samples × 200 float32 channels (160 MB) read in about 1.8 s, of which about
 * 1.1 s is h5wasm slicing.
 */
import type { Dataset, File as H5File } from 'h5wasm';
import { InputError } from '../errors.ts';
import type { Finding, Numeric } from '../types.ts';
import type { ActivityFile } from './types.ts';
import { attrNumber, attrString, closeQuietly, copyToFloat64, forEachSlice, getDataset, isNumeric, readRange, requireNumeric, rowsOf, SLICE_BYTES } from './nwb-hdf5.ts';
import { binOf } from './nwb-time.ts';
import { readSlice, readValue } from './hdf5-guard.ts';
import { checkActivityShape } from './memory-budget.ts';

const INTERVAL_SAMPLE = 100_000;

/** Time base of a series: either explicit timestamps or a start time and rate. */
type TimeBase = { kind: 'timestamps'; ds: Dataset; t0: number } | { kind: 'rate'; t0: number; rate: number };

function median(xs: Float64Array): number {
  const s = Float64Array.from(xs).sort();
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Read the time base, check timestamps (finite, non-decreasing, one per sample) and find the sampling interval in ms. */
function readTimeBase(file: H5File, series: string, samples: number, relPath: string): { base: TimeBase; intervalMs: number | null; lastT: number } {
  const ts = getDataset(file, `${series}/timestamps`);
  if (ts) {
    requireNumeric(ts, relPath);
    if (rowsOf(ts) !== samples) throw new InputError(`timestamps has ${rowsOf(ts)} entries but data has ${samples} samples`, { file: relPath, where: ts.path });
    const diffs = new Float64Array(Math.min(INTERVAL_SAMPLE, samples - 1));
    let prev = NaN;
    let t0 = NaN;
    forEachSlice(ts, 0, samples, (v, first) => {
      for (let j = 0; j < v.length; j++) {
        const k = first + j;
        const t = v[j];
        if (!Number.isFinite(t)) throw new InputError(`timestamp ${t} is not a finite number`, { file: relPath, where: `${ts.path}[${k}]` });
        if (k === 0) t0 = t;
        else {
          if (t < prev) throw new InputError(`timestamps decrease (${prev} s then ${t} s); NWB timestamps are ascending`, { file: relPath, where: `${ts.path}[${k}]` });
          if (k - 1 < diffs.length) diffs[k - 1] = t - prev;
        }
        prev = t;
      }
    });
    return { base: { kind: 'timestamps', ds: ts, t0 }, intervalMs: diffs.length ? median(diffs) * 1000 : null, lastT: prev };
  }
  return rateTimeBase(file, series, samples, relPath);
}

/** The time base of a series with starting_time and rate (header only: no samples read). */
function rateTimeBase(file: H5File, series: string, samples: number, relPath: string): { base: TimeBase; intervalMs: number | null; lastT: number } {
  const st = getDataset(file, `${series}/starting_time`);
  if (!st) throw new InputError('time series has neither timestamps nor starting_time', { file: relPath, where: series });
  requireNumeric(st, relPath);
  // starting_time is a scalar in NWB; a hyperslab of a scalar is refused by HDF5, so read its value.
  const t0 = (st.shape ?? []).length === 0 ? Number(readValue(st, relPath)) : readRange(st, 0, 1)[0];
  const rate = attrNumber(st, 'rate');
  if (!Number.isFinite(t0)) throw new InputError(`starting_time ${t0} is not a finite number`, { file: relPath, where: st.path });
  if (rate === null || !Number.isFinite(rate) || rate <= 0) throw new InputError(`starting_time has rate ${rate}; allowed: a positive number (Hz)`, { file: relPath, where: `${st.path}@rate` });
  return { base: { kind: 'rate', t0, rate }, intervalMs: 1000 / rate, lastT: t0 + (samples - 1) / rate };
}

/** Bin of sample `i` whose time is `t` (timestamps) — or computed from the rate. */
function sampleBin(base: TimeBase, binMs: number, i: number, t: number): number {
  return base.kind === 'rate' ? binOf((i * 1000) / (base.rate * binMs)) : binOf(((t - base.t0) * 1000) / binMs);
}

/** Bins per tile: 256, fewer when many channels are read at once, so a tile stays near 4 MiB (never less than one bin). */
const TILE_BINS_MAX = 256;

/**
 * Accumulate samples (time-major, `count` channels each) into bin sums and write bin means to
 * the unit-major `out`, a tile of up to 256 bins at a time: a blocked transpose, so neither the
 * sums nor the writes stride across the whole matrix. Sample bins must be non-decreasing
 * (timestamps are checked ascending at open). Bins with no sample get 0 and missing = 1.
 */
function tileWriter(count: number, bins: number, perBin: Uint32Array, scale: (mean: number) => number, out: Numeric, outCols: number, colOffset: number, missing?: Uint8Array) {
  const TILE_BINS = Math.max(1, Math.min(TILE_BINS_MAX, Math.floor(SLICE_BYTES / (8 * count))));
  const tile = new Float64Array(TILE_BINS * count);
  let tileStart = 0;
  const flush = (): void => {
    const n = Math.min(TILE_BINS, bins - tileStart);
    for (let r = 0; r < count; r++) {
      const row = r * outCols + colOffset + tileStart;
      for (let k = 0; k < n; k++) {
        const c = perBin[tileStart + k];
        if (c === 0) {
          out[row + k] = 0;
          if (missing) missing[row + k] = 1;
        } else out[row + k] = scale(tile[k * count + r] / c);
      }
    }
    tile.fill(0);
    tileStart += TILE_BINS;
  };
  return {
    add(bin: number, vals: Float64Array, at: number): void {
      while (bin >= tileStart + TILE_BINS) flush();
      const base = (bin - tileStart) * count;
      for (let r = 0; r < count; r++) tile[base + r] += vals[at + r];
    },
    finish(): void {
      while (tileStart < bins) flush();
    },
  };
}

/**
 * The bin count at `binMs`, refusing a bin width finer than the sampling interval and a span of
 * 2^31 bins or more. One place for both messages, so `lacuna check` (from the header, for
 * rate-based series: `checkSeriesHeader`) and the build refuse with the same words.
 */
function binsFor(base: TimeBase, intervalMs: number | null, lastT: number, binMs: number, relPath: string, series: string): number {
  refuseFinerBins(intervalMs, binMs, relPath, series);
  const bins = binOf(((lastT - base.t0) * 1000) / binMs) + 1;
  if (!(bins > 0 && bins < 2 ** 31)) throw new InputError(`series spans ${lastT - base.t0} s, which gives ${bins} bins of ${binMs} ms`, { file: relPath, where: series, hint: 'raise bin_ms' });
  return bins;
}

function refuseFinerBins(intervalMs: number | null, binMs: number, relPath: string, series: string): void {
  if (intervalMs !== null && intervalMs > 0 && binMs < intervalMs * (1 - 1e-6)) {
    throw new InputError(`bin_ms ${binMs} is finer than this series' sampling interval of ${+intervalMs.toPrecision(6)} ms (${+(1000 / intervalMs).toPrecision(6)} Hz): most bins would hold no sample`, {
      file: relPath,
      where: series,
      hint: `set bin_ms to ${+intervalMs.toPrecision(6)} or a multiple of it`,
    });
  }
}

/**
 * What the build would refuse about a series at `binMs` before reading its samples (for
 * `lacuna check`): the channel count against the memory budget (memory-budget.ts); a rate-based series' starting_time and rate, a bin width finer than 1000 /
 * rate, too many bins; for a series with timestamps, a bin width finer than the median interval
 * of its first 100,001 timestamps (the build's estimate, from at most 800 KB; ill-formed
 * timestamps are left to the build, which reads them all). Throws the build's InputError.
 */
export function checkSeriesHeader(file: H5File, series: string, binMs: number, relPath: string): void {
  const data = getDataset(file, `${series}/data`);
  if (!data) return;
  const shape = data.shape ?? [];
  const samples = shape[0] ?? 0;
  const channels = shape.length === 2 ? shape[1] : 1;
  checkActivityShape({ units: channels, bins: 0, binMs, file: relPath, where: data.path });
  if (samples === 0) return;
  const ts = getDataset(file, `${series}/timestamps`);
  if (ts) {
    if (!isNumeric(ts) || rowsOf(ts) !== samples) return;
    const t = readRange(ts, 0, Math.min(samples, INTERVAL_SAMPLE + 1));
    const diffs = new Float64Array(t.length - 1);
    for (let k = 1; k < t.length; k++) {
      if (!Number.isFinite(t[k]) || !Number.isFinite(t[k - 1]) || t[k] < t[k - 1]) return;
      diffs[k - 1] = t[k] - t[k - 1];
    }
    refuseFinerBins(diffs.length ? median(diffs) * 1000 : null, binMs, relPath, series);
    return;
  }
  const { base, intervalMs, lastT } = rateTimeBase(file, series, samples, relPath);
  checkActivityShape({ units: channels, bins: binsFor(base, intervalMs, lastT, binMs, relPath, series), binMs, file: relPath, where: series });
}

/** Open the time series at `series` as an ActivityFile. Takes ownership of `file` (closed by `close()`). */
export function openTimeSeries(file: H5File, series: string, neurodataType: string, opts: { path: string; relPath: string; binMs: number }): ActivityFile & { valueUnit: string } {
  const { relPath, binMs } = opts;
  const data = getDataset(file, `${series}/data`);
  if (!data) throw new InputError('time series has no data dataset', { file: relPath, where: series });
  requireNumeric(data, relPath);
  const shape = data.shape ?? [];
  if (shape.length < 1 || shape.length > 2) throw new InputError(`data has shape [${shape.join(', ')}]; allowed: [time] or [time, channels]`, { file: relPath, where: data.path });
  const samples = shape[0];
  const channels = shape.length === 2 ? shape[1] : 1;
  if (samples === 0 || channels === 0) throw new InputError(`data has shape [${shape.join(', ')}]: no samples to read`, { file: relPath, where: data.path });
  const conversion = attrNumber(data, 'conversion') ?? 1;
  const offset = attrNumber(data, 'offset') ?? 0;
  if (!Number.isFinite(conversion) || !Number.isFinite(offset)) throw new InputError(`data has conversion ${conversion} and offset ${offset}; both must be finite numbers`, { file: relPath, where: data.path });
  const valueUnit = attrString(data, 'unit') ?? 'unknown';

  checkActivityShape({ units: channels, bins: 0, binMs, file: relPath, where: data.path });
  const { base, intervalMs, lastT } = readTimeBase(file, series, samples, relPath);
  const bins = binsFor(base, intervalMs, lastT, binMs, relPath, series);
  checkActivityShape({ units: channels, bins, binMs, file: relPath, where: series });

  // Samples per bin, shared by every channel.
  const perBin = new Uint32Array(bins);
  if (base.kind === 'rate') for (let i = 0; i < samples; i++) perBin[sampleBin(base, binMs, i, 0)]++;
  else forEachSlice(base.ds, 0, samples, (v, first) => v.forEach((t, j) => perBin[sampleBin(base, binMs, first + j, t)]++));
  let emptyBins = 0;
  for (let b = 0; b < bins; b++) if (perBin[b] === 0) emptyBins++;

  const regionDs = getDataset(file, `${series}/rois`) ?? getDataset(file, `${series}/electrodes`);
  let unitLabels = Array.from({ length: channels }, (_, i) => String(i));
  if (regionDs && rowsOf(regionDs) === channels) {
    requireNumeric(regionDs, relPath);
    unitLabels = Array.from(readRange(regionDs, 0, channels), String);
  }

  const findings: Finding[] = [
    {
      level: 'notice',
      code: 'nwb-series',
      message:
        `Read ${neurodataType} ${series} (${samples} samples × ${channels} channels, unit "${valueUnit}", conversion ${conversion}, offset ${offset}) ` +
        `and averaged ${intervalMs !== null ? `samples every ${+intervalMs.toPrecision(6)} ms` : 'one sample'} into ${bins} bins of ${binMs} ms.`,
      where: [`${relPath}:${series}`],
      count: channels,
    },
  ];
  if (emptyBins > 0) {
    findings.push({
      level: 'notice',
      code: 'empty-bins',
      message: `${emptyBins} of ${bins} bins hold no sample (gaps in the timestamps) and are marked missing for all ${channels} channels.`,
      where: [`${relPath}:${series}`],
      count: emptyBins * channels,
    });
  }

  const bytesPerSample = data.metadata.size;
  let open = true;
  return {
    path: opts.path,
    units: channels,
    bins,
    unitLabels,
    binMs,
    findings,
    hasMissing: emptyBins > 0,
    valueUnit,
    async readUnits(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number, missing?: Uint8Array): Promise<void> {
      if (!open) throw new Error('readUnits after close');
      if (!(unitStart >= 0 && count >= 0 && unitStart + count <= channels)) throw new RangeError(`channels [${unitStart}, ${unitStart + count}) outside [0, ${channels})`);
      if (count === 0) return;
      const rows = Math.max(1, Math.floor(SLICE_BYTES / (count * bytesPerSample)));
      const vals = new Float64Array(rows * count);
      const times = base.kind === 'timestamps' ? new Float64Array(rows) : null;
      const tiles = tileWriter(count, bins, perBin, (v) => v * conversion + offset, out, outCols, colOffset, missing);
      for (let a = 0; a < samples; a += rows) {
        const b = Math.min(samples, a + rows);
        const raw = readSlice(data, shape.length === 2 ? [[a, b], [unitStart, unitStart + count]] : [[a, b]], relPath);
        copyToFloat64(raw, vals, 0);
        if (times && base.kind === 'timestamps') copyToFloat64(readSlice(base.ds, [[a, b]], relPath), times, 0);
        for (let i = a; i < b; i++) tiles.add(sampleBin(base, binMs, i, times ? times[i - a] : 0), vals, (i - a) * count);
      }
      tiles.finish();
    },
    async close(): Promise<void> {
      open = false;
      closeQuietly(file);
    },
  };
}
