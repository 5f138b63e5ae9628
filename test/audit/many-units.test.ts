/**
 * A dataset of 150,000 units, built end to end by the command in a child process (memory capped
 * with --max-old-space-size), and what a render failure leaves behind.
 *
 * V8 throws "Maximum call stack size exceeded" when a spread or apply passes more than roughly
 * 10⁵ arguments (`Math.min(...values)`); with one value per unit a chart description did so after
 * the record was written. The data are written by numpy at test time (Poisson counts, 6 bins).
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { hasScipy, runPythonScript } from '../helpers/python.ts';

const BIN = resolve('bin/lacuna.mjs');
const build = (ws: string, out: string) =>
  spawnSync(process.execPath, ['--max-old-space-size=1536', BIN, 'build', '--workspace', ws, '--out', out, '--quiet'], {
    encoding: 'utf8',
    timeout: 300_000,
    env: { ...process.env, NO_COLOR: '1' },
  });

describe.skipIf(!hasScipy)('150,000 units built end to end', () => {
  let root: string;
  let ws: string;
  let out: string;
  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'lacuna-many-'));
    ws = join(root, 'lab');
    out = join(root, 'site');
    mkdirSync(join(ws, 'audits'), { recursive: true });
    mkdirSync(join(ws, 'data'));
    runPythonScript(
      'import sys, numpy as np\n' +
        'r = np.random.default_rng(2)\n' +
        'np.save(sys.argv[1], r.poisson(0.5, size=(150_000, 6)).astype(np.float32))\n',
      [join(ws, 'data', 'units.npy')],
    );
    writeFileSync(
      join(ws, 'audits', 'many.md'),
      '---\naudit: many\ntitle: many units\nkind: activity\naxis: time\nbin_ms: 10\n' +
        'bootstrap: { resamples: 200, level: 0.95, method: percentile, seed: 1 }\n' +
        'datasets:\n  - { id: units, path: ../data/units.npy }\n---\n',
    );
  });
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  it('builds, and the report states the range of the 150,000 per-unit values', () => {
    const r = build(ws, out);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    // The per-unit charts are on the dataset's own page.
    const page = readFileSync(join(out, 'many', 'v001', 'datasets', 'units', 'index.html'), 'utf8');
    expect(page).toContain('Lifetime sparseness of each of');
  }, 300_000);

  it('a render failure keeps the record, says which version and step failed, and the next build renders it', () => {
    // Make rendering of v001 fail: remove its pages and break the chart data of its record.
    const recFile = join(ws, 'records', 'many', 'v001.json');
    const good = readFileSync(recFile, 'utf8');
    const rec = JSON.parse(good);
    delete rec.result.datasets[0].chartData;
    rmSync(recFile);
    writeFileSync(recFile, JSON.stringify(rec));
    rmSync(join(out, 'many', 'v001'), { recursive: true, force: true });
    const r = build(ws, out);
    expect(r.status).not.toBe(0);
    expect(r.stderr).toMatch(/rendering failed for 1 version/);
    expect(r.stderr).toMatch(/many v001: making the charts failed .*record records\/many\/v001\.json is kept/);
    expect(r.stderr).toMatch(/next `lacuna build` renders the missing pages again/);
    expect(existsSync(join(out, 'many', 'v001', 'index.html'))).toBe(false);
    expect(existsSync(join(out, 'index.html'))).toBe(true);
    // The workspace still builds once the cause is gone: the missing pages are rendered again.
    rmSync(recFile);
    writeFileSync(recFile, good);
    const again = build(ws, out);
    expect(again.stderr).toBe('');
    expect(again.status).toBe(0);
    expect(existsSync(join(out, 'many', 'v001', 'index.html'))).toBe(true);
  }, 300_000);
});
