/**
 * Builds small zip archives by hand for the `.npz` tests, following PKWARE's APPNOTE.TXT 6.3
 * (local header 4.3.7, central directory header 4.3.12, ZIP64 extra field 4.5.3, ZIP64 end
 * record 4.3.14, locator 4.3.15, end record 4.3.16). CRC fields are left 0 (the reader does not
 * check them; Lacuna records each file's SHA-256 instead).
 */
import { deflateSync } from 'fflate';

export interface BuildEntry { name: string; data: Uint8Array; deflate?: boolean }

export function buildZip(entries: BuildEntry[], opts: { zip64?: boolean } = {}): Buffer {
  const parts: Buffer[] = [];
  const central: Buffer[] = [];
  let offset = 0;
  for (const e of entries) {
    const body = Buffer.from(e.deflate ? deflateSync(e.data, { level: 9 }) : e.data);
    const name = Buffer.from(e.name, 'utf8');
    const lh = Buffer.alloc(30);
    lh.writeUInt32LE(0x04034b50, 0);
    lh.writeUInt16LE(45, 4);
    lh.writeUInt16LE(e.deflate ? 8 : 0, 8);
    lh.writeUInt32LE(body.length, 18);
    lh.writeUInt32LE(e.data.length, 22);
    lh.writeUInt16LE(name.length, 26);
    parts.push(lh, name, body);
    const extra = Buffer.alloc(opts.zip64 ? 28 : 0);
    if (opts.zip64) {
      extra.writeUInt16LE(1, 0);
      extra.writeUInt16LE(24, 2);
      extra.writeBigUInt64LE(BigInt(e.data.length), 4);
      extra.writeBigUInt64LE(BigInt(body.length), 12);
      extra.writeBigUInt64LE(BigInt(offset), 20);
    }
    const ch = Buffer.alloc(46);
    ch.writeUInt32LE(0x02014b50, 0);
    ch.writeUInt16LE(45, 4);
    ch.writeUInt16LE(45, 6);
    ch.writeUInt16LE(e.deflate ? 8 : 0, 10);
    const big = opts.zip64 ? 0xffffffff : -1;
    ch.writeUInt32LE(big >= 0 ? big : body.length, 20);
    ch.writeUInt32LE(big >= 0 ? big : e.data.length, 24);
    ch.writeUInt16LE(name.length, 28);
    ch.writeUInt16LE(extra.length, 30);
    ch.writeUInt32LE(big >= 0 ? big : offset, 42);
    central.push(ch, name, extra);
    offset += 30 + name.length + body.length;
  }
  const cd = Buffer.concat(central);
  const cdOffset = offset;
  const tail: Buffer[] = [];
  const eocd = Buffer.alloc(22);
  eocd.writeUInt32LE(0x06054b50, 0);
  if (opts.zip64) {
    const rec = Buffer.alloc(56);
    rec.writeUInt32LE(0x06064b50, 0);
    rec.writeBigUInt64LE(44n, 4);
    rec.writeUInt16LE(45, 12);
    rec.writeUInt16LE(45, 14);
    rec.writeBigUInt64LE(BigInt(entries.length), 24);
    rec.writeBigUInt64LE(BigInt(entries.length), 32);
    rec.writeBigUInt64LE(BigInt(cd.length), 40);
    rec.writeBigUInt64LE(BigInt(cdOffset), 48);
    const loc = Buffer.alloc(20);
    loc.writeUInt32LE(0x07064b50, 0);
    loc.writeBigUInt64LE(BigInt(cdOffset + cd.length), 8);
    loc.writeUInt32LE(1, 16);
    tail.push(rec, loc);
    eocd.writeUInt16LE(0xffff, 8);
    eocd.writeUInt16LE(0xffff, 10);
    eocd.writeUInt32LE(0xffffffff, 12);
    eocd.writeUInt32LE(0xffffffff, 16);
  } else {
    eocd.writeUInt16LE(entries.length, 8);
    eocd.writeUInt16LE(entries.length, 10);
    eocd.writeUInt32LE(cd.length, 12);
    eocd.writeUInt32LE(cdOffset, 16);
  }
  tail.push(eocd);
  return Buffer.concat([...parts, cd, ...tail]);
}

/** Overwrite the uncompressed size of the first central-directory entry (non-ZIP64 archives). */
export function patchDeclaredSize(zip: Buffer, size: number): Buffer {
  const out = Buffer.from(zip);
  const at = out.indexOf(Buffer.from([0x50, 0x4b, 0x01, 0x02]));
  out.writeUInt32LE(size, at + 24);
  return out;
}
