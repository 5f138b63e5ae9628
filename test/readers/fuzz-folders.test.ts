/**
 * Property tests (fast-check) for the folder layouts: a valid sorter folder and a valid imaging
 * folder, one member file mutated per run (test/readers/mutation.ts). Each run must end in an
 * InputError or a well-formed result — never another error type and never a hang. Source: the
 * reader contract in src/readers/types.ts (common practice for parser fuzzing, no single source).
 */
import { afterAll, describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset } from '../../src/readers/index.ts';
import type { ResolvedDataset } from '../../src/manifest/types.ts';
import { dataset, tempDir } from './helpers.ts';
import { mutation, mutate } from './mutation.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);

function folder(name: string, members: Record<string, Buffer>): { dir: string; seeds: Record<string, Buffer> } {
  const dir = join(tmp.dir, name);
  mkdirSync(dir, { recursive: true });
  for (const [n, b] of Object.entries(members)) writeFileSync(join(dir, n), b);
  return { dir, seeds: members };
}

function npyBytes(data: Float32Array | Float64Array | Int32Array | BigUint64Array, shape: number[]): Buffer {
  const p = join(tmp.dir, 'seed.npy');
  writeNpy(p, data, shape);
  return readFileSync(p);
}

const sorter = folder('sort', {
  'spike_times.npy': npyBytes(BigUint64Array.from([10n, 400n, 650n, 3000n, 3100n]), [5]),
  'spike_clusters.npy': npyBytes(Int32Array.from([1, 2, 1, 1, 7]), [5]),
  'params.py': Buffer.from("dat_path = 'x.bin'\nsample_rate = 30000.0\n"),
  'cluster_group.tsv': Buffer.from('cluster_id\tgroup\n1\tgood\n2\tgood\n7\tnoise\n'),
});
const imaging = folder('img', {
  'F.npy': npyBytes(Float32Array.from({ length: 3 * 8 }, (_, i) => (i * 7) % 5), [3, 8]),
  'Fneu.npy': npyBytes(Float32Array.from({ length: 3 * 8 }, (_, i) => i % 3), [3, 8]),
  'iscell.npy': npyBytes(Float64Array.from([1, 0.9, 0, 0.2, 1, 0.8]), [3, 2]),
});

function ds(f: { dir: string; seeds: Record<string, Buffer> }, format: 'sorter-folder' | 'imaging-folder'): ResolvedDataset {
  const files = Object.keys(f.seeds).map((n) => join(f.dir, n));
  return dataset(tmp.dir, files, format, format === 'sorter-folder'
    ? { sorter: { labels: ['good'], sample_rate_hz: null, duration_s: null } }
    : { imaging: { frame_rate_hz: 10, trace: 'F-neuropil', neuropil_k: 0.7, cells: 'flag', min_probability: 0.5 } });
}

async function consume(d: ResolvedDataset): Promise<'ok' | 'input-error'> {
  try {
    const src = await openDataset(d, { kind: 'activity', binMs: 100, workspaceRoot: tmp.dir, maxBlockBytes: 64 });
    if (src.kind !== 'activity') throw new Error('not activity');
    let next = 0;
    for await (const blk of src.blocks()) {
      if (blk.unitStart !== next || blk.bins !== src.bins || blk.data.length !== blk.units * blk.bins) throw new Error('malformed block');
      next += blk.units;
    }
    if (next !== src.units) throw new Error('blocks did not cover every unit');
    return 'ok';
  } catch (err) {
    if (err instanceof Error && err.name === 'InputError') return 'input-error';
    throw err;
  }
}

describe('folder readers under mutated members', () => {
  for (const [name, f, format] of [['sorter folder', sorter, 'sorter-folder'], ['imaging folder', imaging, 'imaging-folder']] as const) {
    it(`${name}: the valid folder reads, and every mutation of one member ends in a result or an InputError`, async () => {
      const d = ds(f, format);
      expect(await consume(d)).toBe('ok');
      let errors = 0;
      const names = Object.keys(f.seeds);
      await fc.assert(
        fc.asyncProperty(fc.constantFrom(...names), mutation, async (member, m) => {
          for (const n of names) writeFileSync(join(f.dir, n), n === member ? mutate(f.seeds[n], m) : f.seeds[n]);
          if ((await consume(d)) === 'input-error') errors++;
        }),
        { numRuns: 300, seed: 20261202 },
      );
      expect(errors).toBeGreaterThan(0);
    });
  }
});
