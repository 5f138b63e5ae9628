/**
 * Provenance handed in by the caller (src/readers/file-guard.ts): the files are not hashed again,
 * and a file changed while a dataset is read is an InputError naming it. Sources: the values
 * written (round trip) and SHA-256 from node:crypto over the whole file (FIPS 180-4 via OpenSSL).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { createHash } from 'node:crypto';
import { appendFileSync, readFileSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { openDataset, type HashedFile } from '../../src/readers/index.ts';
import type { ActivitySource } from '../../src/types.ts';
import { dataset, readAll, tempDir, errorOf, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };

/** Write 4 units × 100 float32 bins valued i, and the provenance node:crypto gives it. */
function fixture(name: string): { path: string; values: Float32Array; prov: HashedFile[] } {
  const path = join(tmp.dir, name);
  const values = Float32Array.from({ length: 400 }, (_, i) => i);
  writeNpy(path, values, [4, 100]);
  const bytes = readFileSync(path);
  return { path, values, prov: [{ path: name, sha256: createHash('sha256').update(bytes).digest('hex'), bytes: bytes.length }] };
}

async function openActivity(path: string, prov?: HashedFile[]): Promise<ActivitySource> {
  const src = await openDataset(dataset(tmp.dir, [path], 'npy'), prov ? { ...ctx, provenance: prov } : ctx);
  if (src.kind !== 'activity') throw new Error('kind');
  return src;
}

/** Read the first block (one unit: 400 bytes per block), let `change` run, then read the rest. */
async function changeMidPass(src: ActivitySource, change: () => void): Promise<void> {
  let first = true;
  for await (const _b of src.blocks({ maxBlockBytes: 400 })) {
    if (first) change();
    first = false;
  }
}

describe('provenance given by the caller', () => {
  it('is used as the files list as given, without hashing again', async () => {
    const f = fixture('p.npy');
    // A digest no file has: had the reader hashed the file, it would report the real one.
    const given = [{ ...f.prov[0], sha256: '0'.repeat(64) }];
    const src = await openActivity(f.path, given);
    expect(src.files).toEqual(given);
    expect(firstDifference(await readAll(src), f.values)).toBe(-1);
    expect(firstDifference(await readAll(src), f.values)).toBe(-1); // unchanged file: a second pass passes the guard too
    const hashed = await openActivity(f.path);
    expect(hashed.files).toEqual(f.prov); // without provenance: hashed while opening, as before
  });

  it('drops extra stat fields from the reported provenance', async () => {
    const f = fixture('q.npy');
    const st = statSync(f.path);
    const src = await openActivity(f.path, [{ ...f.prov[0], mtimeMs: st.mtimeMs, ino: st.ino }]);
    expect(src.files).toEqual(f.prov);
  });

  it('refuses a file rewritten in place (same size) during a pass, naming it', async () => {
    const f = fixture('r.npy');
    const src = await openActivity(f.path, f.prov);
    const e = await errorOf(() => changeMidPass(src, () => {
      writeFileSync(f.path, readFileSync(f.path).fill(1, 200)); // same inode (truncate and write), same size
      utimesSync(f.path, new Date(2001, 0, 1), new Date(2001, 0, 1)); // a modification time surely different
    }));
    expect(e.name).toBe('InputError');
    expect(e.file).toBe('r.npy');
    expect(e.message).toMatch(/^r\.npy, file: changed while it was being read \(modification time changed\); run the build again$/);
  });

  it('refuses a file that grew during a pass, saying by how much', async () => {
    const f = fixture('s.npy');
    const src = await openActivity(f.path, f.prov);
    const e = await errorOf(() => changeMidPass(src, () => appendFileSync(f.path, Buffer.alloc(8))));
    expect(e.message).toMatch(/s\.npy.*size 1728 → 1736 bytes.*run the build again/); // 128-byte header + 400 × 4
  });

  it('refuses a file replaced by another (new inode) during a pass', async () => {
    const f = fixture('t.npy');
    const src = await openActivity(f.path, f.prov);
    const st = statSync(f.path);
    const e = await errorOf(() => changeMidPass(src, () => {
      writeNpy(f.path, f.values, [4, 100]); // identical bytes, written to a new name and renamed over
      utimesSync(f.path, st.atime, st.mtime);
    }));
    expect(e.message).toMatch(/t\.npy.*replaced by another file/);
  });

  it('refuses at open a file whose size differs from the hashed size, or that was replaced since', async () => {
    const f = fixture('u.npy');
    const e = await errorOf(() => openActivity(f.path, [{ ...f.prov[0], bytes: f.prov[0].bytes + 1 }]));
    expect(e.message).toMatch(/u\.npy.*hashed at 1729 bytes, now 1728/);
    const e2 = await errorOf(() => openActivity(f.path, [{ ...f.prov[0], ino: statSync(f.path).ino + 1 }]));
    expect(e2.message).toMatch(/u\.npy.*modified or replaced since it was hashed/);
  });

  it('treats provenance for other files as a bug, not an input problem', async () => {
    const f = fixture('v.npy');
    const e = await errorOf(() => openActivity(f.path, [{ ...f.prov[0], path: 'other.npy' }]));
    expect(e.name).toBe('InternalError');
  });

  it('guards weights too: a tensor file changed while tensors are read', async () => {
    const f = fixture('w.npy');
    const src = await openDataset(dataset(tmp.dir, [f.path], 'npy'), { ...ctx, kind: 'weights', provenance: f.prov });
    if (src.kind !== 'weights') throw new Error('kind');
    expect(src.files).toEqual(f.prov);
    const e = await errorOf(async () => {
      for await (const t of src.tensors()) {
        expect(firstDifference(t.data, f.values)).toBe(-1);
        appendFileSync(f.path, Buffer.alloc(4));
      }
    });
    expect(e.message).toMatch(/w\.npy.*changed while it was being read/);
  });
});
