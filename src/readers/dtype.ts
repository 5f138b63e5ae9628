/**
 * Element types shared by the binary readers (`.npy`, `.npz`, safetensors) and the decoder that
 * turns stored bytes into float values.
 *
 * Output precision: data stored as f8, i8, u8, i4 or u4 (and safetensors F64, I64, I32) are
 * decoded into Float64Array, because float32 cannot hold them exactly (f32 has a 24-bit
 * significand); everything narrower (f2, f4, i1, i2, u1, u2, b1; F16, BF16, F32, I16, I8, U8, BOOL)
 * fits exactly in Float32Array and is decoded there, halving memory. 64-bit integers beyond
 * 2^53 lose their low bits when converted to float64 (they are rare in recordings and weights).
 */
import type { Numeric } from '../types.ts';

export type Precision = 'f32' | 'f64';

export interface DType {
  /** Name as written in the file (`<f4`, `F16`). */
  name: string;
  kind: 'f' | 'i' | 'u' | 'b' | 'bf';
  /** Bytes per element. */
  size: number;
  littleEndian: boolean;
  precision: Precision;
}

const NPY_ALLOWED = ['f2', 'f4', 'f8', 'i1', 'i2', 'i4', 'i8', 'u1', 'u2', 'u4', 'u8', 'b1'];
export const NPY_DTYPES_TEXT = 'f2 f4 f8 i1 i2 i4 i8 u1 u2 u4 u8 b1 with byte order <, >, | or =';

function precisionOf(kind: DType['kind'], size: number): Precision {
  if (kind === 'f' || kind === 'bf' || kind === 'b') return size >= 8 ? 'f64' : 'f32';
  return size >= 4 ? 'f64' : 'f32';
}

/** Parse a numpy `descr` string such as `<f4`, `>i2`, `|b1`; null when not supported. */
export function npyDType(descr: string): DType | null {
  const m = /^([<>|=])([fiub])(\d+)$/.exec(descr);
  if (!m) return null;
  const code = m[2] + m[3];
  if (!NPY_ALLOWED.includes(code)) return null;
  const size = Number(m[3]);
  // `=` is native order; every platform Node runs on here is little-endian. `|` only for 1 byte.
  if (m[1] === '|' && size !== 1) return null;
  const littleEndian = m[1] !== '>';
  const kind = m[2] as DType['kind'];
  return { name: descr, kind, size, littleEndian, precision: precisionOf(kind, size) };
}

const SAFETENSORS: Record<string, [DType['kind'], number]> = {
  F64: ['f', 8], F32: ['f', 4], F16: ['f', 2], BF16: ['bf', 2],
  I64: ['i', 8], I32: ['i', 4], I16: ['i', 2], I8: ['i', 1], U8: ['u', 1], BOOL: ['b', 1],
};
export const SAFETENSORS_DTYPES_TEXT = Object.keys(SAFETENSORS).join(' ');

/** A safetensors dtype name (always little-endian); null when not supported. */
export function safetensorsDType(name: string): DType | null {
  const e = Object.hasOwn(SAFETENSORS, name) ? SAFETENSORS[name] : undefined;
  if (!e) return null;
  return { name, kind: e[0], size: e[1], littleEndian: true, precision: precisionOf(e[0], e[1]) };
}

/** IEEE 754 binary16 bits to a number (exact: every half value is a float32 and a float64). */
export function halfToNumber(h: number): number {
  const sign = h & 0x8000 ? -1 : 1;
  const exp = (h >> 10) & 0x1f;
  const frac = h & 0x3ff;
  if (exp === 0) return sign * frac * 2 ** -24;
  if (exp === 31) return frac ? NaN : sign * Infinity;
  return sign * (1 + frac / 1024) * 2 ** (exp - 15);
}

const f32scratch = new Float32Array(1);
const u32scratch = new Uint32Array(f32scratch.buffer);
/** bfloat16 bits (the upper half of a float32) to a number. */
export function bfloat16ToNumber(h: number): number {
  u32scratch[0] = (h & 0xffff) << 16;
  return f32scratch[0];
}

/** A typed array for `count` elements of the given precision. */
export function allocNumeric(precision: Precision, count: number): Numeric {
  return precision === 'f64' ? new Float64Array(count) : new Float32Array(count);
}

/**
 * Decode `count` elements of `dt` from `src` (element i at byte `srcByte + i * srcStride`) into
 * `out[outIndex + i * outStride]`. Cost: one pass over the elements; little-endian contiguous
 * f4/f8 and 1-byte integers take a typed-array copy, the rest a DataView loop.
 */
export function decodeInto(
  src: Uint8Array, srcByte: number, count: number, srcStride: number, dt: DType,
  out: Numeric, outIndex: number, outStride = 1,
): void {
  const absByte = src.byteOffset + srcByte;
  const contiguous = srcStride === dt.size && outStride === 1;
  if (contiguous && dt.littleEndian && absByte % dt.size === 0) {
    const buf = src.buffer;
    if (dt.kind === 'f' && dt.size === 4) return out.set(new Float32Array(buf, absByte, count), outIndex);
    if (dt.kind === 'f' && dt.size === 8) return out.set(new Float64Array(buf, absByte, count), outIndex);
    if (dt.kind === 'i' && dt.size === 1) return out.set(new Int8Array(buf, absByte, count), outIndex);
    if (dt.kind === 'u' && dt.size === 1) return out.set(new Uint8Array(buf, absByte, count), outIndex);
    if (dt.kind === 'i' && dt.size === 2) return out.set(new Int16Array(buf, absByte, count), outIndex);
    if (dt.kind === 'u' && dt.size === 2) return out.set(new Uint16Array(buf, absByte, count), outIndex);
    if (dt.kind === 'i' && dt.size === 4) return out.set(new Int32Array(buf, absByte, count), outIndex);
    if (dt.kind === 'u' && dt.size === 4) return out.set(new Uint32Array(buf, absByte, count), outIndex);
  }
  const view = new DataView(src.buffer, src.byteOffset, src.byteLength);
  const le = dt.littleEndian;
  let p = srcByte;
  let o = outIndex;
  const read = reader(dt, view, le);
  for (let i = 0; i < count; i++, p += srcStride, o += outStride) out[o] = read(p);
}

function reader(dt: DType, v: DataView, le: boolean): (p: number) => number {
  switch (dt.kind + dt.size) {
    case 'f2': return (p) => halfToNumber(v.getUint16(p, le));
    case 'bf2': return (p) => bfloat16ToNumber(v.getUint16(p, le));
    case 'f4': return (p) => v.getFloat32(p, le);
    case 'f8': return (p) => v.getFloat64(p, le);
    case 'i1': return (p) => v.getInt8(p);
    case 'u1': return (p) => v.getUint8(p);
    case 'b1': return (p) => (v.getUint8(p) ? 1 : 0);
    case 'i2': return (p) => v.getInt16(p, le);
    case 'u2': return (p) => v.getUint16(p, le);
    case 'i4': return (p) => v.getInt32(p, le);
    case 'u4': return (p) => v.getUint32(p, le);
    case 'i8': return (p) => Number(v.getBigInt64(p, le));
    case 'u8': return (p) => Number(v.getBigUint64(p, le));
    default: throw new Error(`internal error: no decoder for ${dt.name}`);
  }
}
