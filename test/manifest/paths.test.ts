/**
 * Data paths stay inside the workspace, also through symbolic links; folders expand to their
 * matching files. Common practice, no source, except the glob check against Python's
 * `fnmatch.fnmatchcase` (standard library), run live.
 */
import { symlinkSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError, InputErrors } from '../../src/errors.ts';
import { loadManifest } from '../../src/manifest/load.ts';
import { globToRegExp, resolveInsideWorkspace } from '../../src/manifest/paths.ts';
import { hasScipy, runPython } from '../helpers/python.ts';
import { tempWorkspace } from './workspace.ts';

const ws = tempWorkspace();
afterAll(() => ws.cleanup());
ws.write('data/b.npy');
ws.write('data/a.npy');
ws.write('data/.hidden.npy');
ws.write('data/notes.txt');
ws.write('data/sub/c.npy');
ws.write('data/x10.npy');
ws.link('ext.npy', path.join(ws.outside, 'secret.npy')); // a file link leading out
ws.link('extdir', ws.outside); // a folder link leading out
ws.write('mixed/ok.npy');
ws.link('mixed/out.npy', path.join(ws.outside, 'secret.npy'));
ws.link('inner.npy', path.join(ws.root, 'data', 'a.npy')); // a link that stays inside
const audits = path.join(ws.root, 'audits');
const ctx = { file: 'audits/m.md', where: 'datasets[2].path', pattern: null as string | null };

async function refusal(p: string, pattern: string | null = null): Promise<InputError> {
  try {
    await resolveInsideWorkspace(ws.root, audits, p, { ...ctx, pattern });
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  }
  throw new Error(`expected ${p} to be refused`);
}

describe('resolveInsideWorkspace refuses paths that lead out', () => {
  it('../../etc/passwd (a .. escape)', async () => {
    const e = await refusal('../../etc/passwd');
    expect(e.where).toBe('datasets[2].path');
    expect(e.file).toBe('audits/m.md');
    expect(e.message).toContain('"../../etc/passwd", which leads outside the workspace');
  });
  it('an absolute path outside the workspace', async () => {
    expect((await refusal('/etc/passwd')).message).toContain('leads outside the workspace');
    expect((await refusal(path.join(ws.outside, 'secret.npy'))).where).toBe('datasets[2].path');
  });
  it('a .. path that re-enters by name is judged where it lands', async () => {
    expect((await refusal(`../../${path.basename(ws.outside)}/secret.npy`)).message).toContain('outside');
  });
  it('a symlinked file leading out', async () => {
    const e = await refusal('../ext.npy');
    expect(e.message).toContain('symbolic link leading outside the workspace');
    expect(e.where).toBe('datasets[2].path');
  });
  it('a symlinked folder leading out', async () => {
    expect((await refusal('../extdir/')).message).toContain('symbolic link leading outside');
  });
  it('a folder holding one link that leads out: the file is named', async () => {
    const e = await refusal('../mixed');
    expect(e.message).toContain('"../mixed/out.npy", a symbolic link leading outside');
  });
  it('a path that does not exist', async () => {
    expect((await refusal('../data/nope.npy')).message).toContain('does not exist');
  });
});

describe('resolveInsideWorkspace accepts paths inside, and expands folders', () => {
  it('an absolute path inside, and a link that stays inside (resolved to its target)', async () => {
    const a = await resolveInsideWorkspace(ws.root, audits, path.join(ws.root, 'data', 'a.npy'), ctx);
    expect(a.relFiles).toEqual(['data/a.npy']);
    const l = await resolveInsideWorkspace(ws.root, audits, '../inner.npy', ctx);
    expect(l.relFiles).toEqual(['data/a.npy']);
    expect(l.folder).toBe(false);
  });
  it('a folder: data files only, sorted by code point, hidden files and subfolders skipped', async () => {
    const r = await resolveInsideWorkspace(ws.root, audits, '../data/', ctx);
    expect(r.relFiles).toEqual(['data/a.npy', 'data/b.npy', 'data/x10.npy']);
    expect(r.files).toEqual(r.relFiles.map((f) => path.join(ws.root, f)));
  });
  it('a folder with a files pattern', async () => {
    const one = await resolveInsideWorkspace(ws.root, audits, '../data', { ...ctx, pattern: '?.npy' });
    expect(one.relFiles).toEqual(['data/a.npy', 'data/b.npy']);
    const txt = await resolveInsideWorkspace(ws.root, audits, '../data', { ...ctx, pattern: '*.txt' });
    expect(txt.relFiles).toEqual(['data/notes.txt']);
  });
  it('a folder with no match names the folder and the pattern, at the files field', async () => {
    const e = await refusal('../data', '*.nwb');
    expect(e.message).toContain('folder "data" has no files matching "*.nwb"');
    expect(e.where).toBe('datasets[2].files');
  });
  it('a files pattern on a file path is refused', async () => {
    expect((await refusal('../data/a.npy', '*.npy')).where).toBe('datasets[2].files');
  });
});

describe.skipIf(!hasScipy)('globToRegExp agrees with Python fnmatch.fnmatchcase for * and ?', () => {
  it('on a grid of names and patterns', () => {
    const names = ['a.npy', 'ab.npy', '.npy', 'a.npz', 'a.npy.bak', 'x(1).npy', 'a+b.npy', 'A.NPY', 'a$.npy', 'session-01.csv', 'a\nb.npy'];
    const patterns = ['*.npy', '?.npy', '*', 'a*', '*.np?', 'x(1).*', 'a+b.*', 'session-??.csv', '*$.npy', 'a*b.npy'];
    // Python: fnmatchcase is case-sensitive and `*` matches any characters (there is no '/' in names).
    const expected = runPython<boolean[][]>(
      'import fnmatch\nprint(json.dumps([[fnmatch.fnmatchcase(n, p) for n in inp["names"]] for p in inp["patterns"]]))',
      { names, patterns },
    );
    const ours = patterns.map((p) => names.map((n) => globToRegExp(p).test(n)));
    expect(ours).toEqual(expected);
  });
});

describe('through loadManifest: every path problem is reported with its dataset field', () => {
  it('collects the problems of several datasets at once', async () => {
    ws.write('audits/paths.md', [
      '---', 'audit: paths', 'title: Paths', 'datasets:',
      '  - id: a', '    path: ../../etc/passwd',
      '  - id: b', '    path: ../ext.npy',
      '  - id: c', '    path: ../data', '    files: "*.nwb"',
      '  - id: d', '    path: ../data/a.npy',
      '---', '',
    ].join('\n'));
    let problems: InputError[] = [];
    await loadManifest(path.join(audits, 'paths.md'), ws.root).catch((e: unknown) => {
      expect(e).toBeInstanceOf(InputErrors);
      problems = (e as InputErrors).problems;
    });
    // Lines counted by hand: a's path is line 6, b's path line 8, c's files line 11.
    expect(problems.map((p) => [p.where, p.line])).toEqual([
      ['datasets[0].path', 6],
      ['datasets[1].path', 8],
      ['datasets[2].files', 11],
    ]);
    expect(problems.every((p) => p.file === 'audits/paths.md')).toBe(true);
  });
  it('a link inside audits/ that points at a manifest outside is refused', async () => {
    symlinkSync(path.join(ws.outside, 'secret.npy'), path.join(audits, 'out.md'));
    await expect(loadManifest(path.join(audits, 'out.md'), ws.root)).rejects.toThrow(/manifest leads outside the workspace/);
  });
});
