/**
 * The default block size follows the layout (src/readers/join.ts): 8 MiB when every file reads
 * unit ranges contiguously, 64 MiB when some file is strided on disk; an explicit limit wins.
 * Expected block sizes worked by hand: a unit of 10,000 float32 bins is 40,000 bytes, so an
 * 8 MiB block holds ⌊8,388,608 / 40,000⌋ = 209 units and a 64 MiB block ⌊67,108,864 / 40,000⌋ =
 * 1,677 (more than the 300 units here: one block of 300).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset } from '../../src/readers/index.ts';
import type { ActivitySource } from '../../src/types.ts';
import type { Layout } from '../../src/manifest/types.ts';
import { dataset, tempDir, readAll, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 1, workspaceRoot: tmp.dir };
const UNITS = 300;
const BINS = 10_000;

/** Unit u, bin b holds u * BINS + b (exact in float32 below 2^24 = 16,777,216 > 3,000,000). */
const values = Float32Array.from({ length: UNITS * BINS }, (_, i) => i);
/** The same matrix stored as `layout` in C or Fortran order. */
function write(name: string, layout: Layout, fortranOrder: boolean): string {
  const path = join(tmp.dir, name);
  if (layout === 'units-by-bins') {
    // Fortran order of a units × bins array stores column b (all units) after column b − 1.
    const data = fortranOrder ? Float32Array.from({ length: UNITS * BINS }, (_, i) => values[(i % UNITS) * BINS + Math.floor(i / UNITS)]) : values;
    writeNpy(path, data, [UNITS, BINS], { fortranOrder });
  } else {
    // bins × units: C order stores bin b's units together; Fortran order stores unit u's bins together.
    const data = fortranOrder ? values : Float32Array.from({ length: UNITS * BINS }, (_, i) => values[(i % UNITS) * BINS + Math.floor(i / UNITS)]);
    writeNpy(path, data, [BINS, UNITS], { fortranOrder });
  }
  return path;
}

async function blockSizes(files: string[], format: 'npy' | 'spikes', extra: object = {}, max?: number, option?: number): Promise<number[]> {
  const src = await openDataset(dataset(tmp.dir, files, format, extra), { ...ctx, ...(max ? { maxBlockBytes: max } : {}) }) as ActivitySource;
  const sizes: number[] = [];
  for await (const b of src.blocks(option ? { maxBlockBytes: option } : undefined)) sizes.push(b.units);
  return sizes;
}

describe('default block size by layout', () => {
  const cases: [string, Layout, boolean, number[]][] = [
    ['c-ub.npy', 'units-by-bins', false, [209, 91]], // contiguous
    ['f-bu.npy', 'bins-by-units', true, [209, 91]], // contiguous
    ['f-ub.npy', 'units-by-bins', true, [300]], // strided
    ['c-bu.npy', 'bins-by-units', false, [300]], // strided
  ];
  for (const [name, layout, fortranOrder, want] of cases) {
    it(`${layout}, ${fortranOrder ? 'Fortran' : 'C'} order: blocks of ${want.join(', ')} units, values unchanged`, async () => {
      const f = write(name, layout, fortranOrder);
      expect(await blockSizes([f], 'npy', { layout })).toEqual(want);
      const src = await openDataset(dataset(tmp.dir, [f], 'npy', { layout }), ctx);
      expect(firstDifference(await readAll(src), values)).toBe(-1);
    });
  }

  it('uses the large block when any joined file is strided', async () => {
    // Both files hold units × bins; one C (contiguous), one Fortran (strided) → 64 MiB, one block.
    const a = write('c-ub.npy', 'units-by-bins', false);
    const b = write('f-ub.npy', 'units-by-bins', true);
    expect(await blockSizes([a, b], 'npy')).toEqual([300]);
    // Two contiguous files: each unit is 20,000 bins = 80,000 bytes → ⌊8,388,608 / 80,000⌋ = 104 per block.
    expect(await blockSizes([a, a], 'npy')).toEqual([104, 104, 92]);
  });

  it('an explicit limit wins, from the dataset or from blocks()', async () => {
    const f = write('f-ub.npy', 'units-by-bins', true);
    // 4,000,000 bytes / 40,000 per unit = 100 units per block.
    expect(await blockSizes([f], 'npy', {}, 4_000_000)).toEqual([100, 100, 100]);
    expect(await blockSizes([f], 'npy', {}, undefined, 4_000_000)).toEqual([100, 100, 100]);
    const c = write('c-ub.npy', 'units-by-bins', false);
    expect(await blockSizes([c], 'npy', {}, 64 << 20)).toEqual([300]);
  });

  it('treats spike tables (held in memory) as contiguous', async () => {
    // 300 units with one spike each over 10 s at 1 ms bins: 10,000 float32 bins per unit.
    const rows = Array.from({ length: UNITS }, (_, u) => `${(u / 100).toFixed(3)},u${u}`);
    const path = join(tmp.dir, 'sp.csv');
    writeFileSync(path, `# duration_s: 10\ntime,unit\n${rows.join('\n')}\n`);
    expect(await blockSizes([path], 'spikes')).toEqual([209, 91]);
  });
});
