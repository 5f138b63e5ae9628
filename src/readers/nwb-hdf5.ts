/**
 * Small HDF5 helpers for the NWB reader, on top of h5wasm (the HDF5 C library compiled to
 * WebAssembly). Files are untrusted: the HDF5 signature is checked before the library sees
 * the file; the library runs in a sandbox that can open this file and no other
 * (hdf5-sandbox.ts); every object is reached through checked links and refused when it is
 * virtual or external (hdf5-guard.ts); every read is refused when the library reports an error;
 * every dataset is read in bounded slices (the wasm heap caps at 2 GiB).
 */
import { open, stat } from 'node:fs/promises';
import h5wasm from 'h5wasm';
import type { Dataset, File as H5File, Group } from 'h5wasm';
import { InputError } from '../errors.ts';
import { closeSandboxed, guarded, openSandboxed } from './hdf5-sandbox.ts';
import { forgetFile, getChecked, readSlice, registerFile, relPathOf } from './hdf5-guard.ts';

/** Elements per slice when reading 1-D datasets (4 MiB of float64). */
export const SLICE_ELEMENTS = 1 << 19;
/** Bytes per slice when reading 2-D time × channel data. */
export const SLICE_BYTES = 4 << 20;

const SIGNATURE = Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]);

/**
 * Byte offset of the HDF5 superblock signature, or -1. The HDF5 file format specification
 * (section II.A) places the superblock at offset 0, 512, 1024, 2048, … (powers of two).
 */
async function findSignature(path: string, size: number): Promise<number> {
  const fh = await open(path, 'r');
  try {
    const buf = Buffer.alloc(8);
    for (let at = 0; at + 8 <= size; at = at === 0 ? 512 : at * 2) {
      const { bytesRead } = await fh.read(buf, 0, 8, at);
      if (bytesRead === 8 && buf.equals(SIGNATURE)) return at;
    }
    return -1;
  } finally {
    await fh.close();
  }
}

/** Open an HDF5 file read-only, or throw an InputError naming `relPath` when it is not one. */
export async function openHdf5(path: string, relPath: string): Promise<H5File> {
  let size: number;
  try {
    size = (await stat(path)).size;
  } catch (cause) {
    throw new InputError('cannot read the file', { file: relPath, cause });
  }
  if ((await findSignature(path, size)) < 0) {
    const fh = await open(path, 'r');
    const head = Buffer.alloc(Math.min(8, size));
    try {
      await fh.read(head, 0, head.length, 0);
    } finally {
      await fh.close();
    }
    throw new InputError(`not an HDF5 file: no HDF5 signature at byte 0 or any power-of-two offset; the file starts with bytes ${head.toString('hex') || '(empty file)'}`, {
      file: relPath,
      where: 'byte 0',
      hint: 'format: nwb expects an NWB 2.x file, which is HDF5',
    });
  }
  const file = await openSandboxed(path, relPath);
  registerFile(file, relPath);
  return file;
}

/** Close a file, ignoring a second close. */
export function closeQuietly(file: H5File | null): void {
  if (file) forgetFile(file);
  closeSandboxed(file);
}

/**
 * The object at `path` when it is a dataset, else null. Links on the way are checked (soft
 * links followed inside the file; external links and virtual datasets refused, hdf5-guard.ts).
 */
export function getDataset(file: H5File, path: string): Dataset | null {
  const e = getChecked(file, path);
  return e instanceof h5wasm.Dataset ? e : null;
}

/** The object at `path` when it is a group, else null. */
export function getGroup(file: H5File, path: string): Group | null {
  const e = getChecked(file, path);
  return e instanceof h5wasm.Group ? e : null;
}

/** An attribute's value (undefined when absent), read through the sandbox guard. */
function readAttr(obj: Dataset | Group, name: string): unknown {
  return guarded(relPathOf(obj), `${obj.path}@${name}`, () => {
    const attrs = obj.attrs;
    return name in attrs ? attrs[name].json_value : undefined;
  });
}

