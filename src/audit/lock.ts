/**
 * One build of a workspace at a time: `<workspace>/.lacuna-cache/build.lock`.
 *
 * Two builds of one workspace would both number their new version `vNNN`; the second's record
 * then cannot be linked into place. So a plain build takes this lock before it writes anything,
 * and a second build stops at once with an error naming the holder (pid, host, start time) and
 * what to do. We chose to refuse rather than to wait: a waiting build looks hung, and its user
 * may have changed the inputs again by the time it runs; run it again when the first is done.
 * (Shards of a cluster build take no lock: they only add content-addressed cache entries.)
 *
 * The holder's details are written to a temporary file first and hard-linked to the lock's name
 * (link(2) fails if the name exists), so a lock is never seen half-written. A lock left by a
 * process that died is stale: on the same host, a pid that no longer exists frees the lock, and so
 * does a pid that now belongs to a process started after the lock was taken (the holder died and
 * the system gave its number to another process; Linux, from /proc); on another host we cannot
 * tell, and the message says how to remove it.
 */
import { hostname } from 'node:os';
import { existsSync, linkSync, mkdirSync, readFileSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { writeNewFileSynced } from './state-files.ts';

export interface LockHolder {
  pid: number;
  host: string;
  started: string;
}

export function lockFile(workspace: string): string {
  return join(workspace, '.lacuna-cache', 'build.lock');
}

function readHolder(file: string): LockHolder | null {
  try {
    const h = JSON.parse(readFileSync(file, 'utf8')) as LockHolder;
    return typeof h.pid === 'number' && typeof h.host === 'string' && typeof h.started === 'string' ? h : null;
  } catch {
    return null;
  }
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM'; // exists, owned by someone else
  }
}

/**
 * When the process now holding `pid` started (ms since the epoch), from Linux's /proc: field 22 of
 * /proc/<pid>/stat is its start in clock ticks after boot, and `btime` in /proc/stat the boot time
 * in seconds (proc(5)). A tick is 1/100 s: USER_HZ is 100 on every Linux architecture Node runs
 * on. Null where /proc cannot tell (not Linux, or the process is gone).
 */
export function processStartMs(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' '); // the name may hold spaces
    const ticks = Number(fields[22 - 3]);
    const btime = Number(/^btime (\d+)$/m.exec(readFileSync('/proc/stat', 'utf8'))?.[1]);
    return Number.isFinite(ticks) && Number.isFinite(btime) ? btime * 1000 + ticks * 10 : null;
  } catch {
    return null;
  }
}

/**
 * The holder of a lock on this host has gone: its pid is free, or taken by a process that started
 * after the lock was (2 s of slack: the boot time has whole seconds).
 */
function holderGone(holder: LockHolder): boolean {
  if (!alive(holder.pid)) return true;
  const since = processStartMs(holder.pid);
  const taken = Date.parse(holder.started);
  return since !== null && Number.isFinite(taken) && since > taken + 2000;
}

/**
 * Take the workspace lock or throw an `InputError` naming its holder. Returns the release
 * function (removes the lock if it is still ours).
 */
export function acquireWorkspaceLock(workspace: string, now: () => Date = () => new Date()): () => void {
  const file = lockFile(workspace);
  mkdirSync(join(file, '..'), { recursive: true });
  const me: LockHolder = { pid: process.pid, host: hostname(), started: now().toISOString() };
  const mine = JSON.stringify(me);
  for (let attempt = 0; attempt < 3; attempt++) {
    const tmp = `${file}.tmp-${process.pid}`;
    rmSync(tmp, { force: true });
    writeNewFileSynced(tmp, mine);
    try {
      linkSync(tmp, file);
      rmSync(tmp, { force: true });
      return () => {
        if (existsSync(file) && readFileSync(file, 'utf8') === mine) rmSync(file, { force: true });
      };
    } catch (err) {
      rmSync(tmp, { force: true });
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
    const holder = readHolder(file);
    if (holder && holder.host === me.host && holder.pid !== process.pid && holderGone(holder)) {
      // Stale: move it aside (one rename, so of two builds seeing it only one frees it) and retry.
      try {
        renameSync(file, `${file}.stale-${process.pid}`);
        rmSync(`${file}.stale-${process.pid}`, { force: true });
      } catch {
        // another build freed it first
      }
      continue;
    }
    const who = holder ? `process ${holder.pid} on host ${holder.host}, started ${holder.started}` : 'a process whose lock file cannot be read';
    throw new InputError(`the workspace is being built by ${who}`, {
      file,
      hint: holder && holder.host !== me.host
        ? `wait for that build to finish and run this one again; if it is no longer running, delete ${file}`
        : `wait for that build to finish and run this one again (this build wrote nothing)${holder ? '' : `; if no build is running, delete ${file}`}`,
    });
  }
  throw new InputError('could not take the workspace lock after removing a stale one three times', { file, hint: 'is another build starting at the same moment? run again' });
}
