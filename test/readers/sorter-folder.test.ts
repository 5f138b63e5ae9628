/**
 * The spike-sorter output folder reader on folders written by numpy at test time in the layout
 * sorters write (uint64 sample indices, int32 clusters, params.py, tab-separated label tables).
 * The binning is compared with an independent exact computation in Python integers and
 * fractions (bin = ⌊s·1000 / (rate·bin_ms)⌋ with the rate and bin width as exact decimals), the
 * measures with test/helpers/numpy-measures.ts on numpy's own bincount of the same spikes.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { hasScipy, runPython } from '../helpers/python.ts';
import { MEASURES_PY, COMPARED_MEASURES } from '../helpers/numpy-measures.ts';
import { measureWorkspace } from '../helpers/measure-workspace.ts';
import { findManifests, loadManifest } from '../../src/manifest/load.ts';
import { openDataset, inspectDataset, type RangedActivitySource } from '../../src/readers/index.ts';
import { readAll } from '../readers/helpers.ts';

if (!hasScipy) console.warn('[lacuna tests] skipping sorter-folder tests: python3 with numpy/scipy is absent (numpy writes the folders)');

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

function workspace(dataset: string, top = 'bin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 200, seed: 2 }'): { ws: string; dir: string } {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-sorter-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  const dir = join(ws, 'data', 'sort');
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(ws, 'audits', 'probe.md'), `---\naudit: probe\ntitle: Sorter folder\n${top}\ndatasets:\n  - ${dataset}\n---\n`);
  return { ws, dir };
}

/**
 * numpy writes a sorter folder: `spec.units` = {cluster: [sample, …]}; labels as rows of
 * cluster_group.tsv; params.py text as given.
 */
function writeFolder(dir: string, spec: { spikes: [number, number][]; labels?: [number, string][]; ksLabels?: [number, string][]; params?: string; shuffle?: boolean }) {
  runPython(`
import os
d = inp['dir']
sp = inp['spikes']
if inp.get('shuffle'): sp = sp[::-1]
else: sp = sorted(sp, key=lambda x: x[0])
np.save(os.path.join(d, 'spike_times.npy'), np.array([s for s, c in sp], dtype=np.uint64))
np.save(os.path.join(d, 'spike_clusters.npy'), np.array([c for s, c in sp], dtype=np.int32))
if inp.get('params') is not None:
    open(os.path.join(d, 'params.py'), 'w').write(inp['params'])
for name, col, rows in (('cluster_group.tsv', 'group', inp.get('labels')), ('cluster_KSLabel.tsv', 'KSLabel', inp.get('ksLabels'))):
    if rows is not None:
        open(os.path.join(d, name), 'w').write('cluster_id\\t%s\\n' % col + ''.join('%d\\t%s\\n' % (c, l) for c, l in rows))
print(json.dumps(0))`, { dir, ...spec });
}

async function open(ws: string): Promise<RangedActivitySource> {
  const m = await loadManifest((await findManifests(ws))[0], ws);
  return (await openDataset(m.datasets[0], { kind: 'activity', binMs: m.bin_ms, workspaceRoot: ws })) as RangedActivitySource;
}

const PARAMS = "dat_path = 'raw.bin'\nn_channels_dat = 385\ndtype = 'int16'\noffset = 0\nsample_rate = 30000.0\nhp_filtered = False\n";

