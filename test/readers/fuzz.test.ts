/**
 * Property tests (fast-check): valid files of every format, mutated (truncated, bytes flipped,
 * 4-byte fields overwritten, header digits changed) or replaced by random bytes, fed to the
 * readers. Each run must end in an InputError or in a well-formed result (blocks covering every
 * unit once, data of units × bins numbers; tensors of product(shape) numbers) — never another
 * error type (a RangeError or TypeError escaping is a bug) and never a hang (vitest's timeout).
 * Inputs stay under a few kilobytes and runs at 200 per format. Source: the reader contract in
 * src/readers/types.ts and src/errors.ts (common practice for parser fuzzing, no single source).
 */
import { describe, it, expect, afterAll } from 'vitest';
import fc from 'fast-check';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset } from '../../src/readers/index.ts';
import type { DataFormat } from '../../src/manifest/types.ts';
import { buildZip } from './zip-builder.ts';
import { dataset, tempDir } from './helpers.ts';
import { mutation, mutate } from './mutation.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);

function npy(data: Float32Array | Int16Array | Float64Array, shape: number[], fortranOrder = false): Buffer {
  const p = join(tmp.dir, 'seed.npy');
  writeNpy(p, data, shape, { fortranOrder });
  return readFileSync(p);
}
function safetensors(): Buffer {
  const header = Buffer.from(JSON.stringify({ w: { dtype: 'F32', shape: [2, 3], data_offsets: [0, 24] }, b: { dtype: 'I16', shape: [3], data_offsets: [24, 30] } }));
  const n = Buffer.alloc(8);
  n.writeBigUInt64LE(BigInt(header.length));
  return Buffer.concat([n, header, Buffer.from(new Float32Array([1, -2, 3, 0.5, 0, 9]).buffer), Buffer.from(new Int16Array([-1, 2, 7]).buffer)]);
}

const a = Float32Array.from({ length: 24 }, (_, i) => i - 5);
const seeds: { name: string; format: DataFormat; kind: 'activity' | 'weights'; bytes: Buffer; layout?: 'bins-by-units' }[] = [
  { name: 'npy', format: 'npy', kind: 'activity', bytes: npy(a, [4, 6]) },
  { name: 'npy-strided', format: 'npy', kind: 'activity', bytes: npy(Int16Array.from(a), [4, 6]), layout: 'bins-by-units' },
  { name: 'npy-weights', format: 'npy', kind: 'weights', bytes: npy(Float64Array.from(a), [2, 3, 4], true) },
  { name: 'npz-stored', format: 'npz', kind: 'activity', bytes: buildZip([{ name: 'x.npy', data: npy(a, [4, 6]) }]) },
  { name: 'npz-deflated', format: 'npz', kind: 'weights', bytes: buildZip([{ name: 'x.npy', data: npy(a, [4, 6]), deflate: true }, { name: 'y.npy', data: npy(a, [24]), deflate: true }], { zip64: true }) },
  { name: 'csv', format: 'csv', kind: 'activity', bytes: Buffer.from('u1,u2,u3\n1,2,3\n4,NaN,6\n7,8,\n'), layout: 'bins-by-units' },
  { name: 'spikes', format: 'spikes', kind: 'activity', bytes: Buffer.from('# duration_s: 2\nunit,time\na,0.5\nb,1.25\na,0.01\n') },
  { name: 'safetensors', format: 'safetensors', kind: 'weights', bytes: safetensors() },
];

async function consume(file: string, s: (typeof seeds)[number]): Promise<'ok' | 'input-error'> {
  try {
    const src = await openDataset(dataset(tmp.dir, [file], s.format, s.layout ? { layout: s.layout } : {}), { kind: s.kind, binMs: 100, workspaceRoot: tmp.dir, maxBlockBytes: 64 });
    if (src.kind === 'activity') {
      let next = 0;
      for await (const blk of src.blocks()) {
        if (blk.unitStart !== next || blk.bins !== src.bins || blk.data.length !== blk.units * blk.bins) throw new Error('malformed block');
        next += blk.units;
      }
      if (next !== src.units) throw new Error('blocks did not cover every unit');
    } else {
      let i = 0;
      for await (const t of src.tensors()) {
        const n = t.shape.reduce((x, y) => x * y, 1);
        if (t.data.length !== n || t.name !== src.layers[i++].name) throw new Error('malformed tensor');
      }
    }
    return 'ok';
  } catch (err) {
    if (err instanceof Error && err.name === 'InputError') return 'input-error';
    throw err;
  }
}

describe('readers under mutated input', () => {
  for (const s of seeds) {
    it(`${s.name}: the unmutated seed reads, and every mutation ends in a result or an InputError`, async () => {
      const file = join(tmp.dir, `f.${s.format === 'spikes' ? 'csv' : s.format}`);
      writeFileSync(file, s.bytes);
      expect(await consume(file, s)).toBe('ok');
      let errors = 0;
      await fc.assert(
        fc.asyncProperty(mutation, async (m) => {
          writeFileSync(file, mutate(s.bytes, m));
          if ((await consume(file, s)) === 'input-error') errors++;
        }),
        { numRuns: 200, seed: 20240611 },
      );
      expect(errors).toBeGreaterThan(0); // the mutations do reach the error paths
    });
  }
});
