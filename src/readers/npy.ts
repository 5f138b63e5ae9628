/**
 * NumPy `.npy` arrays (NumPy Enhancement Proposal 1) as activity files and as weight tensors.
 *
 * Which axis holds units: `layout: units-by-bins` reads a 2-D array as units × bins, and
 * `bins-by-units` as bins × units; a 1-D array is one unit. Other ranks are InputErrors for
 * activity (weights take any rank).
 *
 * Cost of `readUnits`: data are read with positioned `fs.promises` reads into one reused scratch
 * buffer (4 MiB by default), never the whole file. Zero-copy: little-endian f4 (f8) data in a
 * contiguous layout, read into a Float32Array (Float64Array) block, are read straight into the
 * block's bytes, skipping the scratch copy — one read per block when the block's rows are this
 * file's rows, one read per unit row when files are joined along bins (rows of at least
 * ROW_READ_MIN_BYTES; shorter rows go through the scratch buffer, fewer and larger reads). The
 * bytes are the stored IEEE 754 values either way, so the numbers are identical. When a unit's bins are contiguous on disk
 * (units-by-bins in C order, bins-by-units in Fortran order) a range of units is one contiguous
 * read. Otherwise (units-by-bins in Fortran order, bins-by-units in C order) the units are strided:
 * rows of bins are read in chunks and the requested columns gathered, so every block re-reads the
 * byte span from its first to its last unit in each row — for a full pass that is up to one whole
 * file read per block. Larger `maxBlockBytes` means fewer passes, so such files report
 * `contiguous: false` and get the large default block (join.ts). The values written are the
 * stored values converted exactly (dtype.ts); NaN and negative values pass through unchanged.
 */
import type { Numeric } from '../types.ts';
import type { Layout } from '../manifest/types.ts';
import { stat } from 'node:fs/promises';
import { fileRange, inputError, type ByteSource } from './byte-source.ts';
import { decodeInto, allocNumeric, type DType } from './dtype.ts';
import { readNpyHeader, type NpyHeader } from './npy-header.ts';
import type { ReadableActivityFile } from './activity-file.ts';

export const DEFAULT_SCRATCH_BYTES = 4 << 20;
/** Largest single zero-copy read (a file handle read takes under 2 GiB). */
const DIRECT_READ_BYTES = 64 << 20;
/**
 * Shortest unit row read on its own straight into a joined block; shorter rows use scratch. Each
 * read costs a thread-pool round trip: two 190 MiB float32 files joined along bins, 2,000 rows of
 * 100 kB each per file, took 350 ms a pass read row by row and 233 ms through 4 MiB scratch
 * reads; with 200 rows of 1 MB, 200 ms row by row and 230 ms through scratch.
 */
export const ROW_READ_MIN_BYTES = 512 << 10;

/** True when the stored bytes are `out`'s own element bytes (little-endian f4 → f32, f8 → f64). */
export function readsInPlace(dt: DType, out: Numeric): boolean {
  if (dt.kind !== 'f' || !dt.littleEndian) return false;
  return dt.size === 4 ? out instanceof Float32Array : dt.size === 8 && out instanceof Float64Array;
}

interface Geometry {
  units: number;
  bins: number;
  /** True when unit u's bins are the contiguous elements [u * bins, (u + 1) * bins). */
  unitContiguous: boolean;
}

/** Units, bins and on-disk order of an array read as activity, or an InputError. */
export function activityGeometry(h: NpyHeader, layout: Layout, relPath: string, where: string): Geometry {
  const s = h.shape;
  if (s.length === 1) {
    if (s[0] === 0) throw inputError(relPath, where, 'array has no elements; activity needs at least one bin');
    return { units: 1, bins: s[0], unitContiguous: true };
  }
  if (s.length !== 2) {
    throw inputError(relPath, where, `array has ${s.length} dimensions (shape (${s.join(', ')})); activity data must be 1-D (one unit) or 2-D (units × bins or bins × units)`);
  }
  if (h.count === 0) throw inputError(relPath, where, `array of shape (${s.join(', ')}) has no elements`);
  const unitsFirst = layout === 'units-by-bins';
  return {
    units: unitsFirst ? s[0] : s[1],
    bins: unitsFirst ? s[1] : s[0],
    unitContiguous: unitsFirst !== h.fortranOrder,
  };
}

