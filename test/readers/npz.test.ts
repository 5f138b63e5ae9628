/**
 * `.npz` archives built by hand (zip-builder.ts, PKWARE APPNOTE 6.3) around `.npy` members written
 * by the project's npy writer: stored and deflated members, ZIP64 fields, and zip bombs.
 * Sources: the values written; DEFLATE's 1032:1 maximum expansion (RFC 1951: a 258-byte match
 * coded in as little as 2 bits, common practice to quote as ~1032:1).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset, inspectDataset } from '../../src/readers/index.ts';
import { buildZip, patchDeclaredSize } from './zip-builder.ts';
import { dataset, readAll, tempDir, errorOf, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };

function npyBytes(data: Float32Array | Float64Array | Int16Array, shape: number[]): Uint8Array {
  const p = join(tmp.dir, 'member.npy');
  writeNpy(p, data, shape);
  return new Uint8Array(readFileSync(p));
}
function put(name: string, bytes: Uint8Array): string {
  writeFileSync(join(tmp.dir, name), bytes);
  return join(tmp.dir, name);
}
const open = (f: string, extra = {}) => openDataset(dataset(tmp.dir, [f], 'npz', extra), ctx);

describe('npz archives', () => {
  const a = Float32Array.from({ length: 6 * 9 }, (_, i) => (i * 7) % 13 - 4);
  const b = Int16Array.from({ length: 12 }, (_, i) => -i);

  for (const zip64 of [false, true]) {
    for (const deflate of [false, true]) {
      it(`reads ${deflate ? 'deflated' : 'stored'} members${zip64 ? ' through ZIP64 fields' : ''}`, async () => {
        const f = put('x.npz', buildZip([
          { name: 'a.npy', data: npyBytes(a, [6, 9]), deflate },
          { name: 'b.npy', data: npyBytes(b, [3, 4]), deflate },
        ], { zip64 }));
        expect(firstDifference(await readAll(await open(f, { member: 'a' }), 2 * 9 * 4), a)).toBe(-1);
        // bins-by-units is strided in C order: each 1-unit block re-reads (deflated: restarts) the member.
        const t = await readAll(await open(f, { member: 'a', layout: 'bins-by-units' }), 6 * 4);
        expect(t[2 * 6 + 5]).toBe(a[5 * 9 + 2]); // unit 2, bin 5 = numpy row 5, column 2
        expect(firstDifference(await readAll(await open(f, { member: 'b.npy' })), b)).toBe(-1);
      });
    }
  }

  it('refuses a member that inflates past its declared size (zip bomb)', async () => {
    const zeros = npyBytes(new Float64Array(100_000), [100, 1000]); // 800 kB of zeros, ~1 kB deflated
    const f = put('bomb.npz', patchDeclaredSize(buildZip([{ name: 'a.npy', data: zeros, deflate: true }]), 4000));
    const e = await errorOf(() => open(f));
    expect(e.name).toBe('InputError');
    expect(e.message).toMatch(/inflates to more than the 4000 bytes its zip header declares/);
  });

  it('refuses a declared size no DEFLATE stream can reach (ratio above 1032:1)', async () => {
    const f = put('lie.npz', patchDeclaredSize(buildZip([{ name: 'a.npy', data: npyBytes(new Float64Array(4), [4]), deflate: true }]), 2 ** 31));
    expect((await errorOf(() => open(f))).message).toMatch(/more than DEFLATE can produce/);
  });

  it('refuses a >1000:1 member with no valid .npy header', async () => {
    // 1,000,000 zero bytes deflate to under 1,000 bytes (ratio ≈ 1016 with fflate level 9).
    const f = put('ratio.npz', buildZip([{ name: 'a.npy', data: new Uint8Array(1_000_000), deflate: true }]));
    expect((await errorOf(() => open(f))).message).toMatch(/expands 10\d\d:1 and has no valid \.npy header/);
  });

  it('refuses truncated and damaged archives with InputErrors', async () => {
    const good = buildZip([{ name: 'a.npy', data: npyBytes(a, [6, 9]), deflate: true }]);
    const cut = put('cut.npz', good.subarray(0, good.length - 30));
    expect((await errorOf(() => open(cut))).message).toMatch(/end-of-central-directory/);
    const damaged = Buffer.from(good);
    for (let i = 40; i < 60; i++) damaged[i] ^= 0xff; // inside the deflate stream
    const e = await errorOf(async () => readAll(await open(put('dmg.npz', damaged))));
    expect(e.name).toBe('InputError');
    expect(e.file).toBe('dmg.npz');
    const notNpy = put('txt.npz', buildZip([{ name: 'notes.txt', data: new Uint8Array(3) }]));
    expect((await errorOf(() => open(notNpy))).message).toMatch(/not a \.npy array/);
  });

  it('inspects every member for weights', async () => {
    const f = put('w.npz', buildZip([{ name: 'a.npy', data: npyBytes(a, [6, 9]) }, { name: 'b.npy', data: npyBytes(b, [3, 4]), deflate: true }]));
    const r = await inspectDataset(dataset(tmp.dir, [f], 'npz'), { kind: 'weights', binMs: 10 });
    expect(r.problems).toEqual([]);
    expect(r.files[0].parts).toEqual([{ name: 'a', shape: [6, 9], dtype: '<f4' }, { name: 'b', shape: [3, 4], dtype: '<i2' }]);
  });
});
