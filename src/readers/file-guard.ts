/**
 * Guard against input files changing while a dataset is read, when the caller hashed the files
 * already (the build's input hashes) and the readers do not hash them again.
 *
 * At open, each file's identity is taken from `stat`: size, modification time, status-change time
 * and inode. Its size must equal the hashed `bytes` (and, when the caller says which modification
 * time and inode it hashed, those too). After each full pass over the data, `check()` stats the
 * files again: any difference means the bytes read may not be the bytes hashed, and is an
 * InputError naming the file. Cost: one `stat` per file at open and per pass; no data read.
 * A change that keeps size, both times and inode (possible only by resetting the clock or the
 * times by hand) is not seen; hashing the bytes as they are read would catch it, at a hash's cost.
 */
import { stat } from 'node:fs/promises';
import type { FileProvenance } from '../types.ts';
import { InputError, InternalError } from '../errors.ts';

/** Provenance the caller computed, optionally with the `stat` values it hashed under. */
export type HashedFile = FileProvenance & { mtimeMs?: number; ino?: number };

interface Stamp {
  size: number;
  mtimeMs: number;
  ctimeMs: number;
  ino: number;
}

export interface FileGuard {
  /** Stat every file again; throws an InputError for the first that changed since open. */
  check(): Promise<void>;
}

const RERUN = 'run the build again';

function changed(relPath: string, what: string): InputError {
  return new InputError(`changed while it was being read (${what}); ${RERUN}`, { file: relPath, where: 'file' });
}

async function stampOf(path: string): Promise<Stamp> {
  const s = await stat(path);
  return { size: s.size, mtimeMs: s.mtimeMs, ctimeMs: s.ctimeMs, ino: s.ino };
}

function difference(a: Stamp, b: Stamp): string | null {
  if (a.size !== b.size) return `size ${a.size} → ${b.size} bytes`;
  if (a.ino !== b.ino) return 'replaced by another file';
  if (a.mtimeMs !== b.mtimeMs || a.ctimeMs !== b.ctimeMs) return 'modification time changed';
  return null;
}

/**
 * Check `provenance` against the dataset's files (same order, same workspace-relative paths, or an
 * InternalError: the caller's bug) and record each file's identity now.
 */
export async function guardFiles(files: string[], relFiles: string[], provenance: HashedFile[]): Promise<FileGuard> {
  if (provenance.length !== files.length || provenance.some((p, i) => p.path !== relFiles[i])) {
    throw new InternalError(`provenance (${provenance.map((p) => p.path).join(', ')}) does not match the dataset's files (${relFiles.join(', ')})`);
  }
  const stamps: Stamp[] = [];
  for (let i = 0; i < files.length; i++) {
    const s = await stampOf(files[i]);
    const p = provenance[i];
    if (s.size !== p.bytes) throw changed(relFiles[i], `hashed at ${p.bytes} bytes, now ${s.size}`);
    if ((p.ino !== undefined && p.ino !== s.ino) || (p.mtimeMs !== undefined && p.mtimeMs !== s.mtimeMs)) {
      throw changed(relFiles[i], 'modified or replaced since it was hashed');
    }
    stamps.push(s);
  }
  return {
    async check() {
      for (let i = 0; i < files.length; i++) {
        let now: Stamp;
        try {
          now = await stampOf(files[i]);
        } catch (err) {
          throw new InputError(`changed while it was being read (cannot stat it now); ${RERUN}`, { file: relFiles[i], where: 'file', cause: err });
        }
        const d = difference(stamps[i], now);
        if (d) throw changed(relFiles[i], d);
      }
    },
  };
}
