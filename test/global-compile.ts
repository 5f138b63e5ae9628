/**
 * vitest global setup: make dist/ current before any test starts, so the tests that run the
 * `lacuna` command run what a user runs (bin/entry.mjs prefers dist/ when it matches src/).
 * About 5 s when src/ changed since the last compile; a fingerprint check (~15 ms) otherwise.
 */
import { spawnSync } from 'node:child_process';
import { join, resolve } from 'node:path';

export default function setup(): void {
  const repo = resolve(import.meta.dirname, '..');
  const r = spawnSync(process.execPath, [join(repo, 'scripts', 'compile.mjs'), '--if-stale'], { cwd: repo, encoding: 'utf8' });
  if (r.status !== 0) throw new Error(`scripts/compile.mjs failed (exit ${r.status}):\n${r.stdout}${r.stderr}`);
  const said = r.stdout.trim();
  if (!said.endsWith('is current')) console.log(said);
}
