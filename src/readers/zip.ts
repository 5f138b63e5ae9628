/**
 * The central directory of a ZIP archive (PKWARE APPNOTE.TXT, version 6.3.x: sections 4.3.12
 * central directory header, 4.3.16 end of central directory, 4.3.14–4.3.15 ZIP64 end record and
 * locator, 4.5.3 ZIP64 extra field). Only what `.npz` needs: names, methods (0 stored,
 * 8 deflated), sizes and where each member's data start. Encrypted members, multi-disk archives
 * and entries outside the file are InputErrors. Cost: reads the last ≤ 64 KiB + the directory.
 */
import { open } from 'node:fs/promises';
import { inputError, readExactly } from './byte-source.ts';

export interface ZipEntry {
  name: string;
  method: number;
  compressedSize: number;
  uncompressedSize: number;
  /** Absolute byte offset of the member's data (after its local header). */
  dataStart: number;
}

const EOCD = 0x06054b50;
const Z64_LOCATOR = 0x07064b50;
const Z64_EOCD = 0x06064b50;
const CDH = 0x02014b50;
const LFH = 0x04034b50;
const MAX_ENTRIES = 100_000;

function u64(dv: DataView, p: number, relPath: string, where: string): number {
  const v = dv.getBigUint64(p, true);
  if (v > BigInt(Number.MAX_SAFE_INTEGER)) throw inputError(relPath, where, `64-bit value ${v} is too large`);
  return Number(v);
}

