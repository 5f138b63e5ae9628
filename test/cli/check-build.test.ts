/**
 * `lacuna check` refuses what `lacuna build` refuses from headers and manifest alone, with the
 * same message, and each hint is printed once. Cases: an NWB series sampled at 20 Hz (starting_time
 * + rate, written by h5py at test time) binned at 10 ms; the reference software's
 * RoiResponseSeries with timestamps (../shared/data/nwb/roi-response-series.nwb, 10 Hz per its
 * README) binned at 50 ms; recording_end_s set for a time series; a spike table whose
 * `# duration_s` makes too many bins. Runs the command as a user
 * does (child processes of bin/lacuna.mjs).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';

const BIN = resolve(__dirname, '../../bin/lacuna.mjs');
const ROI = resolve(__dirname, '../../../shared/data/nwb/roi-response-series.nwb');
const h5py = spawnSync('/usr/bin/python3', ['-c', 'import h5py, numpy'], { encoding: 'utf8' }).status === 0;
if (!h5py) console.warn('[lacuna tests] skipping check = build for rate-based NWB series: no h5py in /usr/bin/python3');
if (!existsSync(ROI)) console.warn(`[lacuna tests] skipping check = build on the real RoiResponseSeries: ${ROI} is absent`);

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const run = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 180_000, env: { ...process.env, NO_COLOR: '1' } });

function workspace(file: string, write: (path: string) => void, front: string, entry = ''): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-checkbuild-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  write(join(ws, 'data', file));
  writeFileSync(join(ws, 'audits', 'a.md'), `---\naudit: a\ntitle: A\n${front}\ndatasets:\n  - { id: d, path: ../data/${file}${entry} }\n---\n`);
  return ws;
}

const count = (text: string, part: string) => text.split(part).length - 1;

/** check and build both exit 1; check's one problem is the build's innermost cause, word for word; the hint appears once in each. */
function expectSameRefusal(ws: string, hint: string): void {
  const c = run('check', '--workspace', ws);
  const b = run('build', '--workspace', ws, '--quiet');
  expect([c.status, b.status]).toEqual([1, 1]);
  const problem = c.stderr.split('\n').find((l) => l.startsWith('  - '))!.slice(4);
  const lastCause = b.stderr.trim().split('\n').pop()!.replace(/^\s*\d+\. caused by: /, '');
  expect(problem).toBe(lastCause);
  expect(count(c.stderr, hint)).toBe(1);
  expect(count(b.stderr, hint)).toBe(1);
}

describe('check refuses what build refuses', () => {
  it.skipIf(!h5py)('bin_ms finer than a rate-based series (h5py file, 20 Hz, bin_ms 10)', () => {
    const ws = workspace('rate.nwb', (path) => {
      const code = `
import sys, h5py, numpy as np
with h5py.File(sys.argv[1], 'w') as f:
    s = f.create_group('acquisition').create_group('trace')
    s.attrs['neurodata_type'] = 'TimeSeries'
    s.create_dataset('data', data=np.arange(40, dtype='f8').reshape(20, 2))
    st = s.create_dataset('starting_time', data=0.0); st.attrs['rate'] = 20.0
`;
      const r = spawnSync('/usr/bin/python3', ['-c', code, path], { encoding: 'utf8' });
      if (r.status !== 0) throw new Error(r.stderr);
    }, 'bin_ms: 10');
    expectSameRefusal(ws, 'set bin_ms to 50 or a multiple of it');
  });

  it.skipIf(!existsSync(ROI))('bin_ms finer than a series with timestamps (the reference software\'s file, 10 Hz, bin_ms 50)', () => {
    const ws = workspace('roi.nwb', (path) => copyFileSync(ROI, path), 'bin_ms: 50');
    expectSameRefusal(ws, 'set bin_ms to 100 or a multiple of it');
  });

  it('a spike table whose stated duration makes more than 2^31 − 1 bins', () => {
    const ws = workspace('s.csv', (path) => writeFileSync(path, '# duration_s: 3000000\nunit,time\na,0.5\n'), 'bin_ms: 1', ', format: spikes');
    expectSameRefusal(ws, 'duration_s 3000000 at 1 ms makes more than 2147483647 bins');
  });

  it.skipIf(!existsSync(ROI))('recording_end_s for a time series', () => {
    const ws = mkdtempSync(join(tmpdir(), 'lacuna-checkbuild-'));
    made.push(ws);
    mkdirSync(join(ws, 'audits'));
    mkdirSync(join(ws, 'data'));
    copyFileSync(ROI, join(ws, 'data', 'roi.nwb'));
    writeFileSync(join(ws, 'audits', 'a.md'), '---\naudit: a\ntitle: A\nbin_ms: 100\ndatasets:\n  - { id: d, path: ../data/roi.nwb, recording_end_s: 5 }\n---\n');
    expectSameRefusal(ws, 'remove recording_end_s, or choose a units table with series');
  });
});
