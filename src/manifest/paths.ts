/**
 * Resolving a dataset's `path` (and `files` pattern) to files inside the workspace.
 *
 * 1. Resolve the path against the manifest's folder (absolute paths are taken as written).
 * 2. Refuse it when it leaves the workspace as written (`..`, an absolute path elsewhere).
 * 3. Refuse it when it leaves the workspace after following symlinks (realpath of both sides).
 * 4. A file is the dataset. A folder is expanded, not recursively, to its non-hidden regular
 *    files matching `files` (default: every file with a data-format extension), sorted by
 *    code point; each one is realpath-checked as in 3. No matching file is an error.
 */
import { readdir, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import { InputError } from '../errors.ts';
import { formatFromExtension } from './format.ts';

export interface PathContext {
  /** Manifest file as shown in messages. */
  file: string;
  /** Field of the path, e.g. `datasets[2].path`; the pattern's field is derived from it. */
  where: string;
  /** The dataset's `files` pattern, or null. */
  pattern: string | null;
  lineOf?: (fieldPath: string) => number | undefined;
}

export interface ResolvedFiles {
  /** Real absolute paths, sorted. */
  files: string[];
  /** The same, relative to the real workspace root, forward slashes. */
  relFiles: string[];
  folder: boolean;
}

/** Is `inner` equal to or below `root` (both absolute, normalised)? */
export function isInside(root: string, inner: string): boolean {
  const rel = path.relative(root, inner);
  return rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel));
}

/** A `*`/`?` file-name pattern as an anchored regular expression. */
export function globToRegExp(pattern: string): RegExp {
  const body = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '[^/]*').replace(/\?/g, '[^/]');
  return new RegExp(`^${body}$`, 's');
}

/** A relative path with forward slashes, as manifests and records write paths on every system. */
export const toPosix = (p: string) => p.split(path.sep).join('/');

/** A manifest path resolved and checked to stay inside the workspace (steps 1–3). */
export interface ResolvedTarget {
  /** Real path of the workspace root. */
  rootReal: string;
  /** Real path of the target. */
  real: string;
  /** Throws an InputError at the path's field (or `where`). */
  fail: (message: string, where?: string, hint?: string, cause?: unknown) => never;
}

/**
 * Steps 1–3: resolve `p` against the manifest's folder and refuse it when it leaves the workspace,
 * as written or after following symlinks, or does not exist. Cost: two realpath calls.
 */
export async function resolveTarget(workspaceRoot: string, manifestDir: string, p: string, ctx: PathContext): Promise<ResolvedTarget> {
  const fail = (message: string, where = ctx.where, hint?: string, cause?: unknown): never => {
    throw new InputError(message, { file: ctx.file, where, line: ctx.lineOf?.(where), hint, cause });
  };
  const rootAbs = path.resolve(workspaceRoot);
  // 1–2. Lexical check.
  if (p.includes('\0')) fail(`found a path with a NUL character; allowed: ${OUTSIDE}`);
  const target = path.isAbsolute(p) ? path.normalize(p) : path.resolve(manifestDir, p);
  if (!isInside(rootAbs, target)) {
    fail(`found ${JSON.stringify(p)}, which leads outside the workspace (${toPosix(rootAbs)}); allowed: ${OUTSIDE}`);
  }
  // 3. After symlinks.
  const rootReal = await realpath(rootAbs);
  let real: string;
  try {
    real = await realpath(target);
  } catch (err) {
    return fail(`found ${JSON.stringify(p)}, which does not exist (looked for ${toPosix(path.relative(rootAbs, target)) || '.'})`, ctx.where, undefined, err);
  }
  if (!isInside(rootReal, real)) {
    fail(`found ${JSON.stringify(p)}, a symbolic link leading outside the workspace (to ${real}); allowed: ${OUTSIDE}`);
  }
  return { rootReal, real, fail };
}

const OUTSIDE = 'data paths are relative to the manifest and must stay inside the workspace folder';

/**
 * Resolve `p` (as written in the manifest) to the dataset's files. Throws an `InputError`
 * naming the manifest, the dataset field and the path. Cost: one realpath per file.
 */
export async function resolveInsideWorkspace(workspaceRoot: string, manifestDir: string, p: string, ctx: PathContext): Promise<ResolvedFiles> {
  const patternWhere = ctx.where.replace(/\.path$/, '.files');
  const { rootReal, real, fail } = await resolveTarget(workspaceRoot, manifestDir, p, ctx);
  const st = await stat(real);
  const rel = (f: string) => toPosix(path.relative(rootReal, f));
  // 4. A file, or a folder's matching files.
  if (st.isFile()) {
    if (ctx.pattern !== null) fail(`found files: ${JSON.stringify(ctx.pattern)} for a path that is a file; allowed: files only when path is a folder`, patternWhere);
    return { files: [real], relFiles: [rel(real)], folder: false };
  }
  if (!st.isDirectory()) fail(`found ${JSON.stringify(p)}, which is neither a file nor a folder`);
  const re = ctx.pattern === null ? null : globToRegExp(ctx.pattern);
  const names = (await readdir(real)).filter((n) => !n.startsWith('.') && (re ? re.test(n) : formatFromExtension(n) !== null));
  names.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
  const files: string[] = [];
  for (const name of names) {
    const full = path.join(real, name);
    let fileReal: string;
    try {
      fileReal = await realpath(full);
    } catch (err) {
      return fail(`found ${JSON.stringify(toPosix(path.join(p, name)))}, a broken symbolic link`, ctx.where, undefined, err);
    }
    if (!isInside(rootReal, fileReal)) {
      fail(`found ${JSON.stringify(toPosix(path.join(p, name)))}, a symbolic link leading outside the workspace (to ${fileReal}); allowed: ${OUTSIDE}`);
    }
    if ((await stat(fileReal)).isFile()) files.push(fileReal);
  }
  if (files.length === 0) {
    const what = ctx.pattern === null ? 'no data files (.npy .npz .csv .tsv .nwb .safetensors)' : `no files matching ${JSON.stringify(ctx.pattern)}`;
    fail(`folder ${JSON.stringify(rel(real) || '.')} has ${what}; allowed: a folder with at least one (hidden files and subfolders are skipped)`, ctx.pattern === null ? ctx.where : patternWhere);
  }
  return { files, relFiles: files.map(rel), folder: true };
}
