/**
 * The NWB reader on small files written with h5wasm at test time, laid out as the NWB 2.x
 * specification describes (Units: spike_times + ragged spike_times_index + id; TimeSeries:
 * data [time, channels] with conversion/offset, timestamps or starting_time + rate). Every
 * expected value is worked by hand in the comment beside it.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import h5wasm from 'h5wasm/node';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { inspectNwb, listNwbCandidates, openNwbActivity } from '../../src/readers/nwb.ts';
import type { ActivityFile } from '../../src/readers/types.ts';
import { readAll } from '../helpers/read-all.ts';

let dir = '';
const at = (name: string) => join(dir, name);

type H5Group = ReturnType<InstanceType<typeof h5wasm.File>['create_group']>;

/** Units table: spikes per unit (seconds), ids; index = running end offsets. */
function writeUnits(g: H5Group, spikes: number[][], ids: number[], indexOverride?: number[]): void {
  g.create_attribute('neurodata_type', 'Units');
  g.create_attribute('namespace', 'core');
  g.create_dataset({ name: 'spike_times', data: new Float64Array(spikes.flat()) });
  let end = 0;
  const index = indexOverride ?? spikes.map((s) => (end += s.length));
  g.create_dataset({ name: 'spike_times_index', data: BigInt64Array.from(index, BigInt) });
  g.create_dataset({ name: 'id', data: new Int32Array(ids) });
}

function withFile(name: string, build: (f: InstanceType<typeof h5wasm.File>) => void): string {
  const f = new h5wasm.File(at(name), 'w');
  try {
    build(f);
  } finally {
    f.close();
  }
  return at(name);
}

/** True when HDF5 lets us open the file read-write, i.e. no reader still holds it open read-only. */
function isReleased(path: string): boolean {
  const f = new h5wasm.File(path, 'a');
  const ok = typeof f.file_id === 'bigint' && f.file_id >= 0n;
  if (ok) f.close();
  return ok;
}


