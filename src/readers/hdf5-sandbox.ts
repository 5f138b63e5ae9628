/**
 * An HDF5 library that can see one file and nothing else.
 *
 * h5wasm's Node build gives the HDF5 C library Emscripten's raw Node filesystem, so any path a
 * file names (HDF5 external storage, external links, virtual-dataset sources, filter plugins) is
 * opened on the machine. This module loads h5wasm's browser build instead, whose only filesystem
 * is Emscripten's in-memory one, and serves each untrusted file there as a read-only node whose
 * reads are answered from that one file's descriptor (`fs.readSync`, on demand: nothing is
 * loaded whole). The in-memory filesystem is emptied of Emscripten's default devices
 * (/dev/random, /dev/tty …), and every `open` of any other path is refused (ENOENT) and
 * recorded, so a missed check still cannot read a byte from outside the file, and the attempt
 * becomes an InputError naming what was tried (see `guarded`).
 *
 * The HDF5 library's diagnostics (its default error handler prints to stderr) are captured, not
 * printed: `guarded` turns any diagnostic printed during an operation into an InputError, since
 * HDF5 prints one exactly when a library call failed (a filter that cannot decode a chunk, a
 * truncated file) and h5wasm's `slice` ignores the failure and returns whatever was in memory.
 */
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { randomUUID } from 'node:crypto';
import h5wasm from 'h5wasm';
import type { File as H5File } from 'h5wasm';
import { InputError } from '../errors.ts';

/** The slice of Emscripten's FS API used here. */
interface EmFS {
  open(path: string, flags: number | string, mode?: number): unknown;
  mkdir(path: string): unknown;
  rmdir(path: string): void;
  unlink(path: string): void;
  readdir(path: string): string[];
  createFile(parent: string, name: string, props: object, canRead: boolean, canWrite: boolean): EmNode;
  streams: ({ stream_ops: Record<string, unknown> } | null)[];
  ErrnoError: new (errno: number) => Error;
}
interface EmNode {
  usedBytes: number;
  contents: unknown;
  stream_ops: Record<string, unknown>;
}
interface H5Module {
  FS: EmFS;
}

const ENOENT = 44; // Emscripten's errno numbering (musl)
const EIO = 29;
const EACCES = 2;
/** Most diagnostic text kept for an error message. */
const MAX_DIAGNOSTIC = 4000;

interface Sandbox {
  fs: EmFS;
  /** The one path the library may open at the moment (set while a file is being opened or read). */
  allowed: Set<string>;
  /** Paths the library tried to open and was refused, since the last reset. */
  refused: string[];
  /** Diagnostic text the library printed since the last reset. */
  diagnostics: string;
  /** The diagnostics of the last guarded operation. */
  lastDiagnostics: string;
}

/** Names of the sandbox directories in use (a refused path under one is the library's own retry, not what the file named). */
const served = new Set<string>();

/** What kind of outside reference the library's diagnostics show. */
function outsideKind(diag: string): string {
  if (/External file list|H5D__efl/.test(diag)) return 'HDF5 external storage: the dataset\'s bytes are in a raw file elsewhere';
  if (/H5D__virtual|virtual/i.test(diag)) return 'a virtual dataset whose source is another file';
  if (/H5L__extern|external link/i.test(diag)) return 'an HDF5 external link';
  return 'external storage, an external link or a virtual dataset';
}

let sandbox: Promise<Sandbox> | null = null;
let loaded: Sandbox | null = null;

/** Remove everything Emscripten put in its in-memory filesystem, except the root. */
function emptyTree(fs: EmFS, dir: string): void {
  for (const name of fs.readdir(dir)) {
    if (name === '.' || name === '..') continue;
    const p = dir === '/' ? `/${name}` : `${dir}/${name}`;
    try {
      fs.unlink(p);
    } catch {
      try {
        emptyTree(fs, p);
        fs.rmdir(p);
      } catch {
        /* a mount point (/proc/self/fd): left, it lists only the library's own descriptors */
      }
    }
  }
}

async function init(): Promise<Sandbox> {
  const mod = (await h5wasm.ready) as unknown as H5Module;
  const fs = mod.FS;
  const sb: Sandbox = { fs, allowed: new Set(), refused: [], diagnostics: '', lastDiagnostics: '' };
  loaded = sb;
  // Capture stderr (descriptor 2) before emptying /dev: the stream stays open on its node.
  const err = fs.streams[2];
  if (err) {
    err.stream_ops = {
      ...err.stream_ops,
      write(_stream: unknown, buffer: Uint8Array, offset: number, length: number): number {
        if (sb.diagnostics.length < MAX_DIAGNOSTIC) sb.diagnostics += Buffer.from(buffer.buffer, buffer.byteOffset + offset, length).toString('utf8');
        return length;
      },
    };
  }
  emptyTree(fs, '/');
  const open = fs.open.bind(fs);
  fs.open = (path: string, flags: number | string, mode?: number) => {
    if (typeof path === 'string' && sb.allowed.has(path)) return open(path, flags, mode);
    if (sb.refused.length < 16) sb.refused.push(String(path)); // a few suffice to name them; a file could ask millions of times
    throw new fs.ErrnoError(ENOENT);
  };
  return sb;
}

function ready(): Promise<Sandbox> {
  sandbox ??= init();
  return sandbox;
}