/** An ActivityFile over an already-checked `.npy` header and its byte source. */
export function npyActivityFile(
  src: ByteSource, h: NpyHeader, opts: { path: string; relPath: string; layout: Layout; where?: string; scratchBytes?: number },
): ReadableActivityFile {
  const g = activityGeometry(h, opts.layout, opts.relPath, opts.where ?? 'shape');
  const es = h.dtype.size;
  // No larger than the data: a folder of many small files reads each through its own scratch.
  const scratchBytes = Math.max(es, Math.min(opts.scratchBytes ?? DEFAULT_SCRATCH_BYTES, h.count * es));
  let scratch: Uint8Array | null = null;
  const buf = (): Uint8Array => (scratch ??= new Uint8Array(scratchBytes - (scratchBytes % es)));

  /** Stored bytes [fileByte, fileByte + n) into `out`'s bytes from element `outIndex` on. */
  async function readSpan(fileByte: number, n: number, out: Numeric, outIndex: number) {
    const at = out.byteOffset + outIndex * es;
    for (let done = 0; done < n; done += DIRECT_READ_BYTES) {
      const k = Math.min(DIRECT_READ_BYTES, n - done);
      await src.read(fileByte + done, k, new Uint8Array(out.buffer, at + done, k));
    }
  }

  /** Zero-copy contiguous read; false when this block cannot take one (then scratch is used). */
  async function direct(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number): Promise<boolean> {
    if (!readsInPlace(h.dtype, out)) return false;
    const rowBytes = g.bins * es;
    const first = h.headerBytes + unitStart * rowBytes;
    if (outCols === g.bins) {
      await readSpan(first, count * rowBytes, out, 0);
      return true;
    }
    if (rowBytes < ROW_READ_MIN_BYTES) return false;
    for (let u = 0; u < count; u++) await readSpan(first + u * rowBytes, rowBytes, out, u * outCols + colOffset);
    return true;
  }

  async function contiguous(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number) {
    if (await direct(unitStart, count, out, outCols, colOffset)) return;
    const s = buf();
    const perRead = s.length / es;
    let e = unitStart * g.bins;
    const end = (unitStart + count) * g.bins;
    while (e < end) {
      const n = Math.min(perRead, end - e);
      await src.read(h.headerBytes + e * es, n * es, s);
      let k = 0;
      while (k < n) {
        const u = Math.floor((e + k) / g.bins);
        const b = e + k - u * g.bins;
        const take = Math.min(n - k, g.bins - b);
        decodeInto(s, k * es, take, es, h.dtype, out, (u - unitStart) * outCols + colOffset + b);
        k += take;
      }
      e += n;
    }
  }

  async function strided(unitStart: number, count: number, out: Numeric, outCols: number, colOffset: number) {
    const s = buf();
    const perRead = s.length / es;
    if (count > perRead) {
      for (let u = 0; u < count; u += perRead) {
        const c = Math.min(perRead, count - u);
        await strided(unitStart + u, c, out.subarray(u * outCols), outCols, colOffset);
      }
      return;
    }
    const rows = Math.max(1, Math.floor((perRead - count) / g.units) + 1);
    for (let b0 = 0; b0 < g.bins; b0 += rows) {
      const k = Math.min(rows, g.bins - b0);
      const first = b0 * g.units + unitStart;
      const n = (k - 1) * g.units + count;
      await src.read(h.headerBytes + first * es, n * es, s);
      for (let u = 0; u < count; u++) {
        decodeInto(s, u * es, k, g.units * es, h.dtype, out, u * outCols + colOffset + b0);
      }
    }
  }

  return {
    path: opts.path,
    units: g.units,
    bins: g.bins,
    binMs: null,
    findings: [],
    hasMissing: false,
    precision: h.dtype.precision, reusableAfterClose: true, contiguous: g.unitContiguous,
    async readUnits(unitStart, count, out, outCols, colOffset) {
      if (unitStart < 0 || count < 0 || unitStart + count > g.units || colOffset + g.bins > outCols || out.length < count * outCols) {
        throw new RangeError(`readUnits(${unitStart}, ${count}) outside ${g.units} units or block of ${outCols} columns`);
      }
      if (count === 0) return;
      if (g.unitContiguous) await contiguous(unitStart, count, out, outCols, colOffset);
      else await strided(unitStart, count, out, outCols, colOffset);
    },
    close: () => {
      scratch = null; // a folder of many files must not keep one scratch buffer per file
      return src.close();
    },
  };
}

