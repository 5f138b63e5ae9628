/**
 * Spike times near a bin edge, on long recordings (a tolerance of 1e-9 · t/w bins, as before,
 * swallows a whole 30 kHz sample from t ≈ 33,333 s on, whatever the bin width). Reference: exact binning of integer sample
 * indices (numpy integer floor division of 30 kHz sample numbers, and Python's `fractions` for
 * decimal times), and the real locust receptor spike times (../shared/data/real/locust-receptor,
 * integer microseconds; README there: 22 spikes sit exactly on a 10 ms edge, and an edge belongs
 * to the bin it starts). Times reach the readers as decimal seconds (CSV) or float64 (NWB written
 * with h5wasm from the numbers Python produced), as they would from an acquisition system.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import h5wasm from 'h5wasm/node';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDataset } from '../../src/readers/index.ts';
import { openNwbActivity } from '../../src/readers/nwb.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { readAll as readFile } from '../helpers/read-all.ts';
import { dataset, readAll, tempDir } from './helpers.ts';

const tmp = tempDir('lacuna-edges-');
afterAll(tmp.cleanup);
const openAt = (f: string, binMs: number) => openDataset(dataset(tmp.dir, [f], 'spikes'), { kind: 'activity', binMs, workspaceRoot: tmp.dir });

/** (unit, bin) → count of the nonzero cells of a units × bins matrix, as sorted "u:b:c" strings. */
function nonzero(m: ArrayLike<number>, bins: number): string[] {
  const out: string[] = [];
  for (let i = 0; i < m.length; i++) if (m[i] !== 0) out.push(`${Math.floor(i / bins)}:${i % bins}:${m[i]}`);
  return out.sort();
}

interface Long { times: number[]; units: number[]; expected: Record<string, string[]>; bins: Record<string, number> }

/**
 * A day at 30 kHz: sample indices on, one before and one after 300 random edges of 100 ms and
 * of 1 s bins, plus 300 random samples; t = i / 30000 as the nearest double. Expected bin from
 * the integers: i // (30 · bin_ms).
 */
const LONG_PY = `
rng = np.random.default_rng(20261202)
top = 24 * 3600 * 30000
idx = [int(i) for i in rng.integers(0, top, 300)]
for step in (3000, 30000):
    for e in rng.integers(1, top // step, 300):
        e = int(e) * step
        idx += [e - 1, e, e + 1]
units = [int(u) for u in rng.integers(0, 2, len(idx))]
times = [i / 30000 for i in idx]
expected, bins = {}, {}
for bin_ms in (100, 1000):
    b = [i // (30 * bin_ms) for i in idx]
    cells = {}
    for u, k in zip(units, b):
        cells[(u, k)] = cells.get((u, k), 0) + 1
    expected[str(bin_ms)] = sorted(f"{u}:{k}:{c}" for (u, k), c in cells.items())
    bins[str(bin_ms)] = max(b) + 1
print(json.dumps({"times": times, "units": units, "expected": expected, "bins": bins}))
`;

let long: Long | null = null;
beforeAll(async () => {
  await h5wasm.ready;
  if (hasScipy) long = runPython<Long>(LONG_PY);
});

describe.skipIf(!hasScipy)('spike times near bin edges over a day at 30 kHz (integer sample arithmetic, numpy)', () => {
  it('a spike table puts every spike in the bin of its sample index', async () => {
    const L = long!;
    // repr-style shortest decimals, as Python prints them (JSON numbers round-trip exactly).
    const text = 'unit,time\n' + L.times.map((t, i) => `${L.units[i]},${t}`).join('\n') + '\n';
    writeFileSync(join(tmp.dir, 'long.csv'), text);
    for (const binMs of [100, 1000]) {
      const src = await openAt(join(tmp.dir, 'long.csv'), binMs);
      if (src.kind !== 'activity') throw new Error('kind');
      expect(src.bins).toBe(L.bins[String(binMs)]);
      expect(nonzero(await readAll(src), src.bins)).toEqual(L.expected[String(binMs)]);
    }
  });

  it('an NWB units table puts every spike in the bin of its sample index', async () => {
    const L = long!;
    const path = join(tmp.dir, 'long.nwb');
    const f = new h5wasm.File(path, 'w');
    try {
      const g = f.create_group('units');
      g.create_attribute('neurodata_type', 'Units');
      g.create_attribute('namespace', 'core');
      const per = [0, 1].map((u) => L.times.filter((_, i) => L.units[i] === u).sort((a, b) => a - b));
      g.create_dataset({ name: 'spike_times', data: new Float64Array(per.flat()) });
      g.create_dataset({ name: 'spike_times_index', data: BigInt64Array.from([per[0].length, per[0].length + per[1].length], BigInt) });
      g.create_dataset({ name: 'id', data: new Int32Array([0, 1]) });
    } finally {
      f.close();
    }
    for (const binMs of [100, 1000]) {
      const a = await openNwbActivity(path, { binMs, series: null, relPath: 'long.nwb' });
      try {
        expect(a.bins).toBe(L.bins[String(binMs)]);
        const { values } = await readFile(a);
        expect(nonzero(values.flat(), a.bins)).toEqual(L.expected[String(binMs)]);
      } finally {
        await a.close();
      }
    }
  });
});

