/**
 * Write a NumPy `.npy` file (format version 1.0, little-endian, C or Fortran order).
 * Format: NumPy Enhancement Proposal 1 ("A simple file format for NumPy arrays").
 * Used by the demo scenario, the benchmark and test fixtures; writes to a temporary name and
 * renames, so a reader never sees half a file.
 */
import { renameSync, openSync, writeSync, closeSync } from 'node:fs';

type Writable = Float64Array | Float32Array | Int32Array | Int16Array | Int8Array | Uint8Array | Uint16Array | Uint32Array | BigUint64Array;

function descrOf(a: Writable): string {
  if (a instanceof Float64Array) return '<f8';
  if (a instanceof Float32Array) return '<f4';
  if (a instanceof Int32Array) return '<i4';
  if (a instanceof Int16Array) return '<i2';
  if (a instanceof Int8Array) return '|i1';
  if (a instanceof Uint8Array) return '|u1';
  if (a instanceof Uint16Array) return '<u2';
  if (a instanceof BigUint64Array) return '<u8';
  return '<u4';
}

/** The header bytes (magic, version, length, padded dict) for an array of this dtype and shape. */
export function npyHeader(descr: string, shape: number[], fortranOrder = false): Buffer {
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let dict = `{'descr': '${descr}', 'fortran_order': ${fortranOrder ? 'True' : 'False'}, 'shape': ${shapeText}, }`;
  const pre = 10; // magic(6) + version(2) + u16 length(2)
  const total = Math.ceil((pre + dict.length + 1) / 64) * 64;
  dict = dict.padEnd(total - pre - 1, ' ') + '\n';
  const head = Buffer.alloc(pre);
  head.write('\x93NUMPY', 0, 'latin1');
  head[6] = 1;
  head[7] = 0;
  head.writeUInt16LE(dict.length, 8);
  return Buffer.concat([head, Buffer.from(dict, 'latin1')]);
}

/** Write `data` with the given shape (product must equal data.length) to `path`, atomically. */
export function writeNpy(path: string, data: Writable, shape: number[], options: { fortranOrder?: boolean } = {}): void {
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) throw new RangeError(`writeNpy: shape ${shape.join('×')} holds ${count} values, data has ${data.length}`);
  const tmp = `${path}.tmp-${process.pid}`;
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, npyHeader(descrOf(data), shape, options.fortranOrder ?? false));
    const bytes = new Uint8Array(data.buffer, data.byteOffset, data.byteLength);
    for (let off = 0; off < bytes.length; off += 1 << 24) writeSync(fd, bytes.subarray(off, Math.min(bytes.length, off + (1 << 24))));
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, path);
}

