/**
 * Running `lacuna` as a user does: `node bin/lacuna.mjs …` in a child process whose current
 * folder is a fresh temporary folder outside the repository. Temporary folders made here are
 * removed by `cleanUp()` (call it in `afterAll`).
 */
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

export const BIN = resolve(__dirname, '../../bin/lacuna.mjs');
const made: string[] = [];

export function tempDir(prefix = 'lacuna-cli-'): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

export function cleanUp(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Run lacuna with `args` in the folder `cwd` (a new temporary folder when not given). */
export function lacuna(args: string[], cwd = tempDir()) {
  return spawnSync(process.execPath, [BIN, ...args], { cwd, encoding: 'utf8', timeout: 120_000, env: { ...process.env, NO_COLOR: '1' } });
}

/** A TCP port that was free a moment ago on 127.0.0.1. */
export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const s = createServer();
    s.once('error', fail);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => ok(port));
    });
  });
}

/** Resolves with everything `child` wrote to stderr once `pattern` appears (rejects if it exits first). */
export function waitForStderr(child: ChildProcess, pattern: RegExp): Promise<string> {
  return new Promise((ok, fail) => {
    let text = '';
    const onData = (d: Buffer) => {
      text += d.toString('utf8');
      if (pattern.test(text)) {
        child.stderr?.off('data', onData);
        ok(text);
      }
    };
    child.stderr?.on('data', onData);
    child.once('exit', (code) => fail(new Error(`exited (${code}) before ${pattern}: ${text}`)));
  });
}

/** Resolves when `child` has exited, with its code and signal; null after `ms` without exiting. */
export function exitWithin(child: ChildProcess, ms: number): Promise<{ code: number | null; signal: NodeJS.Signals | null } | null> {
  return new Promise((ok) => {
    if (child.exitCode !== null || child.signalCode !== null) return ok({ code: child.exitCode, signal: child.signalCode });
    const t = setTimeout(() => ok(null), ms);
    child.once('exit', (code, signal) => {
      clearTimeout(t);
      ok({ code, signal });
    });
  });
}

export function startLacuna(args: string[], cwd: string, options: { detached?: boolean; command?: string[] } = {}): ChildProcess {
  const [cmd, ...pre] = options.command ?? [process.execPath, BIN];
  return spawn(cmd, [...pre, ...args], { cwd, stdio: ['ignore', 'pipe', 'pipe'], detached: options.detached, env: { ...process.env, NO_COLOR: '1' } });
}
