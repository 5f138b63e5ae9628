/**
 * `lacuna init DIR`: a new workspace holding the demo scenario (manifests + seeded data).
 *
 * It never replaces a file. The demo is first written into a private temporary folder; then:
 * 1. DIR that is a file (or under one) is an input error, and nothing is written.
 * 2. DIR that already holds anything: without `--add-missing`, nothing is written and the
 *    message lists the files it would write and the ones already there.
 * 3. Each missing file is copied next to its place under a temporary name and hard-linked into
 *    place, which fails rather than replace a file that appeared meanwhile (then it is kept).
 */
import { constants, copyFileSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync, linkSync, unlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { InputError } from '../errors.ts';
import { makeDemo } from '../demo/scenario.ts';
import { safeTerminalLine } from '../text/safe-terminal.ts';
import type { Progress } from './progress.ts';

/** File-system failures the user can fix (a file in the way, permissions, a full or read-only disk). */
const USER_FIXABLE = new Set(['EACCES', 'EPERM', 'ENOTDIR', 'EEXIST', 'EISDIR', 'EROFS', 'ENOSPC', 'EDQUOT', 'ENAMETOOLONG', 'ELOOP']);

function fsProblem(err: unknown, path: string, doing: string): unknown {
  const code = (err as NodeJS.ErrnoException | null)?.code;
  if (!code || !USER_FIXABLE.has(code)) return err;
  return new InputError(`could not ${doing} ${safeTerminalLine(path)} (${code})`, { cause: err, hint: 'nothing already there was changed; choose another folder or fix the permissions' });
}

function exists(path: string): boolean {
  try {
    lstatSync(path);
    return true;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return false;
    throw fsProblem(err, path, 'look at');
  }
}

function listing(title: string, files: string[]): string {
  return files.length ? `\n  ${title}:\n${files.map((f) => `    ${f}`).join('\n')}` : '';
}

/** Put `from` at `to` unless `to` exists; true when written. */
function placeNew(from: string, to: string): boolean {
  mkdirSync(dirname(to), { recursive: true });
  const tmp = `${to}.tmp-init-${process.pid}`;
  copyFileSync(from, tmp, constants.COPYFILE_EXCL);
  try {
    linkSync(tmp, to);
    return true;
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    if (code === 'EEXIST') return false;
    if (code !== 'EPERM' && code !== 'ENOTSUP' && code !== 'EOPNOTSUPP') throw err;
    // No hard links on this file system: an exclusive create still never replaces a file.
    return copyExclusive(from, to);
  } finally {
    unlinkSync(tmp);
  }
}

function copyExclusive(from: string, to: string): boolean {
  try {
    copyFileSync(from, to, constants.COPYFILE_EXCL);
    return true;
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'EEXIST') return false;
    throw err;
  }
}

export async function runInit(dirArg: string, progress: Progress, options: { addMissing?: boolean } = {}): Promise<number> {
  const dir = resolve(dirArg);
  const shown = safeTerminalLine(dir);
  // 1. A file where the folder should be.
  if (exists(dir) && !statSync(dir).isDirectory()) {
    throw new InputError(`${shown} is a file, not a folder; init makes a workspace folder`, { hint: 'choose a new folder name, e.g. lacuna init my-lab' });
  }
  const stage = mkdtempSync(join(tmpdir(), 'lacuna-init-'));
  try {
    const step = progress.step('making demo scenario', 1);
    const made = makeDemo(stage);
    const all = [...made.manifests, ...made.files].sort();
    step.done(`${all.length} files`);
    // 2. A folder that already holds something.
    const present = exists(dir) ? all.filter((f) => exists(join(dir, f))) : [];
    const missing = all.filter((f) => !present.includes(f));
    const nonEmpty = exists(dir) && readdirSync(dir).length > 0;
    if (nonEmpty && !options.addMissing) {
      throw new InputError(
        `${shown} is not empty, and init writes only into a new or empty folder; nothing was written` +
          listing(`it would write ${missing.length} file${missing.length === 1 ? '' : 's'}`, missing) +
          listing(`and keep ${present.length} file${present.length === 1 ? '' : 's'} already there untouched`, present) +
          '\n  to write only the missing files and keep everything already there, run it again with --add-missing',
      );
    }
    // 3. Write what is missing, never replacing a file.
    const kept = [...present];
    let wrote = 0;
    for (const f of missing) {
      const to = join(dir, f);
      try {
        if (placeNew(join(stage, f), to)) wrote++;
        else kept.push(f);
      } catch (err) {
        throw fsProblem(err, to, 'write');
      }
    }
    progress.info(`workspace ready: ${shown} (${wrote} file${wrote === 1 ? '' : 's'} written)`);
    if (kept.length) progress.info(`kept ${kept.length} existing file${kept.length === 1 ? '' : 's'} untouched:\n${kept.map((f) => `  ${f}`).join('\n')}`);
    progress.info(`next: cd ${safeTerminalLine(dirArg)} && lacuna check && lacuna build`);
    return 0;
  } catch (err) {
    throw fsProblem(err, dir, 'write into');
  } finally {
    rmSync(stage, { recursive: true, force: true });
  }
}
