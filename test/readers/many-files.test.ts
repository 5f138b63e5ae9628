/**
 * A folder dataset of more files than the process may open: 600 `.npy` sessions (written by
 * numpy at test time) built by the command in a child process whose open-file limit is lowered
 * to 512 with util-linux `prlimit --nofile`. Before files were opened a bounded number at a time
 * this failed with EMFILE (exit 70). (Not lower than 512: Node's module loader itself holds up to
 * about 180 descriptors for a moment while it loads the chart and page modules in parallel.) The joined dataset must have every session's bins, and its
 * density must equal numpy's fraction of nonzero entries over all files.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { hasScipy, runPythonScript } from '../helpers/python.ts';

const hasPrlimit = spawnSync('prlimit', ['--version']).status === 0;
if (!hasPrlimit) console.warn('[lacuna tests] skipping the open-file limit test: prlimit (util-linux) is not installed');

describe.skipIf(!hasScipy || !hasPrlimit)('a folder of more files than the open-file limit', () => {
  const root = mkdtempSync(join(tmpdir(), 'lacuna-files-'));
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  it('builds with `prlimit --nofile=512` and 600 files, every bin read', () => {
    const ws = join(root, 'lab');
    mkdirSync(join(ws, 'audits'), { recursive: true });
    mkdirSync(join(ws, 'data', 'sessions'), { recursive: true });
    const density = runPythonScript(
      'import sys, numpy as np\n' +
        'r = np.random.default_rng(4)\n' +
        'nz = 0\n' +
        'for i in range(600):\n' +
        '    a = r.poisson(0.5, size=(8, 5)).astype(np.float32)\n' +
        "    np.save(f'{sys.argv[1]}/s{i:04d}.npy', a)\n" +
        '    nz += int(np.count_nonzero(a))\n' +
        'print(nz / (600 * 8 * 5))\n',
      [join(ws, 'data', 'sessions')],
    );
    writeFileSync(
      join(ws, 'audits', 'folder.md'),
      '---\naudit: folder\ntitle: many files\nkind: activity\naxis: time\nbin_ms: 10\n' +
        'bootstrap: { resamples: 100, level: 0.95, method: percentile, seed: 1 }\n' +
        'datasets:\n  - { id: sessions, path: ../data/sessions }\n---\n',
    );
    const r = spawnSync(
      'prlimit',
      ['--nofile=512', process.execPath, '--max-old-space-size=1024', resolve('bin/lacuna.mjs'), 'build', '--workspace', ws, '--out', join(root, 'site'), '--quiet'],
      { encoding: 'utf8', timeout: 300_000, env: { ...process.env, NO_COLOR: '1' } },
    );
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const rec = JSON.parse(readFileSync(join(ws, 'records', 'folder', 'v001.json'), 'utf8'));
    const ds = rec.result.datasets[0];
    expect(ds.files).toHaveLength(600);
    expect(ds.shape).toEqual([8, 3000]);
    // Density (fraction of nonzero entries) over all 600 files, as numpy counts them.
    expect(ds.measures.density.estimate).toBeCloseTo(Number(density.trim()), 12);
  }, 300_000);
});
