/**
 * The workspace's git state as recorded in a result: its commit, whether tracked files had
 * uncommitted changes, and that a hostile `.git/config` cannot make Lacuna run a command.
 * Checked against real git repositories made in a temporary folder (skips without git).
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { gitDirty, workspaceState } from '../../src/audit/git-state.ts';

let hasGit = true;
try {
  execFileSync('git', ['--version'], { stdio: 'ignore' });
} catch {
  hasGit = false;
  console.warn('test/audit/git-state: skipped — git not found');
}

const dirs: string[] = [];
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function repo(): string {
  const d = mkdtempSync(join(tmpdir(), 'lacuna-git-'));
  dirs.push(d);
  const g = (...a: string[]) => execFileSync('git', ['-C', d, '-c', 'user.name=t', '-c', 'user.email=t@example.org', ...a], { stdio: 'ignore' });
  g('init', '-q');
  writeFileSync(join(d, 'manifest.md'), '---\naudit: a\n---\n');
  g('add', '.');
  g('commit', '-qm', 'first');
  return d;
}

describe.skipIf(!hasGit)('workspaceState', () => {
  it('gives the commit git rev-parse gives, clean after a commit, dirty after an edit of a tracked file', () => {
    const d = repo();
    const head = execFileSync('git', ['-C', d, 'rev-parse', 'HEAD'], { encoding: 'utf8' }).trim();
    expect(workspaceState(d)).toEqual({ commit: head, dirty: false });
    writeFileSync(join(d, 'untracked.txt'), 'x'); // untracked files do not count
    expect(gitDirty(d)).toBe(false);
    writeFileSync(join(d, 'manifest.md'), '---\naudit: b\n---\n');
    const index = statSync(join(d, '.git', 'index')).mtimeMs;
    expect(workspaceState(d)).toEqual({ commit: head, dirty: true });
    // Reading the state writes nothing into the workspace's repository (no index refresh).
    expect(statSync(join(d, '.git', 'index')).mtimeMs).toBe(index);
  });

  it('is null outside a repository', () => {
    const d = mkdtempSync(join(tmpdir(), 'lacuna-nogit-'));
    dirs.push(d);
    expect(workspaceState(d)).toEqual({ commit: null, dirty: null });
  });

  it('runs no clean filter or fsmonitor command named in the workspace’s .git/config', () => {
    const d = repo();
    const mark = join(d, 'ran');
    // A filter driver and an fsmonitor hook that would each leave a file behind if git ran them.
    execFileSync('git', ['-C', d, 'config', 'filter.evil.clean', `touch ${mark}-clean; cat`]);
    execFileSync('git', ['-C', d, 'config', 'core.fsmonitor', `touch ${mark}-fsmonitor; true`]);
    writeFileSync(join(d, '.git', 'info', 'attributes'), '* filter=evil\n');
    writeFileSync(join(d, 'manifest.md'), '---\naudit: c\n---\n');
    const state = workspaceState(d);
    expect(existsSync(`${mark}-clean`)).toBe(false);
    expect(existsSync(`${mark}-fsmonitor`)).toBe(false);
    // With the filter emptied git still tells the edit apart.
    expect(state.dirty).toBe(true);
  });
});