/** Largest tensor read into memory: typed arrays of more elements cannot be allocated. */
export const MAX_TENSOR_ELEMENTS = 2 ** 31 - 1;

/**
 * The whole array in C (row-major) order, as Float32Array or Float64Array (dtype.ts). Fortran
 * arrays are reordered through a scratch chunk (one extra pass, no second full copy).
 */
export async function readNpyTensor(src: ByteSource, h: NpyHeader, relPath: string, scratchBytes = DEFAULT_SCRATCH_BYTES): Promise<Numeric> {
  if (h.count > MAX_TENSOR_ELEMENTS) {
    throw inputError(relPath, 'shape', `array of ${h.count} elements is too large to read as one tensor (limit ${MAX_TENSOR_ELEMENTS})`);
  }
  const out = allocNumeric(h.dtype.precision, h.count);
  const es = h.dtype.size;
  const s = new Uint8Array(Math.max(es, scratchBytes - (scratchBytes % es)));
  const perRead = s.length / es;
  const reorder = h.fortranOrder && h.shape.length > 1;
  const tmp = reorder ? allocNumeric(h.dtype.precision, Math.min(perRead, h.count)) : null;
  // C strides of the shape; a Fortran element's multi-index advances dimension 0 fastest.
  const nd = h.shape.length;
  const cStride = new Array<number>(nd).fill(1);
  for (let d = nd - 2; d >= 0; d--) cStride[d] = cStride[d + 1] * h.shape[d + 1];
  const idx = new Array<number>(nd).fill(0);
  let cPos = 0;
  for (let e = 0; e < h.count; e += perRead) {
    const n = Math.min(perRead, h.count - e);
    await src.read(h.headerBytes + e * es, n * es, s);
    if (!tmp) {
      decodeInto(s, 0, n, es, h.dtype, out, e);
      continue;
    }
    decodeInto(s, 0, n, es, h.dtype, tmp, 0);
    for (let i = 0; i < n; i++) {
      out[cPos] = tmp[i];
      for (let d = 0; d < nd; d++) {
        idx[d]++;
        cPos += cStride[d];
        if (idx[d] < h.shape[d]) break;
        cPos -= idx[d] * cStride[d];
        idx[d] = 0;
      }
    }
  }
  return out;
}

/** Byte source and checked header of a `.npy` file (the header is read; the data are not). */
export async function openNpyFile(path: string, relPath: string): Promise<{ src: ByteSource; header: NpyHeader }> {
  const { size } = await stat(path);
  const src = fileRange(path, relPath, 0, size);
  try {
    return { src, header: await readNpyHeader(src, relPath) };
  } catch (err) {
    await src.close();
    throw err;
  }
}

/** A `.npy` file as an activity file. */
export async function openNpyActivity(path: string, relPath: string, layout: Layout): Promise<ReadableActivityFile> {
  const { src, header } = await openNpyFile(path, relPath);
  try {
    return npyActivityFile(src, header, { path, relPath, layout });
  } catch (err) {
    await src.close();
    throw err;
  }
}
