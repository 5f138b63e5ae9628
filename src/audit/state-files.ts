/**
 * Writing the workspace's state (records, cache, lock) and the site's state safely.
 *
 * - A state folder or file that is a symbolic link is refused: a `records/` or `.lacuna-cache`
 *   link committed in a repository would otherwise have every record and cache file written to
 *   wherever it points, outside the workspace.
 * - A file "counts as written" only once its bytes and its folder entry are on disk: written to a
 *   temporary file (created exclusively, so an existing file or link of that name is never
 *   followed), fsynced, moved into place, and the folder fsynced (POSIX fsync(2); without the
 *   folder's fsync a crash can lose the new name even though the bytes were flushed).
 * - Leftovers of a killed build (`.vNNN.json.tmp-PID` in `records/`, `.tmp-*` folders in the
 *   site) are removed by the next build, which holds the workspace lock.
 */
import { closeSync, existsSync, fsyncSync, lstatSync, openSync, readdirSync, renameSync, rmSync, writeSync } from 'node:fs';
import { join, relative } from 'node:path';
import { InputError } from '../errors.ts';

/** Refuse `path` when it is a symbolic link (a missing path is fine: it will be created as a real one). */
export function refuseSymlink(path: string, base: string, what: string): void {
  let st;
  try {
    st = lstatSync(path);
  } catch {
    return;
  }
  if (st.isSymbolicLink()) {
    const rel = relative(base, path) || path;
    throw new InputError(`${what} "${rel}" is a symbolic link; Lacuna writes its state only into real folders, never through a link`, {
      file: path,
      hint: `remove the link (and, if it was committed, from the repository) and build again; the folder is made anew`,
    });
  }
}

/** The workspace's state folders, and each audit's records folder, must not be links. */
export function refuseSymlinkedWorkspaceState(workspace: string): void {
  const records = join(workspace, 'records');
  refuseSymlink(records, workspace, 'records folder');
  if (existsSync(records)) {
    for (const name of readdirSync(records)) refuseSymlink(join(records, name), workspace, 'records folder');
  }
  const cache = join(workspace, '.lacuna-cache');
  refuseSymlink(cache, workspace, 'cache folder');
  for (const name of ['datasets', 'hashes.json', 'hashes.d', 'build.lock']) refuseSymlink(join(cache, name), workspace, 'cache entry');
}

/** fsync a folder, so the names just created in it survive a crash. */
export function fsyncDir(dir: string): void {
  let fd: number;
  try {
    fd = openSync(dir, 'r');
  } catch {
    return; // some systems cannot open a folder for reading; nothing more can be done there
  }
  try {
    fsyncSync(fd);
  } catch {
    // EINVAL on file systems that do not support fsync of folders
  } finally {
    closeSync(fd);
  }
}

/** Create `file` exclusively (never through an existing name or link), write `text`, fsync, close. */
export function writeNewFileSynced(file: string, text: string): void {
  const fd = openSync(file, 'wx');
  try {
    const buf = Buffer.from(text, 'utf8');
    for (let off = 0; off < buf.length; ) off += writeSync(fd, buf, off, buf.length - off);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
}

/** Replace `file` atomically and durably with `text` (temporary file, fsync, rename, fsync folder). */
export function writeFileDurable(file: string, text: string): void {
  const dir = join(file, '..');
  const tmp = `${file}.tmp-${process.pid}-${Math.random().toString(36).slice(2)}`;
  writeNewFileSynced(tmp, text);
  try {
    renameSync(tmp, file);
  } catch (err) {
    rmSync(tmp, { force: true });
    throw err;
  }
  fsyncDir(dir);
}

const RECORD_TMP = /^\.v\d{3,}\.json\.tmp-/;

/**
 * Remove what a killed build left in `records/<audit>/` (temporary record files, possibly
 * truncated; they never count as versions). Call only while holding the workspace lock.
 */
export function cleanRecordLeftovers(workspace: string): string[] {
  const removed: string[] = [];
  const records = join(workspace, 'records');
  if (!existsSync(records)) return removed;
  for (const audit of readdirSync(records)) {
    const dir = join(records, audit);
    if (!lstatSync(dir).isDirectory()) continue;
    for (const f of readdirSync(dir)) {
      if (RECORD_TMP.test(f)) {
        rmSync(join(dir, f), { force: true });
        removed.push(join('records', audit, f));
      }
    }
  }
  return removed;
}

const SITE_TMP = /^\.tmp-(old-)?v\d{3,}-\d+$/;

/**
 * Remove what a killed build left in the site: `<out>/<audit>/.tmp-vNNN-PID` (a version being
 * written) and `.tmp-old-vNNN-PID` (an old copy being replaced), for the audits named (those
 * with records), and `<out>/.lacuna-site.json.tmp-*`. Only names a build makes are touched, so
 * an `--out` pointed at the wrong folder loses nothing of its own.
 */
export function cleanSiteLeftovers(out: string, audits: string[]): string[] {
  const removed: string[] = [];
  if (!existsSync(out)) return removed;
  for (const name of readdirSync(out)) {
    if (name.startsWith('.lacuna-site.json.tmp-')) {
      rmSync(join(out, name), { force: true });
      removed.push(name);
    }
  }
  for (const audit of audits) {
    const dir = join(out, audit);
    if (!existsSync(dir) || !lstatSync(dir).isDirectory()) continue;
    for (const f of readdirSync(dir)) {
      if (SITE_TMP.test(f)) {
        rmSync(join(dir, f), { recursive: true, force: true });
        removed.push(join(audit, f));
      }
    }
  }
  return removed;
}

/**
 * Remove the pages a site's state lists but no record of this workspace backs: the version folders
 * (and, for an audit with no records left, its whole folder) of another workspace whose site was
 * adopted, or of records deleted by hand. Such pages would otherwise stay published, reachable by
 * their address and listed nowhere. Only folders the state names are touched, so a folder Lacuna
 * did not write is never removed. Returns what was removed, relative to `out`.
 */
export function removeUnrecordedPages(out: string, listed: Record<string, Record<string, string>>, recorded: Map<string, Set<string>>): string[] {
  const removed: string[] = [];
  const safe = /^[A-Za-z0-9][A-Za-z0-9._-]*$/; // audit slugs and version names; never '..' or a path
  for (const audit of Object.keys(listed)) {
    if (!safe.test(audit) || audit === '..' || audit === 'assets') continue;
    const versions = recorded.get(audit);
    const dir = join(out, audit);
    if (!existsSync(dir) || lstatSync(dir).isSymbolicLink()) continue;
    if (!versions) {
      rmSync(dir, { recursive: true, force: true });
      removed.push(audit);
      continue;
    }
    for (const version of Object.keys(listed[audit] ?? {})) {
      if (versions.has(version) || !safe.test(version) || version === '..' || version === 'latest') continue;
      const v = join(dir, version);
      if (!existsSync(v) || lstatSync(v).isSymbolicLink()) continue;
      rmSync(v, { recursive: true, force: true });
      removed.push(`${audit}/${version}`);
    }
  }
  return removed;
}