/** An attribute as a single string (scalar or one-element array), or null. */
export function attrString(obj: Dataset | Group, name: string): string | null {
  let v = readAttr(obj, name);
  if (Array.isArray(v) && v.length === 1) v = v[0];
  return typeof v === 'string' ? v : null;
}

/** An attribute as a single number (scalar or one-element array), or null when absent or not numeric. */
export function attrNumber(obj: Dataset | Group, name: string): number | null {
  let v = readAttr(obj, name);
  if (Array.isArray(v) && v.length === 1) v = v[0];
  return typeof v === 'number' ? v : null;
}

/** Whether a dataset holds plain numbers (HDF5 integer or float class, little-endian). */
export function isNumeric(ds: Dataset): boolean {
  const m = ds.metadata;
  return (m.type === 0 || m.type === 1) && !m.vlen;
}

/** A short dtype name such as `float64`, `int16`, `uint8`, or the HDF5 dtype string. */
export function dtypeName(ds: Dataset): string {
  const m = ds.metadata;
  if (m.type === 1) return `float${m.size * 8}`;
  if (m.type === 0) return `${m.signed ? 'int' : 'uint'}${m.size * 8}`;
  return JSON.stringify(ds.dtype);
}

/** Copy any numeric typed array (BigInt ones included) into float64, at `out[at…]`. */
export function copyToFloat64(src: unknown, out: Float64Array, at: number): number {
  if (src instanceof BigInt64Array || src instanceof BigUint64Array) {
    for (let i = 0; i < src.length; i++) out[at + i] = Number(src[i]);
    return src.length;
  }
  if (ArrayBuffer.isView(src) && !(src instanceof DataView)) {
    const a = src as unknown as Float32Array; // any non-BigInt typed array: `set` converts element-wise
    out.set(a, at);
    return a.length;
  }
  if (typeof src === 'number') {
    out[at] = src;
    return 1;
  }
  throw new Error(`expected numbers, got ${typeof src}`);
}

/** Check that a dataset can be read as numbers; InputError naming it otherwise. */
export function requireNumeric(ds: Dataset, relPath: string): void {
  if (!isNumeric(ds)) {
    throw new InputError(`dataset holds ${JSON.stringify(ds.dtype)}, not numbers`, { file: relPath, where: ds.path, hint: 'NWB numeric columns are integers or floats' });
  }
  if (!ds.metadata.littleEndian && ds.metadata.size > 1) {
    throw new InputError('dataset is stored big-endian, which this reader does not convert', { file: relPath, where: ds.path });
  }
}

/**
 * Read elements `[start, end)` of a 1-D numeric dataset as float64, slice by slice
 * (never the whole dataset at once). `onSlice` sees each slice with its first index.
 */
export function forEachSlice(ds: Dataset, start: number, end: number, onSlice: (values: Float64Array, first: number) => void): void {
  const buf = new Float64Array(Math.min(SLICE_ELEMENTS, Math.max(0, end - start)));
  for (let a = start; a < end; a += SLICE_ELEMENTS) {
    const b = Math.min(end, a + SLICE_ELEMENTS);
    const n = copyToFloat64(readSlice(ds, [[a, b]], relPathOf(ds)), buf, 0);
    onSlice(n === buf.length ? buf : buf.subarray(0, n), a);
  }
}

/** Read `[start, end)` of a 1-D numeric dataset into a new Float64Array (for small columns: indexes, ids, intervals). */
export function readRange(ds: Dataset, start: number, end: number): Float64Array {
  const out = new Float64Array(Math.max(0, end - start));
  forEachSlice(ds, start, end, (v, first) => out.set(v, first - start));
  return out;
}

/** Number of rows (first dimension) of a dataset; 0 for scalars. */
export function rowsOf(ds: Dataset): number {
  const s = ds.shape;
  return s && s.length > 0 ? s[0] : 0;
}
