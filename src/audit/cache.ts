/**
 * The content-hash cache in `<workspace>/.lacuna-cache/` (safe to delete; never committed).
 *
 * - `hashes.json`: SHA-256 of each input file keyed by (path, size, mtime, ctime, inode), so an
 *   unchanged file is not read again just to learn that it is unchanged. The ctime is in the key
 *   because a user cannot set it: an in-place edit of the same size followed by `touch -r`
 *   restores the size, mtime and inode, but moves the ctime. `lacuna build --rehash` ignores
 *   this index and reads every input again.
 * - `datasets/<key>.json`: a computed `DatasetResult`, keyed by a hash of the dataset's file
 *   hashes, its manifest entry, the parameters that affect it and the tool version. Shards of
 *   a cluster build write here; the final render reads from here.
 *
 * Every write goes to a temporary file and is renamed into place, so a reader (or a crash)
 * never sees half an entry; a cache entry that fails to parse is treated as missing.
 *
 * The cache may be shared (a cluster's network file system) and edited by hand, so it is not
 * trusted blindly: every entry carries a digest, SHA-256 of its key and its content (an entry of
 * `hashes.json`: its canonical JSON, `entryDigest`; a dataset: its stored text), checked on read. An entry whose digest does not match is a miss: the file
 * is hashed again or the dataset computed again, and `onReject` is told (the build prints a
 * notice). The digest catches edits and corruption, not a forger who recomputes it: the cache
 * is a shortcut, the record of a version is the thing to trust.
 */
