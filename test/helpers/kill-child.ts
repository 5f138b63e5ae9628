/**
 * Run one build in this process and SIGKILL it at a chosen file-system call: a real kill, at a
 * step named by the call and its path, not at a time. Used by test/audit/kill.test.ts.
 *
 * argv: WORKSPACE OUT; env KILL_AT = JSON { fn, match, when }: `fn` a function of node:fs
 * (renameSync, linkSync, mkdirSync, writeFileSync: Eleventy writes pages with it) or `promises.X`
 * for one of node:fs/promises; `match` a regular
 * expression tested on the call's last path argument; `when` 'before' or 'after' the call.
 * The patch is applied to node:fs's exports before the build's modules are imported
 * (`syncBuiltinESMExports` carries it to ESM named imports), so no code of the build changes.
 */
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import { syncBuiltinESMExports } from 'node:module';

const [workspace, out] = process.argv.slice(2);
const spec = JSON.parse(process.env.KILL_AT ?? '{}') as { fn: string; match: string; when: 'before' | 'after' };
const re = new RegExp(spec.match);
const die = () => process.kill(process.pid, 'SIGKILL');

type Fns = Record<string, (...a: unknown[]) => unknown>;
const name = spec.fn.replace(/^promises\./, '');
const target = (spec.fn.startsWith('promises.') ? fsp : fs) as unknown as Fns;
const original = target[name];
if (typeof original !== 'function') throw new Error(`no such function: ${spec.fn}`);
target[name] = function patched(this: unknown, ...args: unknown[]) {
  const path = String(name === 'renameSync' || name === 'linkSync' ? args[1] : args[0]);
  const hit = re.test(path);
  if (hit && spec.when === 'before') die();
  const r = original.apply(this, args);
  if (hit && spec.when === 'after') {
    if (r instanceof Promise) return r.then(die);
    die();
  }
  return r;
};
syncBuiltinESMExports();

const { buildWorkspace } = await import('../../src/audit/build.ts');
const { createProgress } = await import('../../src/cli/progress.ts');
await buildWorkspace({ workspace, out, progress: createProgress({ quiet: true }), workers: '1' });
// Reaching here means the kill point was never met: the test says so.
process.exit(3);
