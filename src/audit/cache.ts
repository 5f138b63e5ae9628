/**
 * The content-hash cache in `<workspace>/.lacuna-cache/` (safe to delete; never committed).
 *
 * - `hashes.json`: SHA-256 of each input file keyed by (path, size, mtime, inode), so an
 *   unchanged file is not read again just to learn that it is unchanged.
 * - `datasets/<key>.json`: a computed `DatasetResult`, keyed by a hash of the dataset's file
 *   hashes, its manifest entry, the parameters that affect it and the tool version. Shards of
 *   a cluster build write here; the final render reads from here.
 *
 * Every write goes to a temporary file and is renamed into place, so a reader (or a crash)
 * never sees half an entry; a cache entry that fails to parse is treated as missing.
 */
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { join } from 'node:path';
import type { DatasetResult, FileProvenance } from '../types.ts';
import { canonicalJson } from './versions.ts';

export function cacheDir(workspace: string): string {
  return join(workspace, '.lacuna-cache');
}

function atomicWriteJson(file: string, value: unknown): void {
  mkdirSync(join(file, '..'), { recursive: true });
  const tmp = `${file}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`;
  writeFileSync(tmp, JSON.stringify(value));
  renameSync(tmp, file);
}

function readJson<T>(file: string): T | null {
  if (!existsSync(file)) return null;
  try {
    return JSON.parse(readFileSync(file, 'utf8')) as T;
  } catch {
    return null;
  }
}

/**
 * SHA-256 of a file, read in 4 MiB pieces into one reused buffer (a read stream allocates a fresh
 * buffer per piece, and first touch of new memory is slow on small VMs).
 */
export async function sha256File(path: string, onBytes?: (n: number) => void): Promise<string> {
  const hash = createHash('sha256');
  const fh = await open(path, 'r');
  try {
    // 4 MiB or the file's size if smaller: hashing a folder of many small files stays cheap.
    const buf = new Uint8Array(Math.max(1, Math.min(4 << 20, (await fh.stat()).size)));
    for (let pos = 0; ; ) {
      const { bytesRead } = await fh.read(buf, 0, buf.length, pos);
      if (bytesRead === 0) break;
      hash.update(buf.subarray(0, bytesRead));
      pos += bytesRead;
      onBytes?.(bytesRead);
    }
  } finally {
    await fh.close();
  }
  return hash.digest('hex');
}

type HashEntry = { size: number; mtimeMs: number; ino: number; sha256: string };

/** A file whose SHA-256 must be computed, with the stat it had when planned. */
export interface FileToHash {
  abs: string;
  rel: string;
  size: number;
  mtimeMs: number;
  ino: number;
}

/**
 * Which of `files` need hashing: those whose size, mtime or inode changed since they were last
 * hashed (or never were). The others' provenance comes from `hashes.json` without reading them.
 */
export function planHashes(workspace: string, files: { abs: string; rel: string }[]): { known: Map<string, FileProvenance>; toHash: FileToHash[] } {
  const index = readJson<Record<string, HashEntry>>(join(cacheDir(workspace), 'hashes.json')) ?? {};
  const known = new Map<string, FileProvenance>();
  const toHash: FileToHash[] = [];
  const planned = new Set<string>();
  for (const f of files) {
    if (known.has(f.rel) || planned.has(f.rel)) continue;
    const st = statSync(f.abs);
    const k = index[f.rel];
    if (k && k.size === st.size && k.mtimeMs === st.mtimeMs && k.ino === st.ino) known.set(f.rel, { path: f.rel, sha256: k.sha256, bytes: st.size });
    else {
      toHash.push({ abs: f.abs, rel: f.rel, size: st.size, mtimeMs: st.mtimeMs, ino: st.ino });
      planned.add(f.rel);
    }
  }
  return { known, toHash };
}

/** Record freshly computed hashes in `hashes.json` (merged with what is there now; atomic). */
export function recordHashes(workspace: string, hashed: { file: FileToHash; sha256: string }[]): void {
  if (!hashed.length) return;
  const store = join(cacheDir(workspace), 'hashes.json');
  const merged = readJson<Record<string, HashEntry>>(store) ?? {};
  for (const { file, sha256 } of hashed) merged[file.rel] = { size: file.size, mtimeMs: file.mtimeMs, ino: file.ino, sha256 };
  atomicWriteJson(store, merged);
}

export function datasetCacheKey(parts: { files: FileProvenance[]; entry: unknown; parameters: unknown; toolVersion: string }): string {
  return createHash('sha256').update(canonicalJson(parts)).digest('hex');
}

export function readCachedDataset(workspace: string, key: string): DatasetResult | null {
  const r = readJson<DatasetResult>(join(cacheDir(workspace), 'datasets', `${key}.json`));
  return r && r.cacheKey === key ? r : null;
}

export function writeCachedDataset(workspace: string, result: DatasetResult): void {
  atomicWriteJson(join(cacheDir(workspace), 'datasets', `${result.cacheKey}.json`), result);
}