describe.skipIf(!hasScipy)('single spikes just before an edge (exact rationals, Python fractions)', () => {
  const exactBin = (t: string, binMs: number) =>
    runPython<number>(`from fractions import Fraction\nprint(json.dumps(int(Fraction(inp[0]) * 1000 // inp[1])))`, [t, binMs]);

  it('2102.6999995 s (0.5 µs before a 100 ms edge, as in a human single-unit recording) stays in its bin', async () => {
    writeFileSync(join(tmp.dir, 'near.csv'), 'unit,time\na,2102.6999995\n');
    const src = await openAt(join(tmp.dir, 'near.csv'), 100);
    const m = await readAll(src);
    expect(exactBin('2102.6999995', 100)).toBe(21026);
    expect(nonzero(m, (src as { bins: number }).bins)).toEqual([`0:${exactBin('2102.6999995', 100)}:1`]);
  });

  it('a spike 20 µs before a stated duration of 36000 s is inside the recording', async () => {
    writeFileSync(join(tmp.dir, 'dur.csv'), '# duration_s: 36000\nunit,time\na,35999.99998\n');
    const src = await openAt(join(tmp.dir, 'dur.csv'), 1000);
    if (src.kind !== 'activity') throw new Error('kind');
    expect(src.bins).toBe(36000);
    expect(nonzero(await readAll(src), src.bins)).toEqual([`0:${exactBin('35999.99998', 1000)}:1`]);
  });
});

const LOCUST = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/data/real/locust-receptor');
const locustFiles = ['grasshopper_spike_times1.txt', 'grasshopper_spike_times2.txt'].map((f) => join(LOCUST, f));
const locustPresent = locustFiles.every((f) => existsSync(f));
if (!locustPresent) console.warn(`[lacuna tests] skipping locust receptor edge tests: ${LOCUST} is absent`);

describe.skipIf(!locustPresent || !hasScipy)('real locust receptor spike times at 10 ms (numpy on integer microseconds)', () => {
  it('spikes exactly on a 10 ms edge count in the bin the edge starts', async () => {
    // Convert µs → decimal seconds as text (exact), one unit per file, 10 s stated.
    const us = locustFiles.map((f) => readFileSync(f, 'utf8').split('\n').filter((l) => l.trim() !== '' && !l.startsWith('#')).map((l) => l.trim()));
    const sec = (s: string) => { const p = s.padStart(7, '0'); return `${p.slice(0, -6)}.${p.slice(-6)}`; };
    const rows = us.flatMap((list, u) => list.map((s) => `${u},${sec(s)}`));
    writeFileSync(join(tmp.dir, 'locust.csv'), '# duration_s: 10\nunit,time\n' + rows.join('\n') + '\n');
    const ref = runPython<{ counts: number[][]; onEdge: number }>(
      `a = [np.loadtxt(f, comments='#').astype(np.int64) for f in inp]\n` +
      `print(json.dumps({"counts": [np.bincount(x // 10000, minlength=1000).tolist() for x in a], "onEdge": int(sum((x % 10000 == 0).sum() for x in a))}))`,
      locustFiles,
    );
    expect(ref.onEdge).toBe(22); // README of the data folder
    const src = await openAt(join(tmp.dir, 'locust.csv'), 10);
    if (src.kind !== 'activity') throw new Error('kind');
    expect([src.units, src.bins]).toEqual([2, 1000]);
    const m = Array.from(await readAll(src));
    expect([m.slice(0, 1000), m.slice(1000)]).toEqual(ref.counts);
  });
});