let mixed = '';
beforeAll(async () => {
  await h5wasm.ready;
  dir = mkdtempSync(join(tmpdir(), 'lacuna-nwb-'));
  mixed = withFile('mixed.nwb', (f) => {
    writeUnits(f.create_group('units'), [[0.05, 0.15, 0.16, 0.45], [0.0, 0.1, 0.3], []], [10, 20, 30]);
    const acq = f.create_group('acquisition');
    const trace = acq.create_group('trace');
    trace.create_attribute('neurodata_type', 'TimeSeries');
    const data = trace.create_dataset({ name: 'data', data: new Float32Array([1, 10, 3, 20, 5, 30, 7, 40]), shape: [4, 2] });
    data.create_attribute('conversion', 2.0);
    data.create_attribute('offset', 1.0);
    data.create_attribute('unit', 'volts');
    trace.create_dataset({ name: 'starting_time', data: 1.5 }).create_attribute('rate', 20.0);
    const dff = f.create_group('processing').create_group('ophys').create_group('DfOverF');
    dff.create_attribute('neurodata_type', 'DfOverF');
    const roi = dff.create_group('roi_dff');
    roi.create_attribute('neurodata_type', 'RoiResponseSeries');
    roi.create_dataset({ name: 'data', data: new Float64Array([1, 2, 3, 4]) });
    roi.create_dataset({ name: 'timestamps', data: new Float64Array([0, 0.1, 0.2, 0.45]) });
  });
});
afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('NWB fixture written with h5wasm: choosing what to read', () => {
  it('lists every units table and time series with type and shape', async () => {
    // Walk order is sorted names: acquisition, processing, units. DfOverF is a container, not a series.
    expect(await listNwbCandidates(mixed)).toEqual([
      { path: '/acquisition/trace', neurodataType: 'TimeSeries', shape: [4, 2] },
      { path: '/processing/ophys/DfOverF/roi_dff', neurodataType: 'RoiResponseSeries', shape: [4] },
      { path: '/units', neurodataType: 'Units', shape: [3] },
    ]);
  });

  it('without a series choice the error lists every candidate path with its type and shape', async () => {
    const err = await openNwbActivity(mixed, { binMs: 100, series: null, relPath: 'data/mixed.nwb' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    const msg = (err as InputError).message;
    expect(msg).toContain('data/mixed.nwb');
    expect(msg).toContain('/acquisition/trace (TimeSeries, shape [4, 2], float32)');
    expect(msg).toContain('/processing/ophys/DfOverF/roi_dff (RoiResponseSeries, shape [4], float64)');
    expect(msg).toContain('/units (Units, 3 units, float64)');
    expect(isReleased(mixed)).toBe(true);
  });

  it('a series path that is not in the file is an error listing the candidates', async () => {
    const err = await openNwbActivity(mixed, { binMs: 100, series: '/acquisition/nope', relPath: 'mixed.nwb' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).where).toBe('series');
    expect((err as InputError).message).toContain('/units (Units');
    expect(isReleased(mixed)).toBe(true);
  });

  it('inspect reports the chosen part and all parts without reading data', async () => {
    const insp = await inspectNwb(mixed, 'mixed.nwb', 'acquisition/trace', 50); // the series' 20 Hz interval: a finer bin_ms is refused, as the build refuses it
    expect(insp).toMatchObject({ format: 'nwb', shape: [4, 2], dtype: 'float32' });
    expect(insp.parts?.map((p) => p.name)).toEqual(['/acquisition/trace', '/processing/ophys/DfOverF/roi_dff', '/units']);
  });
});

describe('NWB fixture: values', () => {
  it('bins spikes of /units at 100 ms (series chosen by path)', async () => {
    const f = await openNwbActivity(mixed, { binMs: 100, series: '/units', relPath: 'mixed.nwb' });
    try {
      // Bins [0.1k, 0.1(k+1)) s. Unit 10: 0.05→0, 0.15→1, 0.16→1, 0.45→4 → [1,2,0,0,1].
      // Unit 20: 0.0→0, 0.1→1 (on the edge: starts bin 1), 0.3→3 (300 ms / 100 = 3) → [1,1,0,1,0].
      // Unit 30: no spikes → zeros. Last spike 0.45 s is in bin 4 → 5 bins. No obs_intervals → nothing missing.
      expect(f.unitLabels).toEqual(['10', '20', '30']);
      expect(f.bins).toBe(5);
      const { values, missing } = await readAll(f);
      expect(values).toEqual([
        [1, 2, 0, 0, 1],
        [1, 1, 0, 1, 0],
        [0, 0, 0, 0, 0],
      ]);
      expect(missing.flat().every((m) => m === 0)).toBe(true);
      expect(f.hasMissing).toBe(false);
    } finally {
      await f.close();
    }
    expect(isReleased(mixed)).toBe(true);
  });

  it('resamples a starting_time + rate series, applying conversion and offset', async () => {
    const f = await openNwbActivity(mixed, { binMs: 100, series: '/acquisition/trace', relPath: 'mixed.nwb' });
    try {
      // rate 20 Hz → samples every 50 ms; bins of 100 ms from starting_time hold samples (0,1) and (2,3).
      // ROI 0: data 1,3 | 5,7 → means 2, 6 → ×2 + 1 = 5, 13. ROI 1: 10,20 | 30,40 → 15, 35 → 31, 71.
      const { values } = await readAll(f);
      expect(values).toEqual([
        [5, 13],
        [31, 71],
      ]);
      expect(f.findings[0].message).toContain('"volts"');
    } finally {
      await f.close();
    }
  });

  it('marks bins with no sample (a gap in timestamps) as missing, and counts them', async () => {
    const f = await openNwbActivity(mixed, { binMs: 100, series: '/processing/ophys/DfOverF/roi_dff', relPath: 'mixed.nwb' });
    try {
      // timestamps 0, 0.1, 0.2, 0.45 → bins 0, 1, 2, 4; bin 3 [0.3, 0.4) holds none.
      // Median sampling interval = median(100, 100, 250 ms) = 100 ms = bin_ms, so it is allowed.
      const { values, missing } = await readAll(f);
      expect(values).toEqual([[1, 2, 3, 0, 4]]);
      expect(missing).toEqual([[0, 0, 0, 1, 0]]);
      expect(f.findings.find((x) => x.code === 'empty-bins')).toMatchObject({ level: 'notice', count: 1 });
    } finally {
      await f.close();
    }
  });

  it('refuses bin_ms finer than the 50 ms interval of a rate-based series', async () => {
    const err = await openNwbActivity(mixed, { binMs: 20, series: '/acquisition/trace', relPath: 'mixed.nwb' }).catch((e: unknown) => e);
    expect((err as InputError).message).toMatch(/bin_ms 20 .* 50 ms \(20 Hz\)/);
    expect(isReleased(mixed)).toBe(true);
  });
});

describe('NWB fixture: observation intervals not on bin edges', () => {
  it('counts a partly covered bin as observed, merges overlapping intervals, and drops spikes in missing bins', async () => {
    const p = withFile('obs.nwb', (f) => {
      const g = f.create_group('units');
      writeUnits(g, [[0.05, 0.27, 0.31], [0.12]], [1, 2]);
      g.create_dataset({ name: 'obs_intervals', data: new Float64Array([0.05, 0.25, 0.1, 0.2, 0.15, 0.35]), shape: [3, 2] });
      g.create_dataset({ name: 'obs_intervals_index', data: BigInt64Array.from([1n, 3n]) });
    });
    const f = await openNwbActivity(p, { binMs: 100, series: null, relPath: 'obs.nwb' });
    try {
      // Bins of 100 ms. Unit 1: [0.05, 0.25] covers part of bin 0, all of bin 1, part of bin 2 → observed {0,1,2}.
      //   Spikes 0.05→bin 0, 0.27→bin 2, 0.31→bin 3 (missing: left out).
      // Unit 2: [0.1, 0.2] covers bin 1 (touches bin 2 only at 0.2 s); [0.15, 0.35] covers bins 1, 2, 3
      //   → merged observed {1,2,3}. Spike 0.12→bin 1.
      // Bins: last spike 0.31 s → bin 3; last interval end 0.35 s → ⌈3.5⌉ = 4 bins.
      expect(f.bins).toBe(4);
      const { values, missing } = await readAll(f);
      expect(values).toEqual([
        [1, 0, 1, 0],
        [0, 1, 0, 0],
      ]);
      expect(missing).toEqual([
        [0, 0, 0, 1],
        [1, 0, 0, 0],
      ]);
      expect(f.findings.find((x) => x.code === 'unobserved-bins')?.count).toBe(2);
      expect(f.findings.find((x) => x.code === 'spikes-outside-observation')).toMatchObject({ level: 'exclude', count: 1, where: ['unit 1'] });
    } finally {
      await f.close();
    }
  });

  it('an observation interval that ends before it starts is an error naming its row', async () => {
    const p = withFile('obs-bad.nwb', (f) => {
      const g = f.create_group('units');
      writeUnits(g, [[0.1]], [0]);
      g.create_dataset({ name: 'obs_intervals', data: new Float64Array([0.5, 0.2]), shape: [1, 2] });
      g.create_dataset({ name: 'obs_intervals_index', data: BigInt64Array.from([1n]) });
    });
    const err = await openNwbActivity(p, { binMs: 100, series: null, relPath: 'obs-bad.nwb' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).where).toBe('/units/obs_intervals[0]');
    expect(isReleased(p)).toBe(true);
  });
});

describe('NWB error cases', () => {
  const failWith = async (path: string) => {
    const err = await openNwbActivity(path, { binMs: 100, series: null, relPath: 'x.nwb' }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  };

  it('a file that is not HDF5', async () => {
    writeFileSync(at('text.nwb'), 'unit,time\n1,0.5\n');
    const err = await failWith(at('text.nwb'));
    expect(err.message).toContain('not an HDF5 file');
    expect(err.file).toBe('x.nwb');
    expect(err.message).toContain(Buffer.from('unit,tim').toString('hex')); // first 8 bytes shown
  });

  it('an HDF5 file with no units table or time series lists the top-level groups', async () => {
    const p = withFile('empty.nwb', (f) => {
      f.create_group('acquisition').create_group('notes');
      f.create_dataset({ name: 'identifier', data: 'x' });
    });
    const err = await failWith(p);
    expect(err.message).toContain('no units table');
    expect(err.message).toContain('acquisition/ (group), identifier (dataset)');
    expect(isReleased(p)).toBe(true);
  });

  it('a ragged index that decreases', async () => {
    const p = withFile('decreasing.nwb', (f) => writeUnits(f.create_group('units'), [[0.1, 0.2], [0.3]], [0, 1], [2, 1]));
    const err = await failWith(p);
    expect(err.where).toBe('/units/spike_times_index[1]');
    expect(err.message).toContain('decreases (2 then 1)');
    expect(isReleased(p)).toBe(true);
  });

  it('a ragged index past the end of spike_times', async () => {
    const p = withFile('past-end.nwb', (f) => writeUnits(f.create_group('units'), [[0.1, 0.2], [0.3]], [0, 1], [2, 9]));
    const err = await failWith(p);
    expect(err.message).toContain('9 is past the end of its column (length 3)');
  });

  it('a negative spike time, naming its place and unit', async () => {
    const p = withFile('negative.nwb', (f) => writeUnits(f.create_group('units'), [[0.1], [0.2, -0.5]], [4, 5]));
    const err = await failWith(p);
    expect(err.where).toBe('/units/spike_times[2]');
    expect(err.message).toContain('spike time -0.5 of unit 5 is negative');
    expect(isReleased(p)).toBe(true);
  });
});