describe.skipIf(!hasScipy)('spike-sorter output folder', () => {
  it('bins a three-hour 30 kHz recording exactly: a spike one sample before an edge stays, one on the edge moves on', async () => {
    const { ws, dir } = workspace('{ id: long, path: ../data/sort, sorter: { labels: [good] } }');
    // 3 h at 30 kHz = 324,000,000 samples; 10 ms bins = 300 samples. Spikes one sample before and
    // exactly on edges near the end, where a float seconds conversion would be off by ~1e-12 s.
    const last = 324_000_000;
    const spikes: [number, number][] = [];
    for (const k of [1, 2, 1_079_998, 1_079_999]) spikes.push([k * 300 - 1, 3], [k * 300, 3], [k * 300 + 1, 7]);
    spikes.push([last - 1, 7]);
    writeFolder(dir, { spikes, labels: [[3, 'good'], [7, 'good']], params: PARAMS });
    const src = await open(ws);
    const got = await readAll(src);
    // Independent: Python integers, bin = s * 1000 // (30000 * 10).
    const want = runPython<{ bins: number; cells: [number, number, number][] }>(`
from collections import Counter
rows = {3: 0, 7: 1}
b = Counter((rows[c], s * 1000 // (30000 * 10)) for s, c in inp['spikes'])
print(json.dumps({'bins': (max(s for s, c in inp['spikes']) * 1000 // 300000) + 1, 'cells': [[u, k, n] for (u, k), n in sorted(b.items())]}))`, { spikes });
    expect(src.units).toBe(2);
    expect(src.bins).toBe(want.bins);
    expect(src.unitLabels).toEqual(['3', '7']);
    const nonzero: [number, number, number][] = [];
    for (let u = 0; u < src.units; u++) for (let k = 0; k < src.bins; k++) if (got[u * src.bins + k]) nonzero.push([u, k, got[u * src.bins + k]]);
    expect(nonzero).toEqual(want.cells);
  });

  it('with a sample rate that is not a whole number of samples per bin, agrees with exact fractions', async () => {
    const { ws, dir } = workspace('{ id: odd, path: ../data/sort, sorter: { sample_rate_hz: 29999.7, duration_s: 7200 } }');
    // 29,999.7 Hz and 10 ms: 299.997 samples a bin. Spikes at and around the computed edges.
    const spikes = runPython<[number, number][]>(`
from fractions import Fraction
per = Fraction('29999.7') * Fraction(10, 1000)
out = []
for k in (1, 17, 123457, 719999):
    e = -(-k * per.numerator // per.denominator)  # first sample of bin k: ceil(k * per)
    out += [[e - 1, 1], [e, 1], [e + 1, 2]]
print(json.dumps(out))`);
    writeFolder(dir, { spikes, labels: [[1, 'good'], [2, 'good']], params: 'sample_rate = 30000.0\n' });
    const src = await open(ws);
    const got = await readAll(src);
    const want = runPython<{ bins: number; cells: [number, number, number][] }>(`
from fractions import Fraction
from collections import Counter
w = Fraction('29999.7') * Fraction(10, 1000)
b = Counter((c - 1, int(Fraction(s) / w)) for s, c in inp['spikes'])
bins = -(-Fraction(7200) * 1000 // Fraction(10))
print(json.dumps({'bins': int(bins), 'cells': [[u, k, n] for (u, k), n in sorted(b.items())]}))`, { spikes });
    expect(src.bins).toBe(want.bins);
    const nonzero: [number, number, number][] = [];
    for (let u = 0; u < src.units; u++) for (let k = 0; k < src.bins; k++) if (got[u * src.bins + k]) nonzero.push([u, k, got[u * src.bins + k]]);
    expect(nonzero).toEqual(want.cells);
    // The manifest's rate won over params.py's, and a notice says so.
    expect(src.findings.find((f) => f.code === 'sample-rate-from-manifest')?.message).toContain('29999.7 Hz');
  });

  it('takes the labelled units, says how many each label had, and flags unlabelled clusters, labels not asked for and good clusters without spikes', async () => {
    const { ws, dir } = workspace('{ id: cur, path: ../data/sort }');
    const spikes: [number, number][] = [];
    const rng = (i: number) => (i * 7919) % 290_000;
    for (let i = 0; i < 900; i++) spikes.push([rng(i) + i, [0, 1, 2, 4, 5, 9][i % 6]]);
    writeFolder(dir, {
      spikes, params: PARAMS,
      labels: [[0, 'good'], [1, 'mua'], [2, 'good'], [4, 'noise'], [5, 'Good-ish'], [8, 'good']],
      ksLabels: [[9, 'mua'], [0, 'mua']],
    });
    const src = await open(ws);
    // Curated table wins where it lists a cluster (0 is good there, mua in KSLabel).
    expect(src.unitLabels).toEqual(['0', '2']);
    const by = Object.fromEntries(src.findings.map((f) => [f.code, f]));
    expect(by['sorter-labels'].message).toContain('good 3 (taken)');
    expect(by['sorter-labels'].message).toContain('mua 2');
    expect(by['sorter-labels-not-taken']).toMatchObject({ level: 'notice', where: ['good-ish'], count: 1 });
    expect(by['sorter-labelled-without-spikes']).toMatchObject({ level: 'caution', count: 1, where: ['cluster 8'] });
    expect(by['duration-from-last-spike'].level).toBe('notice');
    expect(by['sorter-unlabelled-clusters']).toBeUndefined();
  });

  it('every measure equals numpy on numpy’s own bincount of the same spikes', async () => {
    const { ws, dir } = workspace('{ id: m, path: ../data/sort, sorter: { labels: [good, mua], duration_s: 60 } }');
    const spikes = runPython<[number, number][]>(`
rng = np.random.default_rng(11)
out = []
for c, rate in ((2, 20.0), (5, 3.0), (6, 40.0), (9, 1.0), (12, 8.0)):
    n = rng.poisson(rate * 60)
    out += [[int(s), c] for s in rng.integers(0, 60 * 30000, n)]
print(json.dumps(out))`);
    writeFolder(dir, { spikes, params: PARAMS, labels: [[2, 'good'], [5, 'mua'], [6, 'good'], [9, 'noise'], [12, 'good']] });
    const [d] = await measureWorkspace(ws);
    const want = runPython<Record<string, number | null>>(`${MEASURES_PY}
import os
t = np.load(os.path.join(inp['dir'], 'spike_times.npy')).astype(np.int64)
c = np.load(os.path.join(inp['dir'], 'spike_clusters.npy'))
bins = 6000  # 60 s of 10 ms bins
X = np.vstack([np.bincount(t[c == u] // 300, minlength=bins) for u in (2, 5, 6, 12)])
print(json.dumps(measures(X)))`, { dir });
    expect(d.shape).toEqual([4, 6000]);
    for (const name of COMPARED_MEASURES) {
      const g = d.measures[name]?.estimate ?? null;
      const w = want[name];
      if (w === null) expect(g, name).toBeNull();
      else expect(Math.abs((g as number) - w) / Math.max(1, Math.abs(w)), `${name}: lacuna ${g}, numpy ${w}`).toBeLessThan(1e-12);
    }
  });

  it('never runs params.py: harmful lines elsewhere are skipped, and a sample_rate that is code is refused naming the line', async () => {
    const marker = join(tmpdir(), `lacuna-params-ran-${process.pid}`);
    rmSync(marker, { force: true });
    const harmful = `import os\nos.system('touch ${marker}')\nsample_rate = 30000.0\n`;
    const a = workspace('{ id: h, path: ../data/sort }');
    writeFolder(a.dir, { spikes: [[10, 1], [400, 1]], labels: [[1, 'good']], params: harmful });
    expect((await open(a.ws)).units).toBe(1);
    const b = workspace('{ id: h, path: ../data/sort }');
    writeFolder(b.dir, { spikes: [[10, 1], [400, 1]], labels: [[1, 'good']], params: `dtype = 'int16'\nsample_rate = __import__('os').system('touch ${marker}') or 30000\n` });
    const err = (await open(b.ws).catch((e: unknown) => e)) as Error & { file?: string; where?: string };
    expect(err.message).toContain('sample_rate is set by');
    expect(err.message).toContain('never run');
    expect(err.file).toBe('data/sort/params.py');
    expect(err.where).toBe('line 2');
    expect(existsSync(marker)).toBe(false);
  });

  it('refuses spike and cluster arrays of different lengths, naming both files; check says the same from headers', async () => {
    const { ws, dir } = workspace('{ id: bad, path: ../data/sort }');
    writeFolder(dir, { spikes: [[1, 1], [2, 1]], labels: [[1, 'good']], params: PARAMS });
    runPython(`
import os
np.save(os.path.join(inp['dir'], 'spike_clusters.npy'), np.array([1, 1, 1], dtype=np.int32))
print(json.dumps(0))`, { dir });
    const err = (await open(ws).catch((e: unknown) => e)) as Error & { file?: string };
    expect(err.message).toContain('data/sort/spike_clusters.npy has 3 entries but data/sort/spike_times.npy has 2; there must be one cluster per spike');
    expect(err.file).toBe('data/sort/spike_clusters.npy');
    const m = await loadManifest((await findManifests(ws))[0], ws);
    expect(m.datasets[0].format).toBe('sorter-folder');
    const { problems } = await inspectDataset(m.datasets[0], { kind: 'activity', binMs: 10 });
    expect(problems.map((p) => p.message)).toEqual([err.message]);
  });

  it('refuses a tiny folder whose last spike claims more bins than memory allows, before allocating them', async () => {
    const { ws, dir } = workspace('{ id: far, path: ../data/sort }');
    // One spike at sample 3·10¹⁰ (about 11.6 days at 30 kHz): 10⁸ bins of 10 ms, 25.6 GB of
    // per-bin state at 256 B a bin (src/readers/memory-budget.ts), over a quarter of any laptop.
    writeFolder(dir, { spikes: [[5, 1], [30_000_000_000, 1]], labels: [[1, 'good']], params: PARAMS });
    const err = (await open(ws).catch((e: unknown) => e)) as Error & { file?: string; where?: string };
    expect(err.name).toBe('InputError');
    expect(err.file).toBe('data/sort/spike_times.npy');
    expect(err.where).toBe('last spike');
    expect(err.message).toContain('1 units × 100000001 bins of 10 ms would need about 26 GB');
  });

  it('flags unsorted spike times and clusters with spikes but no label', async () => {
    const { ws, dir } = workspace('{ id: u, path: ../data/sort }');
    writeFolder(dir, { spikes: [[5, 1], [900, 1], [1200, 2], [3000, 1]], labels: [[1, 'good']], params: PARAMS, shuffle: true });
    const src = await open(ws);
    const by = Object.fromEntries(src.findings.map((f) => [f.code, f]));
    expect(by['spike-times-unsorted']).toMatchObject({ level: 'caution', count: 3 });
    expect(by['sorter-unlabelled-clusters']).toMatchObject({ level: 'caution', count: 1, where: ['cluster 2'] });
  });
});
