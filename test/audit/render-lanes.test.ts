/**
 * Charts drawn on the pool's lanes (versions of six or more datasets, more than one lane) are the
 * same as charts drawn in one thread: every figure file byte for byte, and the live Vega specs
 * embedded in the report page. Both builds use the same data and seed (common practice, no
 * source: parallel work must not change output).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { buildWorkspace } from '../../src/audit/build.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

function workspace(): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-lanes-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  const rows: string[] = [];
  for (let i = 1; i <= 6; i++) {
    const rng = createRandom(70 + i);
    const a = new Float32Array(10 * 400).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0));
    writeNpy(join(ws, 'data', `m${i}.npy`), a, [10, 400]);
    rows.push(`  - { id: d${i}, path: ../data/m${i}.npy, month: 2026-0${i}, group: ${i % 2 ? 'left' : 'right'} }`);
  }
  writeFileSync(
    join(ws, 'audits', 'six.md'),
    `---\naudit: six\ntitle: Six datasets\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 5 }\ndatasets:\n${rows.join('\n')}\n---\n`,
  );
  return ws;
}

describe('charts drawn on several lanes', () => {
  it('give the same figures and live specs as one thread', async () => {
    const progress = createProgress({ quiet: true });
    const one = workspace();
    const two = workspace();
    await buildWorkspace({ workspace: one, out: join(one, '_site'), progress, workers: '1' });
    await buildWorkspace({ workspace: two, out: join(two, '_site'), progress, workers: '2' });
    const figs = (ws: string) => join(ws, '_site', 'six', 'v001', 'figures');
    const names = readdirSync(figs(one)).sort();
    expect(names.length).toBeGreaterThanOrEqual(6 * 3);
    expect(readdirSync(figs(two)).sort()).toEqual(names);
    for (const n of names) expect(readFileSync(join(figs(two), n), 'utf8'), n).toBe(readFileSync(join(figs(one), n), 'utf8'));
    const specs = (ws: string) => readFileSync(join(ws, '_site', 'six', 'v001', 'index.html'), 'utf8').match(/<script type="application\/json"[^>]*>[\s\S]*?<\/script>/g) ?? [];
    expect(specs(one).length).toBeGreaterThanOrEqual(6 * 3);
    expect(specs(two)).toEqual(specs(one));
  });
});
