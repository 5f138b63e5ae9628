/**
 * Where an NWB units table's matrix ends. Real file: ../shared/data/real/mouse-units/A8604-211122.nwb
 * (pynapple's test data; README of that folder: 3 units, 21,354 spikes, an epochs table from 0 s,
 * 10,874 bins at 100 ms when the matrix ends at the last spike's bin). Reference: h5py and numpy
 * (Debian's /usr/bin/python3) reading the same file: the epochs' stop_time, the bin count
 * ⌈stop · 1000 / bin_ms⌉ in exact rationals (Python fractions), and per-unit spike counts by
 * numpy. A hand-made file (h5wasm) checks a bad stop_time.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import h5wasm from 'h5wasm/node';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openNwbActivity } from '../../src/readers/nwb.ts';
import { readAll } from '../helpers/read-all.ts';

const FILE = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/data/real/mouse-units/A8604-211122.nwb');
const h5py = spawnSync('/usr/bin/python3', ['-c', 'import h5py, numpy'], { encoding: 'utf8' });
const ready = existsSync(FILE) && h5py.status === 0;
if (!ready) console.warn(`[lacuna tests] skipping the real NWB recording-end test: ${existsSync(FILE) ? 'no h5py in /usr/bin/python3' : `${FILE} is absent`}`);

/** h5py/numpy reference at `binMs`, optionally cut at `endS`: bins, per-unit counts (before the end), spikes at or after it. */
function reference(binMs: number, endS: number | null): { stop: number; bins: number; counts: number[]; after: number } {
  const code = `
import sys, json, math
from fractions import Fraction
import h5py, numpy as np
f = h5py.File(sys.argv[1], 'r')
bin_ms = Fraction(sys.argv[2]); end = None if sys.argv[3] == 'none' else Fraction(sys.argv[3])
stop = float(f['intervals/epochs/stop_time'][:].max())
last = end if end is not None else Fraction(stop)
bins = math.ceil(last * 1000 / bin_ms)
st = f['units/spike_times'][:]; idx = f['units/spike_times_index'][:]
k = np.array([int(Fraction(t) * 1000 // bin_ms) for t in st])
counts, a = [], 0
for e in idx:
    counts.append(int((k[a:e] < bins).sum())); a = e
print(json.dumps({"stop": stop, "bins": bins, "counts": counts, "after": int((k >= bins).sum())}))
`;
  const r = spawnSync('/usr/bin/python3', ['-c', code, FILE, String(binMs), endS === null ? 'none' : String(endS)], { encoding: 'utf8' });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout);
}

describe.skipIf(!ready)('recording end of a real NWB units table (h5py, numpy, fractions)', () => {
  it('runs to the epochs table stop_time, not the last spike, and says so', async () => {
    const ref = reference(100, null);
    const f = await openNwbActivity(FILE, { binMs: 100, series: null, relPath: 'A8604-211122.nwb' });
    try {
      expect(ref.bins).toBeGreaterThan(10874); // the last spike's bin ends the matrix at 10,874 (folder README)
      expect([f.units, f.bins]).toEqual([3, ref.bins]);
      const { values } = await readAll(f);
      expect(values.map((row) => row.reduce((a, b) => a + b, 0))).toEqual(ref.counts);
      const notice = f.findings.find((x) => x.code === 'nwb-units-table')!;
      expect(notice.message).toContain(`/intervals/epochs/stop_time (${ref.stop} s)`);
    } finally {
      await f.close();
    }
  });

  it("the manifest's recording_end_s overrides it; later spikes are left out and counted", async () => {
    const ref = reference(100, 500);
    const f = await openNwbActivity(FILE, { binMs: 100, series: null, relPath: 'A8604-211122.nwb', recordingEndS: 500 });
    try {
      expect(f.bins).toBe(ref.bins);
      const { values } = await readAll(f);
      expect(values.map((row) => row.reduce((a, b) => a + b, 0))).toEqual(ref.counts);
      const cut = f.findings.find((x) => x.code === 'spikes-after-end')!;
      expect([cut.level, cut.count]).toEqual(['exclude', ref.after]);
      expect(f.findings.find((x) => x.code === 'nwb-units-table')!.message).toContain("the manifest's recording_end_s (500 s)");
    } finally {
      await f.close();
    }
  });
});

describe('a bad stop_time (file written with h5wasm)', () => {
  let dir = '';
  beforeAll(async () => {
    await h5wasm.ready;
    dir = mkdtempSync(join(tmpdir(), 'lacuna-nwb-end-'));
  });
  afterAll(() => {
    if (dir) rmSync(dir, { recursive: true, force: true });
  });
  it('is an InputError naming the row, unless the manifest states the end', async () => {
    const path = join(dir, 'bad.nwb');
    const f = new h5wasm.File(path, 'w');
    try {
      const g = f.create_group('units');
      g.create_attribute('neurodata_type', 'Units');
      g.create_dataset({ name: 'spike_times', data: new Float64Array([0.05, 0.31]) });
      g.create_dataset({ name: 'spike_times_index', data: BigInt64Array.from([2n]) });
      const t = f.create_group('intervals').create_group('trials');
      t.create_attribute('neurodata_type', 'TimeIntervals');
      t.create_dataset({ name: 'start_time', data: new Float64Array([0, 1]) });
      t.create_dataset({ name: 'stop_time', data: new Float64Array([1, NaN]) });
    } finally {
      f.close();
    }
    const err = await openNwbActivity(path, { binMs: 100, series: null, relPath: 'bad.nwb' }).then(() => null, (e: unknown) => e as { name: string; where?: string });
    expect([err?.name, err?.where]).toEqual(['InputError', '/intervals/trials/stop_time[1]']);
    // With the end stated in the manifest the table is not consulted: ⌈0.5 s / 100 ms⌉ = 5 bins.
    const ok = await openNwbActivity(path, { binMs: 100, series: null, relPath: 'bad.nwb', recordingEndS: 0.5 });
    try {
      expect(ok.bins).toBe(5);
    } finally {
      await ok.close();
    }
  });
});
