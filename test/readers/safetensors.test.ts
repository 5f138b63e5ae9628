/**
 * safetensors files written by hand following the published layout (Hugging Face safetensors
 * README, "Format": u64 LE header size N, N bytes of JSON header, then the byte buffer;
 * data_offsets relative to the buffer, covering it without holes or overlaps).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { openDataset, inspectDataset } from '../../src/readers/index.ts';
import { dataset, tempDir, errorOf } from './helpers.ts';
import type { Tensor } from '../../src/types.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'weights' as const, binMs: 10, workspaceRoot: tmp.dir };

function safetensors(name: string, header: object, buffer: Uint8Array, pad = 0): string {
  const json = Buffer.from(JSON.stringify(header) + ' '.repeat(pad), 'utf8');
  const n = Buffer.alloc(8);
  n.writeBigUInt64LE(BigInt(json.length));
  writeFileSync(join(tmp.dir, name), Buffer.concat([n, json, buffer]));
  return join(tmp.dir, name);
}

describe('safetensors', () => {
  it('reads F32, F16, BF16, I64, U8 and BOOL tensors in buffer order', async () => {
    const f32 = Buffer.from(new Float32Array([1.5, -2, 0, 3]).buffer); // 16 bytes
    // F16: 0x3c00 = 1, 0xc000 = −2 (IEEE 754 binary16); BF16: 0x3f80 = 1, 0xc040 = −3 (top half of float32).
    const f16 = Buffer.from(new Uint16Array([0x3c00, 0xc000]).buffer);
    const bf16 = Buffer.from(new Uint16Array([0x3f80, 0xc040]).buffer);
    const i64 = Buffer.alloc(16); i64.writeBigInt64LE(-5n, 0); i64.writeBigInt64LE(2n ** 40n, 8);
    const u8 = Buffer.from([0, 255, 7]);
    const bool = Buffer.from([1, 0]);
    const buffer = Buffer.concat([f32, f16, bf16, i64, u8, bool]);
    const file = safetensors('m.safetensors', {
      __metadata__: { format: 'pt' },
      b_bool: { dtype: 'BOOL', shape: [2], data_offsets: [43, 45] },
      w: { dtype: 'F32', shape: [2, 2], data_offsets: [0, 16] },
      h: { dtype: 'F16', shape: [2], data_offsets: [16, 20] },
      bf: { dtype: 'BF16', shape: [1, 2], data_offsets: [20, 24] },
      big: { dtype: 'I64', shape: [2], data_offsets: [24, 40] },
      bytes: { dtype: 'U8', shape: [3], data_offsets: [40, 43] },
    }, buffer, 5);
    const src = await openDataset(dataset(tmp.dir, [file], 'safetensors'), ctx);
    if (src.kind !== 'weights') throw new Error('kind');
    expect(src.layers.map((l) => l.name)).toEqual(['w', 'h', 'bf', 'big', 'bytes', 'b_bool']);
    const got: Tensor[] = [];
    for await (const t of src.tensors()) got.push(t);
    expect(got.map((t) => [t.name, t.shape, Array.from(t.data), t.data.constructor.name])).toEqual([
      ['w', [2, 2], [1.5, -2, 0, 3], 'Float32Array'],
      ['h', [2], [1, -2], 'Float32Array'],
      ['bf', [1, 2], [1, -3], 'Float32Array'],
      ['big', [2], [-5, 2 ** 40], 'Float64Array'],
      ['bytes', [3], [0, 255, 7], 'Float32Array'],
      ['b_bool', [2], [1, 0], 'Float32Array'],
    ]);
  });

  it('refuses bad offsets, sizes, dtypes and headers', async () => {
    const buf = Buffer.alloc(16);
    const cases: [object | string, RegExp][] = [
      [{ a: { dtype: 'F32', shape: [2], data_offsets: [0, 8] }, b: { dtype: 'F32', shape: [3], data_offsets: [4, 16] } }, /overlapping/],
      [{ a: { dtype: 'F32', shape: [2], data_offsets: [0, 8] }, b: { dtype: 'F32', shape: [1], data_offsets: [12, 16] } }, /hole/],
      [{ a: { dtype: 'F32', shape: [2], data_offsets: [0, 8] } }, /cover 8 bytes of the 16-byte/],
      [{ a: { dtype: 'F32', shape: [5], data_offsets: [0, 20] } }, /past the data buffer/],
      [{ a: { dtype: 'F32', shape: [3], data_offsets: [0, 16] } }, /needs 12 bytes but data_offsets span 16/],
      [{ a: { dtype: 'C64', shape: [2], data_offsets: [0, 16] } }, /dtype "C64" is not supported/],
      [{ a: { dtype: 'F32', shape: [4], data_offsets: [8, 0] } }, /begin ≤ end/],
      [{ a: { dtype: 'F32', shape: [-4], data_offsets: [0, 16] } }, /integers ≥ 0/],
      ['[1, 2]', /JSON object/],
    ];
    for (const [header, re] of cases) {
      const file = typeof header === 'string'
        ? (() => { const j = Buffer.from(header); const n = Buffer.alloc(8); n.writeBigUInt64LE(BigInt(j.length)); writeFileSync(join(tmp.dir, 'bad.safetensors'), Buffer.concat([n, j, buf])); return join(tmp.dir, 'bad.safetensors'); })()
        : safetensors('bad.safetensors', header, buf);
      const e = await errorOf(() => openDataset(dataset(tmp.dir, [file], 'safetensors'), ctx));
      expect(e.name).toBe('InputError');
      expect(e.file).toBe('bad.safetensors');
      expect(e.message).toMatch(re);
    }
    // Header length beyond the file, and beyond the 100 MB cap.
    const n = Buffer.alloc(8);
    n.writeBigUInt64LE(2n ** 40n);
    writeFileSync(join(tmp.dir, 'huge.safetensors'), Buffer.concat([n, Buffer.from('{}')]));
    expect((await errorOf(() => openDataset(dataset(tmp.dir, [join(tmp.dir, 'huge.safetensors')], 'safetensors'), ctx))).message).toMatch(/exceeds the 100000000-byte limit/);
  });

  it('is refused for activity, and inspected without reading data', async () => {
    const file = safetensors('ok.safetensors', { a: { dtype: 'F64', shape: [2], data_offsets: [0, 16] } }, Buffer.alloc(16));
    const e = await errorOf(() => openDataset(dataset(tmp.dir, [file], 'safetensors'), { ...ctx, kind: 'activity' }));
    expect(e.message).toMatch(/hold weights, not activity/);
    const r = await inspectDataset(dataset(tmp.dir, [file], 'safetensors'), ctx);
    expect(r.problems).toEqual([]);
    expect(r.files[0].parts).toEqual([{ name: 'a', shape: [2], dtype: 'F64' }]);
  });
});
