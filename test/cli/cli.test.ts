/**
 * The `lacuna` command as a user runs it (child processes of bin/lacuna.mjs): help, exit codes,
 * `init` and `check` on a demo workspace, `check` naming the file and field of a bad manifest,
 * `compare` naming the known versions, and the preview server refusing paths outside the site.
 * Exit codes as documented in src/cli/main.ts (0 done, 1 input problems, 2 usage).
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync as mkdtempRaw, writeFileSync, readFileSync, mkdirSync, symlinkSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { resolveStatic } from '../../src/cli/serve.ts';

const BIN = resolve(__dirname, '../../bin/lacuna.mjs');
const made: string[] = [];
const mkdtempSync = (prefix: string) => {
  const d = mkdtempRaw(prefix);
  made.push(d);
  return d;
};
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const run = (...args: string[]) => spawnSync(process.execPath, [BIN, ...args], { encoding: 'utf8', timeout: 120_000, env: { ...process.env, NO_COLOR: '1' } });

describe('lacuna command', () => {
  let ws: string;
  beforeAll(() => {
    ws = join(mkdtempSync(join(tmpdir(), 'lacuna-cli-')), 'lab');
    const r = run('init', ws, '--quiet');
    expect(r.status, r.stderr).toBe(0);
  });

  it('prints help listing every command, and help per command', () => {
    const r = run('help');
    expect(r.status).toBe(0);
    for (const c of ['init', 'check', 'build', 'compare', 'serve']) expect(r.stdout).toContain(c);
    const b = run('help', 'build');
    expect(b.stdout).toContain('--shard');
    expect(b.stdout).toContain('--workspace');
  });

  it('exits 2 for an unknown command or option, naming it', () => {
    const a = run('bulid');
    expect(a.status).toBe(2);
    expect(a.stderr).toContain('"bulid"');
    const b = run('check', '--worksapce', ws);
    expect(b.status).toBe(2);
    expect(b.stderr).toContain('--worksapce');
  });

  it('help for a word every object inherits (toString, constructor, __proto__) is an unknown command, not a crash', () => {
    for (const word of ['toString', 'constructor', '__proto__']) {
      for (const args of [['help', word], [word, '--help']]) {
        const r = run(...args);
        expect(r.status, `${args.join(' ')}: ${r.stderr}`).toBe(2);
        expect(r.stderr).toContain(`"${word}"`);
        expect(r.stderr).not.toMatch(/TypeError|at \w+ \(/);
      }
    }
  });

  it('init writes a workspace that check accepts; the seeded demo data are reproducible', () => {
    const r = run('check', '--workspace', ws);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/3 manifests and 22 datasets: no problems/);
    const again = join(mkdtempSync(join(tmpdir(), 'lacuna-cli-')), 'lab');
    expect(run('init', again, '--quiet').status).toBe(0);
    for (const f of ['data/kc/2026-04/rig-b.npy', 'data/imaging/2026-02.npy', 'data/weights/pruned-90.safetensors', 'audits/kc-survey.md']) {
      expect(readFileSync(join(again, f)).equals(readFileSync(join(ws, f))), f).toBe(true);
    }
  });

  it('check lists every problem with file, field and line, and exits 1', () => {
    const bad = join(mkdtempSync(join(tmpdir(), 'lacuna-cli-')), 'bad');
    mkdirSync(join(bad, 'audits'), { recursive: true });
    writeFileSync(join(bad, 'audits', 'x.md'), '---\naudit: x\ntitle: T\nkind: activty\ndatasets:\n  - { id: a, path: ../../outside.npy, month: 2026-13 }\n---\n');
    const r = run('check', '--workspace', bad);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('audits/x.md');
    expect(r.stderr).toMatch(/kind/);
    expect(r.stderr).toMatch(/activty/);
    expect(r.stderr).toMatch(/datasets\[0\]\.month/);
    expect(r.stderr).toMatch(/line 4/);
  });

  it('compare says what to do when the audit has no versions yet', () => {
    const r = run('compare', 'kc-survey', 'v001', 'v002', '--workspace', ws);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('no version v001');
    expect(r.stderr).toContain('lacuna build');
  });
});

describe('preview server paths', () => {
  it('serves files inside the site only', () => {
    const root = join(mkdtempSync(join(tmpdir(), 'lacuna-serve-')), 'site');
    mkdirSync(join(root, 'a'), { recursive: true });
    writeFileSync(join(root, 'a', 'index.html'), 'ok');
    writeFileSync(join(root, '..', `secret-${process.pid}.txt`), 'no');
    symlinkSync('/etc', join(root, 'etc-link'));
    expect(resolveStatic(root, '/a/')).toBe(join(root, 'a', 'index.html'));
    expect(resolveStatic(root, `/../secret-${process.pid}.txt`)).toBeNull();
    expect(resolveStatic(root, `/%2e%2e/secret-${process.pid}.txt`)).toBeNull();
    expect(resolveStatic(root, '/etc-link/hostname')).toBeNull();
    expect(resolveStatic(root, '/%E0%A4%A')).toBeNull();
  });
});
