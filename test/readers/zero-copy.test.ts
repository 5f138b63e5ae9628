/**
 * Zero-copy reads (src/readers/npy.ts): little-endian f4/f8 data in a contiguous layout are read
 * straight into the block. Sources: the bytes numpy itself stores for the array (`tobytes`, live),
 * the bytes of the typed array handed to writeNpy, and the scratch-and-decode path of the same
 * reader (readNpyTensor), which must all be byte-identical to the blocks.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { hasScipy, runPythonScript } from '../helpers/python.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset } from '../../src/readers/index.ts';
import { openNpyFile, npyActivityFile, readNpyTensor, ROW_READ_MIN_BYTES } from '../../src/readers/npy.ts';
import type { ByteSource } from '../../src/readers/byte-source.ts';
import type { ActivitySource, Numeric } from '../../src/types.ts';
import type { DataFormat, Layout } from '../../src/manifest/types.ts';
import { dataset, tempDir } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };

/** The bytes of every block, in unit order (blocks reuse their buffer, so copy each). */
async function blockBytes(files: string[], format: DataFormat, layout: Layout, maxBlockBytes?: number): Promise<{ bytes: Buffer; f64: boolean }> {
  const src = await openDataset(dataset(tmp.dir, files, format, { layout }), ctx) as ActivitySource;
  const parts: Buffer[] = [];
  let f64 = false;
  for await (const b of src.blocks(maxBlockBytes ? { maxBlockBytes } : undefined)) {
    parts.push(Buffer.from(new Uint8Array(b.data.buffer, b.data.byteOffset, b.data.byteLength)));
    f64 = b.data instanceof Float64Array;
  }
  return { bytes: Buffer.concat(parts), f64 };
}

const bytesOf = (a: Numeric) => Buffer.from(new Uint8Array(a.buffer, a.byteOffset, a.byteLength));

/** Every buffer `readUnits` read into, for one call over all units of a `.npy` file. */
async function readTargets(path: string, out: Numeric, outCols: number, colOffset: number): Promise<{ inBlock: number; other: number }> {
  const { src, header } = await openNpyFile(path, 'x.npy');
  const seen = { inBlock: 0, other: 0 };
  const recording: ByteSource = {
    size: src.size,
    read(offset, length, into) {
      if (into.buffer === out.buffer) seen.inBlock++;
      else seen.other++;
      return src.read(offset, length, into);
    },
    close: () => src.close(),
  };
  const f = npyActivityFile(recording, header, { path, relPath: 'x.npy', layout: 'units-by-bins' });
  await f.readUnits(0, f.units, out, outCols, colOffset);
  await f.close();
  return seen;
}

// Values that a conversion could alter: NaN, signed zero, infinities, subnormals, extremes.
const SPECIAL = [NaN, -0, 0, Infinity, -Infinity, 1e-45, -1.4e-45, 3.4028234663852886e38, 5e-324, 1.7976931348623157e308, 0.1, -2.5];

describe('zero-copy reads on writeNpy files', () => {
  for (const Ctor of [Float32Array, Float64Array]) {
    it(`${Ctor.name}: blocks are byte-identical to the written array and to the decode path`, async () => {
      // 5 units × 12 bins; unit u = SPECIAL rotated by u.
      const a = new Ctor(60);
      for (let i = 0; i < 60; i++) a[i] = SPECIAL[(i + Math.floor(i / 12)) % 12];
      const path = join(tmp.dir, `z${Ctor.name}.npy`);
      writeNpy(path, a, [5, 12]);
      for (const max of [undefined, 2 * 12 * Ctor.BYTES_PER_ELEMENT]) { // one block; blocks of 2 units
        const got = await blockBytes([path], 'npy', 'units-by-bins', max);
        expect(got.bytes.equals(bytesOf(a))).toBe(true);
      }
      const { src, header } = await openNpyFile(path, 'z.npy');
      const decoded = await readNpyTensor(src, header, 'z.npy'); // scratch buffer + decodeInto
      await src.close();
      expect(bytesOf(decoded).equals(bytesOf(a))).toBe(true);
    });
  }

  it('reads in place only when the stored type is the block type', async () => {
    const p32 = join(tmp.dir, 'p32.npy');
    writeNpy(p32, Float32Array.from({ length: 4 * 10 }, (_, i) => i), [4, 10]);
    expect(await readTargets(p32, new Float32Array(40), 10, 0)).toEqual({ inBlock: 1, other: 0 });
    expect((await readTargets(p32, new Float64Array(40), 10, 0)).inBlock).toBe(0); // f4 into f64: decoded
    const pi = join(tmp.dir, 'pi.npy');
    writeNpy(pi, Int16Array.from({ length: 40 }, (_, i) => i - 20), [4, 10]);
    expect((await readTargets(pi, new Float32Array(40), 10, 0)).inBlock).toBe(0); // i2: decoded
  });

  it('joined along bins: long rows go straight to their columns, short rows through scratch', async () => {
    // Long: 3 units × L float32 bins with L × 4 ≥ ROW_READ_MIN_BYTES, then a second file of 2 bins.
    const L = ROW_READ_MIN_BYTES / 4 + 3;
    const a = Float32Array.from({ length: 3 * L }, (_, i) => SPECIAL[i % 12] * (i % 5));
    const b = Float32Array.from([NaN, 1, -0, 2, 3, 4]);
    const pa = join(tmp.dir, 'long.npy');
    const pb = join(tmp.dir, 'short.npy');
    writeNpy(pa, a, [3, L]);
    writeNpy(pb, b, [3, 2]);
    const cols = L + 2;
    expect(await readTargets(pa, new Float32Array(3 * cols), cols, 0)).toEqual({ inBlock: 3, other: 0 }); // one read per row
    expect((await readTargets(pb, new Float32Array(3 * cols), cols, L)).inBlock).toBe(0);
    // Expected joined matrix, built by hand: unit u = a's row u, then b's row u.
    const want = new Float32Array(3 * cols);
    for (let u = 0; u < 3; u++) {
      want.set(a.subarray(u * L, (u + 1) * L), u * cols);
      want.set(b.subarray(u * 2, u * 2 + 2), u * cols + L);
    }
    for (const max of [undefined, cols * 4]) {
      const got = await blockBytes([pa, pb], 'npy', 'units-by-bins', max);
      expect(got.bytes.equals(bytesOf(want))).toBe(true);
    }
  });
});

