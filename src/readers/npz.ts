/**
 * NumPy `.npz` archives: a zip (zip.ts) of `.npy` members (numpy `savez`, stored; `savez_compressed`,
 * deflated). Stored members are byte ranges of the file and read with random access like `.npy`;
 * deflated members stream through inflate-source.ts (sequential; going back restarts the stream).
 * For activity, `member` picks one member (name with or without `.npy`), or the archive must hold
 * exactly one. A deflated member whose declared size is more than 1000 × its compressed size must
 * start with a valid `.npy` header whose shape accounts for every declared byte, or it is refused
 * as a likely zip bomb.
 */
import { stat } from 'node:fs/promises';
import type { Layout } from '../manifest/types.ts';
import { fileRange, inputError, type ByteSource } from './byte-source.ts';
import { inflatedSource } from './inflate-source.ts';
import { readNpyHeader, type NpyHeader } from './npy-header.ts';
import { npyActivityFile } from './npy.ts';
import { readZipDirectory, type ZipEntry } from './zip.ts';
import type { ReadableActivityFile } from './activity-file.ts';

export interface NpzMember {
  /** Member name without the `.npy` suffix. */
  name: string;
  entry: ZipEntry;
  src: ByteSource;
  header: NpyHeader;
}

const SUSPICIOUS_RATIO = 1000;

/** Byte source and checked `.npy` header of one member. */
export async function openNpzMember(path: string, relPath: string, entry: ZipEntry): Promise<NpzMember> {
  const name = entry.name.replace(/\.npy$/, '');
  const src = entry.method === 0 ? fileRange(path, relPath, entry.dataStart, entry.uncompressedSize) : inflatedSource(path, relPath, entry);
  try {
    const header = entry.method === 0
      ? await readNpyHeader(src, relPath, entry.dataStart, `member '${entry.name}', `)
      : await readNpyHeader(src, relPath, 0, `member '${entry.name}', inflated `);
    return { name, entry, src, header };
  } catch (err) {
    await src.close();
    const ratio = entry.uncompressedSize / Math.max(1, entry.compressedSize);
    if (entry.method === 8 && ratio > SUSPICIOUS_RATIO && err instanceof Error && err.name === 'InputError') {
      throw inputError(relPath, `member '${entry.name}'`, `member expands ${Math.round(ratio)}:1 and has no valid .npy header (${err.message}): refusing a likely zip bomb`);
    }
    throw err;
  }
}

/** The archive's zip entries, with an error for an archive that holds none. */
export async function npzEntries(path: string, relPath: string): Promise<ZipEntry[]> {
  const { size } = await stat(path);
  const entries = (await readZipDirectory(path, relPath, size)).filter((e) => !e.name.endsWith('/'));
  if (!entries.length) throw inputError(relPath, 'central directory', 'archive holds no members');
  for (const e of entries) {
    if (!e.name.endsWith('.npy')) throw inputError(relPath, `member '${e.name}'`, 'member is not a .npy array; an .npz holds only .npy members');
  }
  return entries;
}

/** Pick the activity member: `member` by name, or the only one. */
export function chooseMember(entries: ZipEntry[], member: string | null, relPath: string): ZipEntry {
  const names = entries.map((e) => e.name.replace(/\.npy$/, ''));
  if (member !== null) {
    const want = member.replace(/\.npy$/, '');
    const i = names.indexOf(want);
    if (i < 0) throw inputError(relPath, `member '${member}'`, `no such member; the archive holds ${names.join(', ')}`, 'set `member` to one of these');
    return entries[i];
  }
  if (entries.length > 1) throw inputError(relPath, 'member', `archive holds ${entries.length} members (${names.slice(0, 10).join(', ')}); say which with \`member\``);
  return entries[0];
}

/** One member of an `.npz` as an activity file. */
export async function openNpzActivity(path: string, relPath: string, layout: Layout, member: string | null): Promise<ReadableActivityFile> {
  const entry = chooseMember(await npzEntries(path, relPath), member, relPath);
  const m = await openNpzMember(path, relPath, entry);
  try {
    return npyActivityFile(m.src, m.header, { path, relPath, layout, where: `member '${entry.name}', shape` });
  } catch (err) {
    await m.src.close();
    throw err;
  }
}
