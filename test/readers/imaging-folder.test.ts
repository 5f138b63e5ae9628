/**
 * The imaging-pipeline output folder reader on a real folder written by that pipeline
 * (../shared/data/real/imaging-folder, from the pynapple library's test data, MIT; see its README:
 * 219 ROIs × 2,000 frames, 47 ROIs all zero in F and flagged not-cells), and on small planes
 * written by numpy at test time. Every measure is compared with an independent numpy computation
 * (test/helpers/numpy-measures.ts) that loads the same .npy files itself and applies the README's
 * cell choice and trace definitions.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { hasScipy, runPython } from '../helpers/python.ts';
import { MEASURES_PY, COMPARED_MEASURES } from '../helpers/numpy-measures.ts';
import { measureWorkspace } from '../helpers/measure-workspace.ts';
import { findManifests, loadManifest } from '../../src/manifest/load.ts';
import { inspectDataset } from '../../src/readers/index.ts';
import { InputErrors } from '../../src/errors.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';

const REAL = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/data/real/imaging-folder');
const realPresent = existsSync(join(REAL, 'F.npy'));
if (!realPresent) console.warn(`[lacuna tests] skipping the real imaging-folder tests: ${REAL} is absent`);
if (!hasScipy) console.warn('[lacuna tests] skipping imaging-folder numpy comparisons: python3 with numpy/scipy is absent');

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

function workspace(datasets: string, top = 'bin_ms: 100\nmin_bins: 50\nbootstrap: { resamples: 200, seed: 2 }'): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-imaging-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  writeFileSync(join(ws, 'audits', 'img.md'), `---\naudit: img\ntitle: Imaging folder\n${top}\ndatasets:\n${datasets}\n---\n`);
  return ws;
}

function copyReal(ws: string): string {
  const dir = join(ws, 'data', 'suite');
  mkdirSync(dir, { recursive: true });
  for (const f of ['F.npy', 'Fneu.npy', 'spks.npy', 'iscell.npy']) copyFileSync(join(REAL, f), join(dir, f));
  return dir;
}

/** numpy: the chosen trace of the chosen ROIs, then the measures. */
function numpyOnFolder(dir: string, trace: string, cells: string, k = 0.7, minProb = 0.5) {
  return runPython<Record<string, number | null>>(`${MEASURES_PY}
d = inp['dir'] + '/'
F = np.load(d + 'F.npy').astype(np.float64)
ic = np.load(d + 'iscell.npy')
t = inp['trace']
X = F if t == 'F' else (F - inp['k'] * np.load(d + 'Fneu.npy').astype(np.float64) if t == 'F-neuropil' else np.load(d + 'spks.npy').astype(np.float64))
c = inp['cells']
keep = ic[:, 0] == 1 if c == 'flag' else (ic[:, 1] >= inp['p'] if c == 'probability' else np.ones(len(ic), bool))
print(json.dumps(measures(X[keep])))
`, { dir, trace, cells, k, p: minProb });
}

function expectSame(got: Record<string, { estimate: number | null } | undefined>, want: Record<string, number | null>) {
  for (const name of COMPARED_MEASURES) {
    const g = got[name]?.estimate ?? null;
    const w = want[name];
    if (w === null) expect(g, name).toBeNull();
    else expect(Math.abs((g as number) - w) / Math.max(1, Math.abs(w)), `${name}: lacuna ${g}, numpy ${w}`).toBeLessThan(1e-12);
  }
}

