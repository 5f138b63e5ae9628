/**
 * The NWB reader on two files written by the NWB standard's reference software for its own
 * integration tests (dandi-datasets/nwb_test_data, v2.0.1: test_Units.nwb and
 * test_RoiResponseSeries.nwb), kept outside this repository in ../shared/data/nwb/. Expected
 * contents are those listed in that folder's README; every binned value below is worked by hand.
 */
import { existsSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { inspectNwb, listNwbCandidates, openNwbActivity } from '../../src/readers/nwb.ts';
import type { ActivityFile } from '../../src/readers/types.ts';
import { readAll } from '../helpers/read-all.ts';

// test/readers → repository root → its sibling `shared` folder (/work/main/../shared).
const DIR = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/data/nwb');
const UNITS = join(DIR, 'units-table.nwb');
const ROI = join(DIR, 'roi-response-series.nwb');
const present = existsSync(UNITS) && existsSync(ROI);
if (!present) console.warn(`[lacuna tests] skipping real NWB file tests: ${DIR} is absent`);


describe.skipIf(!present)('NWB units table written by the reference software (units-table.nwb)', () => {
  it('finds the table at /acquisition/UnitsTest by neurodata_type, not at /units', async () => {
    // Source: shared/data/nwb/README.md ("a units table at /acquisition/UnitsTest — not at /units").
    expect(await listNwbCandidates(UNITS)).toEqual([{ path: '/acquisition/UnitsTest', neurodataType: 'Units', shape: [2] }]);
    const insp = await inspectNwb(UNITS, 'units-table.nwb', null, 1000);
    expect(insp.shape).toEqual([2]);
    expect(insp.bytes).toBe(19304); // `ls -l` of the file
  });

  it('bins spike times at 1000 ms and marks bins outside obs_intervals as missing', async () => {
    const f = await openNwbActivity(UNITS, { binMs: 1000, series: null, relPath: 'units-table.nwb' });
    try {
      // README: id = [0, 1]; unit 0 spikes at 0, 1, 2 s; unit 1 at 3, 4, 5 s;
      // obs_intervals unit 0: [0,1], [2,3]; unit 1: [2,5], [6,7].
      expect(f.unitLabels).toEqual(['0', '1']);
      expect(f.binMs).toBe(1000);
      // Bins are [k, k+1) s from time 0. The last spike (5 s) is in bin 5; the last observation
      // ends at 7 s, so ⌈7⌉ = 7 bins: 0..6.
      expect(f.bins).toBe(7);
      // Counts ignoring observation: unit 0 → bins 0,1,2 hold one spike each: [1,1,1,0,0,0,0];
      //                              unit 1 → bins 3,4,5:                     [0,0,0,1,1,1,0].
      // Observed bins (an interval covers a positive length of [k, k+1)):
      //   unit 0: [0,1] covers bin 0 only (it touches bin 1 at the single instant 1 s);
      //           [2,3] covers bin 2 only. Observed {0, 2}; missing {1, 3, 4, 5, 6}.
      //   unit 1: [2,5] covers bins 2, 3, 4; [6,7] covers bin 6. Observed {2,3,4,6}; missing {0, 1, 5}.
      // Missing cells read as 0, so the spikes at 1 s (unit 0) and 5 s (unit 1) are left out.
      const { values, missing } = await readAll(f);
      expect(missing).toEqual([
        [0, 1, 0, 1, 1, 1, 1],
        [1, 1, 0, 0, 0, 1, 0],
      ]);
      expect(values).toEqual([
        [1, 0, 1, 0, 0, 0, 0],
        [0, 0, 0, 1, 1, 0, 0],
      ]);
      expect(f.hasMissing).toBe(true);
      // 5 + 3 = 8 missing cells; 2 spikes left out (one per unit).
      const byCode = Object.fromEntries(f.findings.map((x) => [x.code, x]));
      expect(byCode['unobserved-bins']).toMatchObject({ level: 'notice', count: 8 });
      expect(byCode['spikes-outside-observation']).toMatchObject({ level: 'exclude', count: 2 });
    } finally {
      await f.close();
    }
  });

  it('reads one unit at a time into a wider block at a column offset, leaving other columns alone', async () => {
    const f = await openNwbActivity(UNITS, { binMs: 1000, series: null, relPath: 'units-table.nwb' });
    try {
      const cols = f.bins + 3;
      const out = new Float64Array(cols).fill(-7);
      const miss = new Uint8Array(cols);
      await f.readUnits(1, 1, out, cols, 2, miss);
      // Unit 1 (worked above) placed at columns 2..8; columns 0, 1, 9 keep the sentinel -7.
      expect(Array.from(out)).toEqual([-7, -7, 0, 0, 0, 1, 1, 0, 0, -7]);
      expect(Array.from(miss)).toEqual([0, 0, 1, 1, 0, 0, 0, 1, 0, 0]);
    } finally {
      await f.close();
    }
  });
});

describe.skipIf(!present)('NWB RoiResponseSeries written by the reference software (roi-response-series.nwb)', () => {
  const open = (binMs: number) => openNwbActivity(ROI, { binMs, series: null, relPath: 'roi-response-series.nwb' });

  it('is the only candidate (the ImageSeries beside it has no data) and has shape [10]', async () => {
    // README: RoiResponseSeries at /acquisition/test_roi_response_series, data = 0…9 (one ROI).
    expect(await listNwbCandidates(ROI)).toEqual([{ path: '/acquisition/test_roi_response_series', neurodataType: 'RoiResponseSeries', shape: [10] }]);
  });

  it('at 100 ms (the sampling interval) the bins equal the data', async () => {
    // README: timestamps 0, 0.1, …, 0.9 s → sample i falls in bin i of [0.1·i, 0.1·(i+1)).
    const f = await open(100);
    try {
      expect(f.units).toBe(1);
      expect(f.bins).toBe(10);
      expect(f.unitLabels).toEqual(['0']); // README: rois = [0]
      const { values, missing } = await readAll(f);
      expect(values).toEqual([[0, 1, 2, 3, 4, 5, 6, 7, 8, 9]]);
      expect(missing).toEqual([[0, 0, 0, 0, 0, 0, 0, 0, 0, 0]]);
      expect(f.hasMissing).toBe(false);
      expect(f.findings[0].message).toContain('"lumens"'); // data@unit as stored in the file
    } finally {
      await f.close();
    }
  });

  it('at 200 ms each bin is the mean of two samples', async () => {
    // Bin k holds samples 2k and 2k+1: (0+1)/2 = 0.5, (2+3)/2 = 2.5, 4.5, 6.5, 8.5.
    const f = await open(200);
    try {
      expect(f.bins).toBe(5);
      expect((await readAll(f)).values).toEqual([[0.5, 2.5, 4.5, 6.5, 8.5]]);
    } finally {
      await f.close();
    }
  });

  it('at 50 ms (finer than the 100 ms sampling interval) refuses, naming both numbers and what to set', async () => {
    const err = await open(50).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    const msg = (err as InputError).message;
    expect(msg).toContain('roi-response-series.nwb');
    expect(msg).toContain('bin_ms 50');
    expect(msg).toContain('100 ms');
    expect(msg).toContain('set bin_ms to 100');
  });
});
