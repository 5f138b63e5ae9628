/**
 * safetensors weight files (the format published by Hugging Face, "safetensors" repository
 * README, section "Format"): an unsigned 64-bit little-endian header length N, N bytes of UTF-8
 * JSON `{ name: { dtype, shape, data_offsets: [begin, end] }, "__metadata__"?: {…} }`, then the
 * byte buffer. Offsets are relative to the buffer, which tensors must cover exactly: in bounds,
 * contiguous, not overlapping, no holes, and end − begin = product(shape) × dtype size. Headers
 * over 100 MB are refused. Parsing the JSON runs no code. Supported dtypes F64 F32 F16 BF16 I64
 * I32 I16 I8 U8 BOOL (others are InputErrors). Layers are listed in buffer order.
 */
import { open, stat } from 'node:fs/promises';
import type { Numeric } from '../types.ts';
import { fileRange, inputError, readExactly } from './byte-source.ts';
import { safetensorsDType, SAFETENSORS_DTYPES_TEXT, type DType } from './dtype.ts';
import { readNpyTensor } from './npy.ts';

export const MAX_SAFETENSORS_HEADER = 100_000_000;

export interface SafetensorsEntry {
  name: string;
  dtype: DType;
  shape: number[];
  begin: number;
  end: number;
}

export interface SafetensorsHeader {
  /** Absolute byte offset of the data buffer (8 + N). */
  dataStart: number;
  tensors: SafetensorsEntry[];
}

export async function readSafetensorsHeader(path: string, relPath: string): Promise<SafetensorsHeader> {
  const { size } = await stat(path);
  if (size === 0) throw inputError(relPath, 'byte 0', 'file is empty; expected a safetensors file');
  if (size < 8) throw inputError(relPath, 'byte 0', `only ${size} bytes; a safetensors file starts with an 8-byte header length`);
  const fh = await open(path, 'r');
  let text: string;
  let n: number;
  try {
    const pre = new Uint8Array(8);
    await readExactly(fh, 0, 8, pre, relPath);
    const big = new DataView(pre.buffer).getBigUint64(0, true);
    if (big > BigInt(MAX_SAFETENSORS_HEADER)) throw inputError(relPath, 'byte 0', `header length ${big} exceeds the ${MAX_SAFETENSORS_HEADER}-byte limit`);
    n = Number(big);
    if (8 + n > size) throw inputError(relPath, 'byte 0', `header length ${n} runs past the end of the file (${size} bytes)`);
    const raw = new Uint8Array(n);
    await readExactly(fh, 8, n, raw, relPath);
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(raw);
    } catch {
      throw inputError(relPath, 'byte 8', 'header is not valid UTF-8');
    }
  } finally {
    await fh.close();
  }
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch (err) {
    throw inputError(relPath, 'byte 8', `header is not valid JSON: ${(err as Error).message}`);
  }
  if (typeof json !== 'object' || json === null || Array.isArray(json)) throw inputError(relPath, 'byte 8', 'header must be a JSON object');
  const dataStart = 8 + n;
  const dataLen = size - dataStart;
  const tensors: SafetensorsEntry[] = [];
  for (const [name, v] of Object.entries(json as Record<string, unknown>)) {
    const where = `header, tensor '${name}'`;
    if (name === '__metadata__') {
      if (typeof v !== 'object' || v === null || Array.isArray(v)) throw inputError(relPath, 'header, __metadata__', '__metadata__ must be an object of strings');
      continue;
    }
    if (typeof v !== 'object' || v === null) throw inputError(relPath, where, 'entry must be an object with dtype, shape and data_offsets');
    const e = v as Record<string, unknown>;
    const dtype = typeof e.dtype === 'string' ? safetensorsDType(e.dtype) : null;
    if (!dtype) throw inputError(relPath, `${where}, dtype`, `dtype ${JSON.stringify(e.dtype)} is not supported; allowed ${SAFETENSORS_DTYPES_TEXT}`);
    const shape = e.shape;
    if (!Array.isArray(shape) || !shape.every((d) => Number.isSafeInteger(d) && d >= 0)) {
      throw inputError(relPath, `${where}, shape`, `shape ${JSON.stringify(shape)?.slice(0, 60)} must be a list of integers ≥ 0`);
    }
    const off = e.data_offsets;
    if (!Array.isArray(off) || off.length !== 2 || !off.every((d) => Number.isSafeInteger(d) && d >= 0) || off[0] > off[1]) {
      throw inputError(relPath, `${where}, data_offsets`, `data_offsets ${JSON.stringify(off)?.slice(0, 60)} must be [begin, end] with 0 ≤ begin ≤ end`);
    }
    if (off[1] > dataLen) throw inputError(relPath, `${where}, data_offsets`, `end ${off[1]} is past the data buffer (${dataLen} bytes from byte ${dataStart})`);
    let count = 1;
    for (const d of shape as number[]) count *= d;
    if (!Number.isSafeInteger(count) || count * dtype.size !== off[1] - off[0]) {
      throw inputError(relPath, `${where}, data_offsets`, `shape [${shape.join(', ')}] of ${dtype.name} needs ${count * dtype.size} bytes but data_offsets span ${off[1] - off[0]}`);
    }
    tensors.push({ name, dtype, shape: shape as number[], begin: off[0], end: off[1] });
  }
  tensors.sort((a, b) => a.begin - b.begin || a.end - b.end);
  let at = 0;
  for (const t of tensors) {
    if (t.begin !== at) {
      throw inputError(relPath, `header, tensor '${t.name}', data_offsets`, t.begin < at
        ? `tensor starts at ${t.begin}, overlapping the previous tensor, which ends at ${at}`
        : `hole in the data buffer: bytes ${at}–${t.begin} belong to no tensor`);
    }
    at = t.end;
  }
  if (at !== dataLen) throw inputError(relPath, `byte ${dataStart + at}`, `tensors cover ${at} bytes of the ${dataLen}-byte data buffer; the rest belongs to no tensor`);
  return { dataStart, tensors };
}

/** One tensor's values (C order), as Float32Array or Float64Array (see dtype.ts). */
export async function readSafetensor(path: string, relPath: string, h: SafetensorsHeader, t: SafetensorsEntry): Promise<Numeric> {
  const src = fileRange(path, relPath, h.dataStart + t.begin, t.end - t.begin);
  try {
    const count = (t.end - t.begin) / t.dtype.size;
    return await readNpyTensor(src, { version: '', dtype: t.dtype, fortranOrder: false, shape: t.shape, headerBytes: 0, count }, relPath);
  } finally {
    await src.close();
  }
}
