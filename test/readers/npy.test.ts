/**
 * `.npy` files written by the project's own writer (src/readers/npy-write.ts, NEP 1 v1.0) read
 * back exactly, and hand-made broken files refused with InputErrors that name the place.
 * Sources: the values written (round trip); the NEP 1 layout for the hand-made headers.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy, npyHeader } from '../../src/readers/npy-write.ts';
import { openDataset, inspectDataset } from '../../src/readers/index.ts';
import { parseHeaderDict } from '../../src/readers/npy-header.ts';
import { halfToNumber } from '../../src/readers/dtype.ts';
import { dataset, readAll, tempDir, errorOf, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };
const open = (name: string, extra = {}) => openDataset(dataset(tmp.dir, [join(tmp.dir, name)], 'npy', extra), ctx);

describe('npy written by writeNpy', () => {
  it('reads every writable type back exactly, C and Fortran order', async () => {
    const values = [0, 1, -2, 3.5, 100, -7.25, 0.1, 42, 9, -1, 2, 8];
    const arrays = [
      new Float64Array(values), new Float32Array(values),
      Int32Array.from(values.map(Math.trunc)), Int16Array.from(values.map(Math.trunc)), Int8Array.from(values.map(Math.trunc)),
      Uint8Array.from(values.map((v) => Math.abs(Math.trunc(v)))), Uint16Array.from(values.map((v) => Math.abs(Math.trunc(v)))),
      Uint32Array.from(values.map((v) => Math.abs(Math.trunc(v)))),
    ];
    for (const a of arrays) {
      for (const fortranOrder of [false, true]) {
        writeNpy(join(tmp.dir, 'w.npy'), a, [3, 4], { fortranOrder });
        const got = await readAll(await open('w.npy'));
        // Expected: element (r, c) is a[r*4 + c] in C order, a[c*3 + r] in Fortran order.
        const want = Array.from({ length: 12 }, (_, i) => (fortranOrder ? a[(i % 4) * 3 + Math.floor(i / 4)] : a[i]));
        expect(firstDifference(got, want), `${a.constructor.name} F=${fortranOrder}`).toBe(-1);
      }
    }
  });

  it('streams in blocks of whole units that cover every unit once', async () => {
    const a = Float32Array.from({ length: 7 * 11 }, (_, i) => i);
    writeNpy(join(tmp.dir, 'b.npy'), a, [7, 11]);
    const src = await open('b.npy');
    if (src.kind !== 'activity') throw new Error('kind');
    const sizes: number[] = [];
    for await (const b of src.blocks({ maxBlockBytes: 3 * 11 * 4 })) sizes.push(b.units);
    expect(sizes).toEqual([3, 3, 1]); // 3 units of 11 float32 bins fit in 132 bytes
    expect(firstDifference(await readAll(src, 1), a)).toBe(-1); // limit below one unit: one unit per block
    expect(src.files[0].bytes).toBe(128 + 7 * 11 * 4);
    expect(src.files[0].sha256).toMatch(/^[0-9a-f]{64}$/);
  });
});

describe('npy errors', () => {
  const write = (name: string, bytes: Uint8Array | Buffer) => writeFileSync(join(tmp.dir, name), bytes);

  it('names the byte offset and expected size of a truncated file', async () => {
    writeNpy(join(tmp.dir, 't.npy'), new Float64Array(20), [4, 5]);
    const full = Buffer.from(await import('node:fs').then((fs) => fs.readFileSync(join(tmp.dir, 't.npy'))));
    write('t.npy', full.subarray(0, full.length - 9));
    const e = await errorOf(() => open('t.npy'));
    expect(e.name).toBe('InputError');
    expect(e.file).toBe('t.npy');
    // 128-byte header + 160 data bytes, 9 cut: data end at byte 279; 160 bytes needed from byte 128.
    expect(e.message).toMatch(/truncated: data end at byte 279 .* needs 160 bytes from byte 128/);
  });

  it('refuses extra bytes, empty files, unknown dtypes, object arrays and 3-D activity', async () => {
    const head = (descr: string, shape: number[]) => npyHeader(descr, shape);
    write('extra.npy', Buffer.concat([head('<f4', [2]), Buffer.alloc(12)]));
    expect((await errorOf(() => open('extra.npy'))).message).toMatch(/needs 8 data bytes but the file holds 12/);
    write('empty.npy', new Uint8Array(0));
    expect((await errorOf(() => open('empty.npy'))).message).toMatch(/file is empty/);
    write('c16.npy', Buffer.concat([head('<c16', [1]), Buffer.alloc(16)]));
    expect((await errorOf(() => open('c16.npy'))).message).toMatch(/dtype '<c16' is not supported; allowed f2 f4 f8/);
    write('obj.npy', Buffer.concat([head('|O', [1]), Buffer.alloc(8)]));
    expect((await errorOf(() => open('obj.npy'))).message).toMatch(/object arrays/);
    write('cube.npy', Buffer.concat([head('<f4', [2, 2, 2]), Buffer.alloc(32)]));
    const cube = await errorOf(() => open('cube.npy'));
    expect(cube.message).toMatch(/3 dimensions/);
    expect(cube.where).toBe('shape');
    write('zero.npy', Buffer.concat([head('<f4', [3, 0])]));
    expect((await errorOf(() => open('zero.npy'))).message).toMatch(/no elements/);
  });

  it('inspectDataset collects every problem and reads no data', async () => {
    writeNpy(join(tmp.dir, 'ok.npy'), new Float32Array(6), [2, 3]);
    const ds = dataset(tmp.dir, ['ok.npy', 'cube.npy', 'empty.npy'].map((n) => join(tmp.dir, n)), 'npy');
    const r = await inspectDataset(ds, ctx);
    expect(r.files.map((f) => [f.path, f.shape, f.dtype, f.bytes])).toEqual([['ok.npy', [2, 3], '<f4', 128 + 24]]);
    expect(r.problems.map((p) => p.file)).toEqual(['cube.npy', 'empty.npy']);
    const none = await inspectDataset({ ...ds, files: [], relFiles: [] }, ctx);
    expect(none.problems[0].message).toMatch(/no npy files found/);
  });

  it('parses header dicts strictly (NEP 1 keys only, no code)', () => {
    const fail = (m: string) => new Error(m);
    expect(parseHeaderDict("{'descr': '>i2', 'fortran_order': True, 'shape': (3,), }", fail)).toEqual({ descr: '>i2', fortran: true, shape: [3] });
    expect(parseHeaderDict("{'shape': (), 'descr': '<f8', 'fortran_order': False}", fail).shape).toEqual([]);
    expect(() => parseHeaderDict("{'descr': '<f8', 'fortran_order': False, 'shape': (2,), 'x': 1}", fail)).toThrow(/allowed exactly/);
    expect(() => parseHeaderDict("{'descr': __import__('os'), 'fortran_order': False, 'shape': (2,)}", fail)).toThrow(/unexpected/);
    expect(() => parseHeaderDict("{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (2,)}", fail)).toThrow(/structured/);
    expect(() => parseHeaderDict("{'descr': '<f8', 'fortran_order': False, 'shape': (-2,)}", fail)).toThrow();
  });

  it('converts IEEE 754 half floats exactly', () => {
    // Values from the binary16 definition (IEEE 754-2008 §3.6): 0x3c00 = 1, 0xc000 = −2,
    // 0x7bff = 65504 (largest), 0x0001 = 2^−24 (smallest subnormal), 0x7c00 = +inf, 0x7e00 = NaN.
    expect([0x3c00, 0xc000, 0x7bff, 0x0001, 0x7c00].map(halfToNumber)).toEqual([1, -2, 65504, 2 ** -24, Infinity]);
    expect(halfToNumber(0x7e00)).toBeNaN();
  });
});