/** Serve `fd` (a regular file of `size` bytes) read-only at a fresh, unguessable path. */
function serve(sb: Sandbox, fd: number, size: number): { path: string; remove: () => void } {
  const name = randomUUID();
  const dir = `/${name}`;
  sb.fs.mkdir(dir);
  served.add(name);
  const node = sb.fs.createFile(dir, 'input.h5', {}, true, false);
  const base = node.stream_ops;
  node.contents = null;
  node.usedBytes = size;
  node.stream_ops = {
    llseek: base.llseek,
    read(_stream: unknown, buffer: Uint8Array, offset: number, length: number, position: number): number {
      if (position >= size) return 0;
      const want = Math.min(length, size - position);
      let got = 0;
      try {
        while (got < want) {
          const n = readSync(fd, buffer, offset + got, want - got, position + got);
          if (n === 0) break;
          got += n;
        }
      } catch {
        throw new sb.fs.ErrnoError(EIO);
      }
      return got;
    },
    write(): number {
      throw new sb.fs.ErrnoError(EACCES);
    },
  };
  const path = `${dir}/input.h5`;
  return {
    path,
    remove() {
      served.delete(name);
      try {
        sb.fs.unlink(path);
        sb.fs.rmdir(dir);
      } catch {
        /* already removed */
      }
    },
  };
}

const cleanups = new Map<H5File, () => void>();

/**
 * Open `path` read-only in the sandbox. The returned file must be closed with `closeSandboxed`.
 * The library may open only this file's sandbox path, and only during this call and `guarded`
 * operations on it. Throws InputError when the library cannot open it.
 */
export async function openSandboxed(path: string, relPath: string): Promise<H5File> {
  const sb = await ready();
  let fd: number;
  try {
    fd = openSync(path, 'r');
  } catch (cause) {
    throw new InputError('cannot read the file', { file: relPath, cause });
  }
  const st = fstatSync(fd);
  if (!st.isFile()) {
    closeSync(fd);
    throw new InputError('not a regular file', { file: relPath });
  }
  const served = serve(sb, fd, st.size);
  const cleanup = (): void => {
    sb.allowed.delete(served.path);
    served.remove();
    try {
      closeSync(fd);
    } catch {
      /* closed */
    }
  };
  let file: H5File;
  try {
    file = guarded(relPath, '/', () => {
      sb.allowed.add(served.path);
      try {
        return new h5wasm.File(served.path, 'r');
      } finally {
        sb.allowed.delete(served.path);
      }
    });
  } catch (cause) {
    cleanup();
    if (cause instanceof InputError) throw cause;
    throw new InputError('the HDF5 library could not open the file', { file: relPath, cause });
  }
  if (typeof file.file_id === 'bigint' && file.file_id < 0n) {
    cleanup();
    throw new InputError('the HDF5 library could not open the file (damaged or truncated HDF5)', { file: relPath });
  }
  cleanups.set(file, cleanup);
  return file;
}

/** Close a sandboxed file and release its descriptor; a second close is ignored. */
export function closeSandboxed(file: H5File | null): void {
  if (!file) return;
  try {
    file.close();
  } catch {
    /* already closed */
  }
  cleanups.get(file)?.();
  cleanups.delete(file);
}

/**
 * Run one library operation on an open sandboxed file and refuse its result when the library
 * tried to open any other file (external storage, an external link, a virtual dataset's
 * source, a filter plugin) or reported an error. `where` is the HDF5 object path named in the
 * InputError. `lookup: true` is for link lookups whose answer already says "absent" (h5wasm's
 * link queries make the library print a diagnostic for a missing name): their diagnostics are
 * ignored, but an attempt to open another file is still refused. Synchronous: h5wasm calls
 * are, so no other operation can interleave.
 */
export function guarded<T>(relPath: string, where: string, op: () => T, opts: { lookup?: boolean } = {}): T {
  const sb = current();
  sb.refused = [];
  sb.diagnostics = '';
  let result: T;
  let thrown: unknown = null;
  try {
    result = op();
  } catch (e) {
    thrown = e;
  }
  const refused = [...new Set(sb.refused)];
  sb.lastDiagnostics = sb.diagnostics;
  const diag = opts.lookup ? '' : sb.diagnostics.trim();
  sb.refused = [];
  sb.diagnostics = '';
  if (refused.length > 0) {
    const named = refused.filter((p) => !served.has(p.split('/')[1])).slice(0, 3);
    const shown = (named.length ? named : refused.slice(0, 1)).map((p) => JSON.stringify(p)).join(', ');
    throw new InputError(`refused: reading this object needs ${shown}, outside this file (${outsideKind(sb.lastDiagnostics)}); Lacuna reads only the file itself, so nothing from this read is used`, {
      file: relPath,
      where,
      hint: 'store the data inside the NWB file (e.g. h5repack), without external files or links',
    });
  }
  if (diag) {
    throw new InputError(`the HDF5 library reported an error reading this object, so nothing from this read is used: ${firstLines(diag)}`, {
      file: relPath,
      where,
      hint: 'the file may be damaged (a corrupt compressed chunk, a truncated file); re-export it',
      cause: thrown ?? undefined,
    });
  }
  if (thrown !== null) throw thrown;
  return result!;
}

/** The most telling lines of HDF5's error stack (the innermost "…(): message" entries), on one line. */
function firstLines(diag: string): string {
  const msgs = diag
    .split('\n')
    .map((l) => /^\s*#\d+:.*?\bin (\w+\(\)): (.*)$/.exec(l))
    .filter((m): m is RegExpExecArray => m !== null)
    .map((m) => `${m[1]}: ${m[2]}`);
  const text = msgs.length ? msgs.slice(-3).join('; ') : diag.replace(/\s+/g, ' ');
  return text.length > 400 ? `${text.slice(0, 400)}…` : text;
}

function current(): Sandbox {
  if (!loaded) throw new Error('HDF5 sandbox used before openSandboxed');
  return loaded;
}
