/**
 * Sessions joined along the bin axis (src/readers/join.ts). Source: the values written into each
 * file; the joined matrix is file 1's bins followed by file 2's, unit by unit (worked by hand).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset, inspectDataset, hashFile } from '../../src/readers/index.ts';
import { dataset, readAll, tempDir, errorOf } from './helpers.ts';
import { joinActivity } from '../../src/readers/join.ts';
import type { ActivityFile } from '../../src/readers/types.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };

describe('joining sessions', () => {
  it('puts file 2 bins after file 1 bins for every unit, with segments and provenance', async () => {
    // s1: 2 units × 3 bins (float32), s2: 2 units × 2 bins (float64 → joined blocks are float64).
    writeNpy(join(tmp.dir, 's1.npy'), new Float32Array([1, 2, 3, 4, 5, 6]), [2, 3]);
    writeNpy(join(tmp.dir, 's2.npy'), new Float64Array([0.5, 0.25, -1, -2]), [2, 2]);
    const ds = dataset(tmp.dir, ['s1.npy', 's2.npy'].map((n) => join(tmp.dir, n)), 'npy');
    const src = await openDataset(ds, ctx);
    if (src.kind !== 'activity') throw new Error('kind');
    expect([src.units, src.bins]).toEqual([2, 5]);
    expect(src.segments).toEqual([{ path: 's1.npy', binStart: 0, bins: 3 }, { path: 's2.npy', binStart: 3, bins: 2 }]);
    // unit 0 = [1, 2, 3 | 0.5, 0.25], unit 1 = [4, 5, 6 | −1, −2]
    expect(Array.from(await readAll(src, 40))).toEqual([1, 2, 3, 0.5, 0.25, 4, 5, 6, -1, -2]);
    for await (const b of src.blocks()) expect(b.data).toBeInstanceOf(Float64Array);
    // SHA-256 checked against node:crypto over the whole file at once (FIPS 180-4 via OpenSSL).
    const whole = readFileSync(join(tmp.dir, 's1.npy'));
    expect(src.files[0]).toEqual({ path: 's1.npy', sha256: createHash('sha256').update(whole).digest('hex'), bytes: whole.length });
  });

  it('refuses sessions with different units, naming both files and counts', async () => {
    writeNpy(join(tmp.dir, 'u3.npy'), new Float32Array(6), [3, 2]);
    const ds = dataset(tmp.dir, ['s1.npy', 'u3.npy'].map((n) => join(tmp.dir, n)), 'npy');
    const e = await errorOf(() => openDataset(ds, ctx));
    expect(e.name).toBe('InputError');
    expect(e.message).toMatch(/u3\.npy has 3 units but s1\.npy has 2/);
    const r = await inspectDataset(ds, ctx);
    expect(r.problems.map((p) => p.message)).toEqual([expect.stringMatching(/u3\.npy has 3 units but s1\.npy has 2/)]);
  });

  it('keeps the first labels and cautions when a later session names units differently', async () => {
    writeFileSync(join(tmp.dir, 'a.csv'), 'x,y\n1,2\n');
    writeFileSync(join(tmp.dir, 'b.csv'), 'x,z\n3,4\n');
    const ds = dataset(tmp.dir, ['a.csv', 'b.csv'].map((n) => join(tmp.dir, n)), 'csv', { layout: 'bins-by-units' });
    const src = await openDataset(ds, ctx);
    if (src.kind !== 'activity') throw new Error('kind');
    expect(src.unitLabels).toEqual(['x', 'y']);
    expect(src.findings.map((f) => [f.level, f.code, f.count])).toEqual([['caution', 'unit-labels-differ', 1]]);
    expect(Array.from(await readAll(src))).toEqual([1, 3, 2, 4]);
  });

  it('hashes in chunks to the same digest as a one-shot hash', async () => {
    const big = Buffer.alloc(3 * (1 << 20) + 17, 7); // spans several 1 MiB reads
    writeFileSync(join(tmp.dir, 'big.bin'), big);
    expect(await hashFile(join(tmp.dir, 'big.bin'))).toEqual({ sha256: createHash('sha256').update(big).digest('hex'), bytes: big.length });
  });

  it('reopens, for each pass, a file whose close() is final (the NWB reader contract)', async () => {
    // A one-unit file of 3 bins valued [7, 8, 9] whose reads fail after close, like nwb.ts.
    let opened = 0;
    let closed = 0;
    const make = (): ActivityFile => {
      opened++;
      let open = true;
      return {
        path: '/x.nwb', units: 1, bins: 3, binMs: 10, findings: [], hasMissing: false,
        async readUnits(_u, _c, out, _cols, off) { if (!open) throw new Error('read after close'); out.set([7, 8, 9], off); },
        async close() { open = false; closed++; },
      };
    };
    const first = make();
    await first.close();
    const src = joinActivity([first], ['x.nwb'], [], undefined, async () => make());
    expect(Array.from(await readAll(src))).toEqual([7, 8, 9]);
    expect(Array.from(await readAll(src))).toEqual([7, 8, 9]);
    expect([opened, closed]).toEqual([3, 3]); // opened once to learn the shape, then once per pass; all closed
  });
});