/** List the members of the zip file at `path` (size `fileSize`). */
export async function readZipDirectory(path: string, relPath: string, fileSize: number): Promise<ZipEntry[]> {
  if (fileSize === 0) throw inputError(relPath, 'byte 0', 'file is empty; expected a .npz (zip) archive');
  if (fileSize < 22) throw inputError(relPath, 'byte 0', `only ${fileSize} bytes; too short for a zip archive`);
  const fh = await open(path, 'r');
  try {
    const tailLen = Math.min(fileSize, 22 + 65535);
    const tailStart = fileSize - tailLen;
    const tail = new Uint8Array(tailLen);
    await readExactly(fh, tailStart, tailLen, tail, relPath);
    const tv = new DataView(tail.buffer);
    let e = -1;
    for (let p = tailLen - 22; p >= 0; p--) {
      if (tv.getUint32(p, true) === EOCD) { e = p; break; }
    }
    if (e < 0) throw inputError(relPath, `byte ${tailStart}`, 'no end-of-central-directory record: not a zip archive (.npz)');
    if (tv.getUint16(e + 4, true) !== 0 || tv.getUint16(e + 6, true) !== 0) {
      throw inputError(relPath, `byte ${tailStart + e + 4}`, 'multi-disk zip archives are not supported');
    }
    let entries = tv.getUint16(e + 10, true);
    let cdSize = tv.getUint32(e + 12, true);
    let cdOffset = tv.getUint32(e + 16, true);
    const eAbs = tailStart + e;
    if (entries === 0xffff || cdSize === 0xffffffff || cdOffset === 0xffffffff) {
      if (eAbs < 20) throw inputError(relPath, `byte ${eAbs}`, 'ZIP64 locator missing');
      const loc = new Uint8Array(20);
      await readExactly(fh, eAbs - 20, 20, loc, relPath);
      const lv = new DataView(loc.buffer);
      if (lv.getUint32(0, true) !== Z64_LOCATOR) throw inputError(relPath, `byte ${eAbs - 20}`, 'ZIP64 end-of-directory locator missing');
      const recAt = u64(lv, 8, relPath, `byte ${eAbs - 12}`);
      if (recAt + 56 > fileSize) throw inputError(relPath, `byte ${eAbs - 12}`, `ZIP64 end record at byte ${recAt} is outside the file`);
      const rec = new Uint8Array(56);
      await readExactly(fh, recAt, 56, rec, relPath);
      const rv = new DataView(rec.buffer);
      if (rv.getUint32(0, true) !== Z64_EOCD) throw inputError(relPath, `byte ${recAt}`, 'ZIP64 end-of-directory record missing');
      entries = u64(rv, 32, relPath, `byte ${recAt + 32}`);
      cdSize = u64(rv, 40, relPath, `byte ${recAt + 40}`);
      cdOffset = u64(rv, 48, relPath, `byte ${recAt + 48}`);
    }
    if (entries > MAX_ENTRIES) throw inputError(relPath, `byte ${eAbs + 10}`, `${entries} members; at most ${MAX_ENTRIES} allowed`);
    if (cdOffset + cdSize > fileSize || cdSize < entries * 46) {
      throw inputError(relPath, `byte ${eAbs + 12}`, `central directory (${cdSize} bytes at byte ${cdOffset}) does not fit the file (${fileSize} bytes) or its ${entries} entries`);
    }
    const cd = new Uint8Array(cdSize);
    await readExactly(fh, cdOffset, cdSize, cd, relPath);
    const cv = new DataView(cd.buffer);
    const out: ZipEntry[] = [];
    let p = 0;
    for (let i = 0; i < entries; i++) {
      const at = `byte ${cdOffset + p}`;
      if (p + 46 > cdSize || cv.getUint32(p, true) !== CDH) throw inputError(relPath, at, `central directory entry ${i + 1} is missing or damaged`);
      const flags = cv.getUint16(p + 8, true);
      const method = cv.getUint16(p + 10, true);
      let csize = cv.getUint32(p + 20, true);
      let usize = cv.getUint32(p + 24, true);
      const nameLen = cv.getUint16(p + 28, true);
      const extraLen = cv.getUint16(p + 30, true);
      const commentLen = cv.getUint16(p + 32, true);
      let local = cv.getUint32(p + 42, true);
      if (p + 46 + nameLen + extraLen + commentLen > cdSize) throw inputError(relPath, at, `central directory entry ${i + 1} runs past the directory`);
      const name = new TextDecoder(flags & 0x800 ? 'utf-8' : 'latin1').decode(cd.subarray(p + 46, p + 46 + nameLen));
      // ZIP64 extra field (id 1): the 64-bit values, in this order, for each field set to 0xffffffff.
      for (let x = p + 46 + nameLen; x + 4 <= p + 46 + nameLen + extraLen;) {
        const id = cv.getUint16(x, true);
        const len = cv.getUint16(x + 2, true);
        if (x + 4 + len > p + 46 + nameLen + extraLen) break;
        if (id === 1) {
          let q = x + 4;
          const take = (): number => {
            if (q + 8 > x + 4 + len) throw inputError(relPath, `byte ${cdOffset + x}`, `ZIP64 extra field of '${name}' is too short`);
            const v = u64(cv, q, relPath, `byte ${cdOffset + q}`);
            q += 8;
            return v;
          };
          if (usize === 0xffffffff) usize = take();
          if (csize === 0xffffffff) csize = take();
          if (local === 0xffffffff) local = take();
        }
        x += 4 + len;
      }
      if (flags & 1) throw inputError(relPath, at, `member '${name}' is encrypted`);
      if (method !== 0 && method !== 8) throw inputError(relPath, at, `member '${name}' uses compression method ${method}; allowed 0 (stored) and 8 (deflated)`);
      if (method === 0 && csize !== usize) throw inputError(relPath, at, `stored member '${name}' has compressed size ${csize} but size ${usize}`);
      if (local + 30 > fileSize) throw inputError(relPath, at, `member '${name}' local header at byte ${local} is outside the file`);
      const lh = new Uint8Array(30);
      await readExactly(fh, local, 30, lh, relPath);
      const lv = new DataView(lh.buffer);
      if (lv.getUint32(0, true) !== LFH) throw inputError(relPath, `byte ${local}`, `member '${name}' has no local file header`);
      const dataStart = local + 30 + lv.getUint16(26, true) + lv.getUint16(28, true);
      if (dataStart + csize > fileSize) {
        throw inputError(relPath, `byte ${dataStart}`, `member '${name}' data (${csize} bytes at byte ${dataStart}) run past the end of the file (${fileSize} bytes)`);
      }
      out.push({ name, method, compressedSize: csize, uncompressedSize: usize, dataStart });
      p += 46 + nameLen + extraLen + commentLen;
    }
    return out;
  } finally {
    await fh.close();
  }
}