describe.skipIf(!hasScipy)('zero-copy reads on numpy-written files', () => {
  // numpy writes each array and, beside it, the bytes of the units × bins matrix in C order.
  runPythonScript(`
import sys, numpy as np
root = sys.argv[1]
special = [np.nan, -0.0, 0.0, np.inf, -np.inf, 1e-45, -1.4e-45, 3.4028234663852886e38, 5e-324, 1.7976931348623157e308, 0.1, -2.5]
rng = np.random.default_rng(3)
for code in ('<f4', '<f8'):
    with np.errstate(over='ignore'):
        m = np.array(special * 30, dtype=np.float64).astype(code).reshape(6, 60)
    m[:, ::7] = rng.normal(0, 20, (6, 9)).astype(code)
    tag = code[1:]
    open(f"{root}/{tag}.bin", 'wb').write(m.tobytes(order='C'))
    np.save(f"{root}/{tag}-ub-C.npy", np.ascontiguousarray(m))
    np.save(f"{root}/{tag}-bu-F.npy", np.asfortranarray(m.T))
    np.save(f"{root}/{tag}-be.npy", m.astype(code.replace('<', '>')))
    np.savez(f"{root}/{tag}-stored.npz", m)
    np.savez_compressed(f"{root}/{tag}-deflated.npz", m)
`, [tmp.dir]);

  for (const tag of ['f4', 'f8']) {
    it(`${tag}: blocks are byte-identical to numpy's own bytes, in every contiguous layout`, async () => {
      const want = readFileSync(join(tmp.dir, `${tag}.bin`));
      const cases: [string, DataFormat, Layout][] = [
        [`${tag}-ub-C.npy`, 'npy', 'units-by-bins'],
        [`${tag}-bu-F.npy`, 'npy', 'bins-by-units'],
        [`${tag}-stored.npz`, 'npz', 'units-by-bins'],
        [`${tag}-deflated.npz`, 'npz', 'units-by-bins'],
      ];
      for (const [file, format, layout] of cases) {
        for (const max of [undefined, 60 * 2 * (tag === 'f4' ? 4 : 8)]) {
          const got = await blockBytes([join(tmp.dir, file)], format, layout, max);
          expect(got.f64, file).toBe(tag === 'f8');
          expect(got.bytes.equals(want), `${file}, maxBlockBytes ${max}`).toBe(true);
        }
      }
      // Big-endian copy: always decoded value by value; the values (not NaN payload bits) must agree.
      const be = await blockBytes([join(tmp.dir, `${tag}-be.npy`)], 'npy', 'units-by-bins');
      const Ctor = tag === 'f4' ? Float32Array : Float64Array;
      const viewOf = (b: Buffer) => new Ctor(Uint8Array.from(b).buffer); // a copy: aligned, own buffer
      const x = viewOf(be.bytes);
      const y = viewOf(want);
      expect(Array.from(x).every((v, i) => Object.is(v, y[i]))).toBe(true);
    });
  }
});