describe.skipIf(!realPresent || !hasScipy)('imaging-pipeline folder: a real folder written by the pipeline', () => {
  for (const [trace, cells] of [['F', 'flag'], ['F-neuropil', 'flag'], ['spks', 'flag'], ['F', 'probability'], ['spks', 'all']] as const) {
    it(`trace ${trace}, cells ${cells}: every measure equals numpy on the same arrays`, async () => {
      const ws = workspace(`  - { id: plane, path: ../data/suite, month: 2026-01, imaging: { frame_rate_hz: 10, trace: ${trace}, cells: ${cells} } }`);
      const dir = copyReal(ws);
      const [d] = await measureWorkspace(ws);
      const want = numpyOnFolder(dir, trace, cells);
      expect(d.shape).toEqual([want.units, 2000]);
      expectSame(d.measures as never, want);
    });
  }

  it('is recognised without format:, and says which ROIs it took and how many left-out ROIs are all zero', async () => {
    const ws = workspace('  - { id: plane, path: ../data/suite, imaging: { frame_rate_hz: 10 } }');
    copyReal(ws);
    const m = await loadManifest((await findManifests(ws))[0], ws);
    expect(m.datasets[0].format).toBe('imaging-folder');
    expect(m.datasets[0].relFiles.map((f) => f.split('/').pop())).toEqual(['F.npy', 'Fneu.npy', 'spks.npy', 'iscell.npy']);
    const [d] = await measureWorkspace(ws);
    const sel = d.findings.find((f) => f.code === 'imaging-selection')!;
    // README of the real folder: 47 ROIs are all zero in F and all are flagged not-cells;
    // numpy (above) finds 20 flagged cells of 219, so 199 are left out, 47 of them all zero.
    expect(sel.message).toContain('20 ROIs of 219 with is-cell flag 1');
    expect(sel.message).toContain('199 ROIs left out by that choice, 47 of them all zero in F.npy');
    expect(sel.count).toBe(199);
  });

  it('refuses a folder without a frame rate, saying the settings pickle is never loaded', async () => {
    const ws = workspace('  - { id: plane, path: ../data/suite }');
    copyReal(ws);
    const err = await loadManifest((await findManifests(ws))[0], ws).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputErrors);
    const text = String((err as InputErrors).problems.map((e) => `${e.message} ${e.where} ${e.hint}`));
    expect(text).toContain('frame_rate_hz');
    expect(text).toContain('datasets[0].imaging');
    expect(text).toContain('never loads');
  });

  it('check refuses bin_ms finer than the frame interval with the number to use, as the build would', async () => {
    const ws = workspace('  - { id: plane, path: ../data/suite, imaging: { frame_rate_hz: 30 } }', 'bin_ms: 10');
    copyReal(ws);
    const m = await loadManifest((await findManifests(ws))[0], ws);
    const { problems } = await inspectDataset(m.datasets[0], { kind: 'activity', binMs: 10 });
    expect(problems).toHaveLength(1);
    expect(problems[0].message).toContain('finer than the frame interval 33.3333 ms');
    expect(problems[0].hint).toContain('set bin_ms to 33.3333333333');
    const build = await measureWorkspace(ws).catch((e: unknown) => e as Error);
    expect(String((build as Error & { cause?: Error }).cause?.message ?? build)).toContain('finer than the frame interval');
  });
});

describe.skipIf(!hasScipy)('imaging-pipeline folder: planes written by numpy', () => {
  it('joins plane0/ and plane1/ along units over the frames they share, and bins 30 Hz frames into 100 ms means', async () => {
    const ws = workspace('  - { id: two, path: ../data/two, imaging: { frame_rate_hz: 30, trace: F, cells: all } }');
    const root = join(ws, 'data', 'two');
    runPython(`
import os
rng = np.random.default_rng(4)
for p, (rois, frames) in enumerate([(3, 90), (2, 96)]):
    d = os.path.join(inp['root'], 'plane%d' % p)
    os.makedirs(d)
    np.save(os.path.join(d, 'F.npy'), rng.gamma(2.0, 1.0, (rois, frames)).astype(np.float32))
    np.save(os.path.join(d, 'iscell.npy'), np.ones((rois, 2)))
print(json.dumps(0))`, { root });
    const [d] = await measureWorkspace(ws);
    // numpy: 90 shared frames at 30 Hz into 100 ms bins = 3 frames a bin (exactly: frame i at
    // i/30 s is in bin ⌊i·1000/(30·100)⌋ = ⌊i/3⌋), 30 bins; each bin the mean of its frames.
    const want = runPython<Record<string, number | null>>(`${MEASURES_PY}
import os
X = np.vstack([np.load(os.path.join(inp['root'], 'plane%d' % p, 'F.npy')).astype(np.float64)[:, :90] for p in (0, 1)])
X = X.reshape(5, 30, 3).mean(axis=2)
print(json.dumps(measures(X)))`, { root });
    expect(d.shape).toEqual([5, 30]);
    expectSame(d.measures as never, want);
    const f = d.findings.find((x) => x.code === 'imaging-plane-frames-differ')!;
    expect(f.level).toBe('caution');
    expect(f.count).toBe(6);
    expect(f.message).toContain('first 90 frames');
  });

  it('names the plane and the shape when iscell.npy does not match F.npy', async () => {
    const ws = workspace('  - { id: bad, path: ../data/bad, imaging: { frame_rate_hz: 10 } }');
    const dir = join(ws, 'data', 'bad');
    mkdirSync(dir, { recursive: true });
    writeNpy(join(dir, 'F.npy'), new Float32Array(4 * 200).fill(1), [4, 200]);
    writeNpy(join(dir, 'Fneu.npy'), new Float32Array(4 * 200), [4, 200]);
    writeNpy(join(dir, 'iscell.npy'), new Float64Array(3 * 2).fill(1), [3, 2]);
    const err = (await measureWorkspace(ws).catch((e: unknown) => e)) as Error & { cause?: Error & { file?: string } };
    expect(err.cause?.message).toContain('iscell.npy has shape (3, 2); allowed: (4, 2)');
    expect(err.cause?.file).toBe('data/bad/iscell.npy');
  });
});
