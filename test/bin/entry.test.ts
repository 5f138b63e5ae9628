/**
 * How `lacuna` chooses its code (bin/entry.mjs) and that the choice changes nothing but speed:
 * - the source fingerprint changes with any byte, name or added file under the tree, and only then
 *   (common practice, no source: a content hash as a build stamp);
 * - the compiled JavaScript (dist/, made current by test/global-compile.ts) and the TypeScript
 *   sources run through tsx build the demo workspace into the same version records, number for
 *   number (the records' own measures are checked against outside references elsewhere, e.g.
 *   test/audit/build.test.ts); `lacuna --version` says which ran.
 */
import { describe, it, expect } from 'vitest';
import { tempDirs } from '../helpers/temp-dirs.ts';
import { spawnSync } from 'node:child_process';
import { cpSync, mkdirSync, readdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { compiledIsCurrent, sourceFingerprint } from '../../bin/entry.mjs';

const REPO = resolve(import.meta.dirname, '../..');
const BIN = join(REPO, 'bin', 'lacuna.mjs');
const tempDir = tempDirs();
const run = (args: string[], sources: boolean) =>
  spawnSync(process.execPath, [BIN, ...args], {
    encoding: 'utf8',
    timeout: 180_000,
    env: { ...process.env, NO_COLOR: '1', LACUNA_RUN_SOURCES: sources ? '1' : '0' },
  });

describe('source fingerprint', () => {
  it('changes with one byte, a rename or a new file, and not otherwise', () => {
    const root = tempDir('lacuna-fp-');
    mkdirSync(join(root, 'a'));
    writeFileSync(join(root, 'a', 'x.ts'), 'export const x = 1;\n');
    writeFileSync(join(root, 'b.css'), 'p { margin: 0 }\n');
    const first = sourceFingerprint(root);
    expect(sourceFingerprint(root)).toBe(first);
    writeFileSync(join(root, 'a', 'x.ts'), 'export const x = 2;\n');
    const edited = sourceFingerprint(root);
    expect(edited).not.toBe(first);
    renameSync(join(root, 'b.css'), join(root, 'c.css'));
    const renamed = sourceFingerprint(root);
    expect(renamed).not.toBe(edited);
    writeFileSync(join(root, 'a', 'y.ts'), '');
    expect(sourceFingerprint(root)).not.toBe(renamed);
  });
});

describe('compiled and source runs', () => {
  it('dist/ is current after the global setup', () => {
    expect(compiledIsCurrent()).toBe(true);
  });

  it('--version says which code ran', () => {
    expect(run(['--version'], false).stdout).toMatch(/\(compiled JavaScript in dist\/\)/);
    expect(run(['--version'], true).stdout).toMatch(/\(TypeScript sources through tsx\)/);
  });

  it('build the demo workspace into the same records', () => {
    const base = tempDir('lacuna-entry-');
    const ws = join(base, 'lab');
    expect(run(['init', ws, '--quiet'], false).status).toBe(0);
    const copy = join(base, 'lab-sources');
    cpSync(ws, copy, { recursive: true });
    const a = run(['build', '--workspace', ws, '--out', join(base, 'site-a'), '--quiet'], false);
    expect(a.status, a.stderr).toBe(0);
    const b = run(['build', '--workspace', copy, '--out', join(base, 'site-b'), '--quiet'], true);
    expect(b.status, b.stderr).toBe(0);
    const audits = readdirSync(join(ws, 'records')).sort();
    expect(audits.length).toBe(3);
    expect(readdirSync(join(copy, 'records')).sort()).toEqual(audits);
    // Everything but when it was made and where the workspace sits.
    const comparable = (file: string) => {
      const r = JSON.parse(readFileSync(file, 'utf8')) as { result: Record<string, unknown>; entry: Record<string, unknown> };
      delete r.result.created;
      delete r.entry.created;
      return JSON.stringify(r).replaceAll(copy, ws);
    };
    for (const audit of audits) {
      const left = comparable(join(ws, 'records', audit, 'v001.json'));
      const right = comparable(join(copy, 'records', audit, 'v001.json'));
      expect(right, audit).toBe(left);
    }
  }, 240_000); // two whole demo builds, one through tsx: minutes on a loaded two-core machine
});

describe('V8 flags', () => {
  it('the npm scripts run lacuna with the flags on its #! line (the ones the benchmark measures)', () => {
    const shebang = readFileSync(BIN, 'utf8').split('\n')[0];
    const flags = shebang.replace(/^#!\/usr\/bin\/env -S node/, '').trim();
    expect(flags).toMatch(/^--max-semi-space-size=\d+$/);
    const scripts = (JSON.parse(readFileSync(join(REPO, 'package.json'), 'utf8')) as { scripts: Record<string, string> }).scripts;
    for (const name of ['demo', 'build', 'check']) expect(scripts[name], name).toMatch(new RegExp(`^node ${flags} bin/lacuna\\.mjs ${name}( |$)`));
  });
});
