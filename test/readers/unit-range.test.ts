/**
 * Unit ranges of `blocks()` (src/readers/join.ts): ranges that cover [0, units) in pieces give,
 * block for block, exactly the rows of one whole pass, in every layout and format. Sources: the
 * values written (unit u, bin b holds u × bins + b, worked by hand) and the whole pass.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { appendFileSync, readFileSync, writeFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { join } from 'node:path';
import { zipSync } from 'fflate';
import { writeNpy, npyHeader } from '../../src/readers/npy-write.ts';
import { openDataset, type RangedActivitySource } from '../../src/readers/index.ts';
import type { DataFormat, Layout } from '../../src/manifest/types.ts';
import { dataset, readAll, tempDir, errorOf, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };
const UNITS = 13;
const BINS = 7;
const values = Float32Array.from({ length: UNITS * BINS }, (_, i) => i);
const transposed = Float32Array.from({ length: UNITS * BINS }, (_, i) => values[(i % UNITS) * BINS + Math.floor(i / UNITS)]);

async function open(files: string[], format: DataFormat, layout: Layout = 'units-by-bins'): Promise<RangedActivitySource> {
  const src = await openDataset(dataset(tmp.dir, files, format, { layout }), ctx);
  if (src.kind !== 'activity') throw new Error('kind');
  return src;
}

/** Rows of units [start, end) from blocks of at most `maxUnits` units, checking each block's place. */
async function readRange(src: RangedActivitySource, start: number, end: number, maxUnits: number): Promise<number[]> {
  const out: number[] = [];
  let next = start;
  const maxBlockBytes = maxUnits * src.bins * 4;
  for await (const b of src.blocks({ unitStart: start, unitEnd: end, maxBlockBytes })) {
    expect(b.unitStart).toBe(next);
    expect(b.units).toBeLessThanOrEqual(maxUnits);
    out.push(...b.data.subarray(0, b.units * b.bins));
    next += b.units;
  }
  expect(next).toBe(end);
  return out;
}

describe('unit ranges', () => {
  const layouts: [string, () => string[], DataFormat, Layout][] = [
    ['npy C units × bins (zero-copy)', () => { writeNpy(join(tmp.dir, 'c.npy'), values, [UNITS, BINS]); return [join(tmp.dir, 'c.npy')]; }, 'npy', 'units-by-bins'],
    ['npy Fortran units × bins (strided)', () => { writeNpy(join(tmp.dir, 'f.npy'), transposed, [UNITS, BINS], { fortranOrder: true }); return [join(tmp.dir, 'f.npy')]; }, 'npy', 'units-by-bins'],
    ['npy C bins × units (strided)', () => { writeNpy(join(tmp.dir, 'b.npy'), transposed, [BINS, UNITS]); return [join(tmp.dir, 'b.npy')]; }, 'npy', 'bins-by-units'],
    ['npz deflated', () => {
      const body = new Uint8Array(values.buffer.slice(0));
      const hdr = npyHeader('<f4', [UNITS, BINS], false);
      writeFileSync(join(tmp.dir, 'd.npz'), zipSync({ 'x.npy': [new Uint8Array([...hdr, ...body]), { level: 6 }] }));
      return [join(tmp.dir, 'd.npz')];
    }, 'npz', 'units-by-bins'],
    ['csv', () => {
      const rows = Array.from({ length: UNITS }, (_, u) => Array.from(values.subarray(u * BINS, (u + 1) * BINS)).join(','));
      writeFileSync(join(tmp.dir, 'm.csv'), rows.join('\n') + '\n');
      return [join(tmp.dir, 'm.csv')];
    }, 'csv', 'units-by-bins'],
    ['two npy files joined along bins', () => {
      // first 3 bins of each unit in one file, last 4 in the other
      writeNpy(join(tmp.dir, 'j1.npy'), Float32Array.from({ length: UNITS * 3 }, (_, i) => values[Math.floor(i / 3) * BINS + (i % 3)]), [UNITS, 3]);
      writeNpy(join(tmp.dir, 'j2.npy'), Float32Array.from({ length: UNITS * 4 }, (_, i) => values[Math.floor(i / 4) * BINS + 3 + (i % 4)]), [UNITS, 4]);
      return [join(tmp.dir, 'j1.npy'), join(tmp.dir, 'j2.npy')];
    }, 'npy', 'units-by-bins'],
  ];
  for (const [name, make, format, layout] of layouts) {
    it(`${name}: pieces covering [0, ${UNITS}) equal the whole pass`, async () => {
      const src = await open(make(), format, layout);
      const whole = await readAll(src);
      expect(firstDifference(whole, values)).toBe(-1);
      for (const cuts of [[0, 6, 13], [0, 1, 2, 12, 13], [0, 13], [0, 5, 5, 13]]) {
        for (const maxUnits of [1, 2, 4, 13]) {
          const got: number[] = [];
          for (let k = 0; k + 1 < cuts.length; k++) got.push(...await readRange(src, cuts[k], cuts[k + 1], maxUnits));
          expect(firstDifference(got, whole), `cuts ${cuts}, ${maxUnits} units a block`).toBe(-1);
        }
      }
    });
  }

  it('an empty range yields nothing; a range outside [0, units) is a RangeError', async () => {
    const src = await open([join(tmp.dir, 'c.npy')], 'npy');
    expect(await readRange(src, 4, 4, 2)).toEqual([]);
    for (const [a, b] of [[-1, 3], [3, 2], [0, UNITS + 1], [0.5, 2]]) {
      const e = await errorOf(async () => { for await (const _ of src.blocks({ unitStart: a, unitEnd: b })) { /* drain */ } });
      expect(e).toBeInstanceOf(RangeError);
    }
  });

  it('checks the files after the last block of a range (provenance given)', async () => {
    const path = join(tmp.dir, 'g.npy');
    writeNpy(path, values, [UNITS, BINS]);
    const bytes = readFileSync(path);
    const prov = [{ path: 'g.npy', sha256: createHash('sha256').update(bytes).digest('hex'), bytes: bytes.length }];
    const src = await openDataset(dataset(tmp.dir, [path], 'npy'), { ...ctx, provenance: prov }) as RangedActivitySource;
    expect(await readRange(src, 3, 9, 2)).toEqual(Array.from(values.subarray(3 * BINS, 9 * BINS)));
    const e = await errorOf(async () => {
      for await (const b of src.blocks({ unitStart: 3, unitEnd: 9, maxBlockBytes: 2 * BINS * 4 })) {
        if (b.unitStart === 3) appendFileSync(path, Buffer.alloc(4));
      }
    });
    expect(e.message).toMatch(/g\.npy.*changed while it was being read/);
  });
});