import { createHash } from 'node:crypto';
import { closeSync, constants, existsSync, fstatSync, mkdirSync, openSync, readdirSync, readFileSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { join } from 'node:path';
import type { DatasetResult, FileProvenance } from '../types.ts';
import { canonicalJson } from './versions.ts';

/** SHA-256 over an entry's key and its canonical content, so neither can change unnoticed. */
export function entryDigest(key: string, content: unknown): string {
  return createHash('sha256').update(key).update('\n').update(canonicalJson(content)).digest('hex');
}

/** A temporary file of the cache older than this is a killed writer's leftover. */
export const CACHE_TMP_AGE_MS = 24 * 3600 * 1000;
const CACHE_TMP = /\.json\.tmp-\d+-[a-z0-9]+$/;

/**
 * Remove the cache's temporary files (`*.json.tmp-PID-RANDOM`, written before a rename) that a
 * killed build or shard left, once they are a day old. Shards write without the workspace lock,
 * possibly on other hosts, so a younger one may be a running shard's entry about to be renamed
 * into place; a day is longer than any build. Returns the paths removed, relative to the cache.
 */
export function cleanCacheLeftovers(workspace: string, now = Date.now()): string[] {
  const removed: string[] = [];
  for (const sub of ['', 'datasets', 'hashes.d']) {
    const dir = join(cacheDir(workspace), sub);
    if (!existsSync(dir)) continue;
    for (const name of readdirSync(dir)) {
      if (!CACHE_TMP.test(name)) continue;
      const file = join(dir, name);
      try {
        if (now - statSync(file).mtimeMs < CACHE_TMP_AGE_MS) continue;
        rmSync(file, { force: true });
        removed.push(sub ? `${sub}/${name}` : name);
      } catch {
        // gone meanwhile
      }
    }
  }
  return removed;
}

/** Told about each cache entry that was refused (its file, and why). */
export type OnReject = (file: string, reason: string) => void;

export function cacheDir(workspace: string): string {
  return join(workspace, '.lacuna-cache');
}

function atomicWriteText(file: string, text: string): void {
  mkdirSync(join(file, '..'), { recursive: true });
  const tmp = `${file}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`;
  writeFileSync(tmp, text, { flag: 'wx' });
  renameSync(tmp, file);
}

function atomicWriteJson(file: string, value: unknown): void {
  atomicWriteText(file, JSON.stringify(value));
}

/**
 * A cache file's text, never through a symbolic link (a cache handed over with the workspace may
 * hold links to files outside it: O_NOFOLLOW makes opening one fail, and it reads as missing),
 * and never from a FIFO or device (O_NONBLOCK: opening one does not wait; it is not a file).
 */
function readCacheText(file: string): string | null {
  let fd: number;
  try {
    fd = openSync(file, constants.O_RDONLY | (constants.O_NOFOLLOW ?? 0) | (constants.O_NONBLOCK ?? 0));
  } catch {
    return null;
  }
  try {
    return fstatSync(fd).isFile() ? readFileSync(fd, 'utf8') : null;
  } finally {
    closeSync(fd);
  }
}

function readJson<T>(file: string): T | null {
  const text = readCacheText(file);
  if (text === null) return null;
  try {
    return JSON.parse(text) as T;
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

type HashStat = { size: number; mtimeMs: number; ctimeMs: number; ino: number; sha256: string };
type HashEntry = HashStat & { digest: string };

/** A file whose SHA-256 must be computed, with the stat it had when planned. */
export interface FileToHash {
  abs: string;
  rel: string;
  size: number;
  mtimeMs: number;
  ctimeMs: number;
  ino: number;
  /**
   * Its content is certainly not what was hashed under this path before: the index has no
   * (valid) entry for the path, or one of another size. Every dataset holding it misses the
   * dataset cache, whose keys hold each file's path and hash, so the build may hash it in the
   * pass that measures it. False under `rehash`, and for a file whose size is unchanged (a
   * `touch`, a copy that kept the bytes): hashing first may still find its dataset cached.
   */
  fresh: boolean;
}

function hashEntry(rel: string, s: HashStat): HashEntry {
  const stat = { size: s.size, mtimeMs: s.mtimeMs, ctimeMs: s.ctimeMs, ino: s.ino, sha256: s.sha256 };
  return { ...stat, digest: entryDigest(rel, stat) };
}

/**
 * Which of `files` need hashing: those whose size, mtime, ctime or inode changed since they were
 * last hashed (or never were, or whose entry fails its digest; all of them with `rehash`). The
 * others' provenance comes from `hashes.json` without reading them.
 */
export function planHashes(
  workspace: string,
  files: { abs: string; rel: string }[],
  options: { rehash?: boolean; onReject?: OnReject } = {},
): { known: Map<string, FileProvenance>; toHash: FileToHash[] } {
  const store = join(cacheDir(workspace), 'hashes.json');
  const index = options.rehash ? {} : readHashIndex(workspace).entries;
  const known = new Map<string, FileProvenance>();
  const toHash: FileToHash[] = [];
  const planned = new Set<string>();
  for (const f of files) {
    if (known.has(f.rel) || planned.has(f.rel)) continue;
    const st = statSync(f.abs);
    let k: HashEntry | undefined = Object.hasOwn(index, f.rel) ? index[f.rel] : undefined;
    let rejected = false;
    if (k && !validEntry(f.rel, k)) {
      options.onReject?.(store, `the entry of ${f.rel} does not match its digest`);
      k = undefined;
      rejected = true;
    }
    if (k && k.size === st.size && k.mtimeMs === st.mtimeMs && k.ctimeMs === st.ctimeMs && k.ino === st.ino) known.set(f.rel, { path: f.rel, sha256: k.sha256, bytes: st.size });
    else {
      const fresh = !options.rehash && !rejected && (!k || k.size !== st.size);
      toHash.push({ abs: f.abs, rel: f.rel, size: st.size, mtimeMs: st.mtimeMs, ctimeMs: st.ctimeMs, ino: st.ino, fresh });
      planned.add(f.rel);
    }
  }
  return { known, toHash };
}

function validEntry(rel: string, k: unknown): k is HashEntry {
  return !!k && typeof k === 'object' && (k as HashEntry).digest === hashEntry(rel, k as HashEntry).digest;
}

/**
 * Shards of a cluster build run at the same time without the workspace lock, so each writes the
 * hashes it learnt to a file of its own under `hashes.d/` (a read-merge-write of one shared
 * `hashes.json` would lose another shard's entries, and a lost entry now costs a dataset's
 * computation, not only a read: see `fresh`). Readers take `hashes.json`, then every fragment
 * over it; a plain build, which holds the lock, folds the fragments it read into `hashes.json`
 * and removes them.
 */
function fragmentDir(workspace: string): string {
  return join(cacheDir(workspace), 'hashes.d');
}

function readHashIndex(workspace: string): { entries: Record<string, HashEntry>; fragments: string[] } {
  const entries: Record<string, HashEntry> = Object.assign(Object.create(null), readJson<Record<string, HashEntry>>(join(cacheDir(workspace), 'hashes.json')) ?? {});
  const dir = fragmentDir(workspace);
  const fragments = existsSync(dir) ? readdirSync(dir).filter((n) => n.endsWith('.json')).sort().map((n) => join(dir, n)) : [];
  for (const file of fragments) {
    const part = readJson<Record<string, HashEntry>>(file);
    if (!part || typeof part !== 'object') continue;
    for (const [rel, e] of Object.entries(part)) if (validEntry(rel, e)) entries[rel] = e;
  }
  return { entries, fragments };
}

/**
 * Record freshly computed hashes: merged into `hashes.json` (atomic), or, for a shard
 * (`fragment`), into a new file of its own under `hashes.d/`.
 */
export function recordHashes(workspace: string, hashed: { file: FileToHash; sha256: string }[], options: { fragment?: boolean } = {}): void {
  // With nothing new, a plain build still folds what shards left, so fragments do not pile up.
  if (!hashed.length && (options.fragment || !existsSync(fragmentDir(workspace)) || !readdirSync(fragmentDir(workspace)).length)) return;
  const fresh: Record<string, HashEntry> = Object.create(null); // (a path may be any string, even "__proto__")
  for (const { file, sha256 } of hashed) fresh[file.rel] = hashEntry(file.rel, { ...file, sha256 });
  if (options.fragment) {
    atomicWriteJson(join(fragmentDir(workspace), `${process.pid}-${Date.now()}-${Math.random().toString(36).slice(2)}.json`), fresh);
    return;
  }
  const { entries, fragments } = readHashIndex(workspace);
  atomicWriteJson(join(cacheDir(workspace), 'hashes.json'), Object.assign(entries, fresh));
  for (const f of fragments) rmSync(f, { force: true });
}

export function datasetCacheKey(parts: { files: FileProvenance[]; entry: unknown; parameters: unknown; toolVersion: string }): string {
  return createHash('sha256').update(canonicalJson(parts)).digest('hex');
}

/**
 * A dataset entry on disk is two lines: a header `{ format, key, digest }`, then the result's
 * JSON text; `digest` is SHA-256 of the key, a newline and that text. Hashing the text as
 * stored (rather than a canonical form of the parsed value) keeps a cached read cheap.
 */
const DATASET_FORMAT = 'lacuna-cache-dataset/2';

function textDigest(key: string, text: string): string {
  return createHash('sha256').update(key).update('\n').update(text).digest('hex');
}

export function readCachedDataset(workspace: string, key: string, onReject?: OnReject): DatasetResult | null {
  const file = join(cacheDir(workspace), 'datasets', `${key}.json`);
  if (!existsSync(file)) return null;
  let result: DatasetResult | null = null;
  try {
    const text = readCacheText(file);
    if (text === null) throw new Error('not a regular file');
    const nl = text.indexOf('\n');
    const head = JSON.parse(text.slice(0, nl)) as { format?: unknown; key?: unknown; digest?: unknown };
    const body = text.slice(nl + 1);
    if (nl > 0 && head.format === DATASET_FORMAT && head.key === key && head.digest === textDigest(key, body)) {
      const r = JSON.parse(body) as DatasetResult;
      if (r && r.cacheKey === key) result = r;
    }
  } catch {
    // not our layout: refused below
  }
  if (!result) onReject?.(file, 'the entry does not match its digest (edited, damaged, or written by an older Lacuna)');
  return result;
}

export function writeCachedDataset(workspace: string, result: DatasetResult): void {
  const body = JSON.stringify(result);
  const head = JSON.stringify({ format: DATASET_FORMAT, key: result.cacheKey, digest: textDigest(result.cacheKey, body) });
  atomicWriteText(join(cacheDir(workspace), 'datasets', `${result.cacheKey}.json`), `${head}\n${body}`);
}
