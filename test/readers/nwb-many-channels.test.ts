/**
 * A time series with many channels read in one call: the series reader's tile shrinks below 256
 * bins (to stay near 4 MiB, so a file declaring millions of channels cannot make it allocate
 * 2 KB per channel at once), and the bin means must not change. Written with h5py at test time
 * (Debian's /usr/bin/python3; skipped with a message without it); with one sample per bin the
 * bin means are the samples themselves, so the expected matrix is numpy's transpose of `data`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openNwbActivity } from '../../src/readers/nwb.ts';

const PY = '/usr/bin/python3';
const probe = spawnSync(PY, ['-c', 'import h5py, numpy'], { encoding: 'utf8' });
const hasH5py = !probe.error && probe.status === 0;
if (!hasH5py) console.warn(`[lacuna tests] skipping many-channel NWB test: ${PY} with h5py is not available`);

const SAMPLES = 400;
const CHANNELS = 5000; // tile = ⌊4 MiB / (8 B × 5000)⌋ = 104 bins, so 400 bins take four tiles

describe.skipIf(!hasH5py)('NWB series with 5000 channels read at once', () => {
  let dir = '';
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'lacuna-channels-'));
    const r = spawnSync(PY, ['-c', String.raw`
import sys, h5py, numpy as np
d = sys.argv[1]
x = np.random.default_rng(5).random((${SAMPLES}, ${CHANNELS}), dtype=np.float32)
with h5py.File(d + '/wide.nwb', 'w') as f:
    g = f.create_group('acquisition/trace'); g.attrs['neurodata_type'] = 'RoiResponseSeries'
    g.create_dataset('starting_time', data=0.0).attrs['rate'] = 100.0
    g.create_dataset('data', data=x)
x.T.astype('<f8').tofile(d + '/expected.f64')
`, dir], { encoding: 'utf8', timeout: 120_000 });
    if (r.status !== 0) throw new Error(r.stderr);
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('gives numpy’s transpose of the data at one sample per 10 ms bin', async () => {
    const f = await openNwbActivity(join(dir, 'wide.nwb'), { binMs: 10, series: null, relPath: 'wide.nwb' });
    try {
      expect([f.units, f.bins]).toEqual([CHANNELS, SAMPLES]);
      const out = new Float64Array(CHANNELS * SAMPLES);
      await f.readUnits(0, CHANNELS, out, SAMPLES, 0);
      const buf = readFileSync(join(dir, 'expected.f64'));
      const expected = new Float64Array(buf.buffer, buf.byteOffset, buf.byteLength / 8);
      let mismatches = 0;
      for (let i = 0; i < out.length; i++) if (out[i] !== expected[i]) mismatches++;
      expect(mismatches).toBe(0);
    } finally {
      await f.close();
    }
  });
});
