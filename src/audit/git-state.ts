/**
 * Which code computed a result and which data it used, as git sees them: the workspace's commit
 * (and whether it had uncommitted changes), and Lacuna's own commit when it runs from a git
 * checkout rather than an installed package.
 *
 * A workspace may come from anyone, and so may its `.git/config`. `git rev-parse` runs nothing
 * from the config, but `git status` can: an fsmonitor hook, and the clean filter of any filter
 * driver the config names (run on files whose stat changed). So status runs with fsmonitor off,
 * submodules ignored, and every configured filter driver's commands overridden with empty ones
 * (read first with `git config --get-regexp`, which runs nothing). When git refuses (a required
 * filter left empty, no git at all), the answer is "unknown" (null), never a guess.
 */
import { execFileSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

function git(dir: string, args: string[]): string | null {
  try {
    return execFileSync('git', ['-C', dir, ...args], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'ignore'], maxBuffer: 4 << 20 });
  } catch {
    return null;
  }
}

/** `HEAD` of the repository holding `dir`, or null outside one (or without git). */
export function gitCommit(dir: string): string | null {
  return git(dir, ['rev-parse', 'HEAD'])?.trim() || null;
}

/** `-c` overrides that empty every configured filter driver's commands and switch fsmonitor off. */
function neutralConfig(dir: string): string[] {
  const out = ['-c', 'core.fsmonitor=false', '-c', 'core.untrackedCache=false'];
  const listed = git(dir, ['config', '--get-regexp', '^filter\\.']) ?? '';
  const drivers = new Set<string>();
  for (const line of listed.split('\n')) {
    const m = /^filter\.(.+)\.[a-z]+\s/i.exec(line);
    if (m) drivers.add(m[1]);
  }
  for (const d of drivers) for (const k of ['clean', 'smudge', 'process']) out.push('-c', `filter.${d}.${k}=`);
  return out;
}

/**
 * Whether tracked files under `dir` differ from the commit (staged or not); untracked files do
 * not count. null when it cannot be told safely.
 */
export function gitDirty(dir: string): boolean | null {
  // --no-optional-locks: status must not rewrite the workspace's index as a side effect.
  const out = git(dir, ['--no-optional-locks', ...neutralConfig(dir), 'status', '--porcelain', '--untracked-files=no', '--ignore-submodules=all', '--', '.']);
  return out === null ? null : out.trim().length > 0;
}

/** The workspace's commit and whether it had uncommitted changes (null when not a repository). */
export function workspaceState(workspace: string): { commit: string | null; dirty: boolean | null } {
  const commit = gitCommit(workspace);
  return { commit, dirty: commit === null ? null : gitDirty(workspace) };
}

/**
 * Lacuna's own commit when it runs from a git checkout (its root, two folders above this file in
 * both `src/audit/` and `dist/audit/`, holds `.git`); null for an installed package.
 */
export function toolSourceCommit(): string | null {
  const root = fileURLToPath(new URL('../../', import.meta.url));
  if (/[\\/]node_modules[\\/]/.test(root) || !existsSync(`${root}.git`)) return null;
  return gitCommit(root);
}
