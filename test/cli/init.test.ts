/**
 * `lacuna init` never replaces a file: a lab's own bytes under data/ survive, a non-empty
 * folder is refused with the list of files it would write, `--add-missing` writes only what is
 * missing, and a file given as the folder is an input error (exit 1), not an internal one (70).
 * Run from a temporary folder outside the repository, as a user runs it.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { cleanUp, lacuna, tempDir } from './run.ts';
import { makeDemo } from '../../src/demo/scenario.ts';

afterAll(cleanUp);

// How many files the demo scenario is: counted by writing it once into a folder of its own.
const demoFiles = (() => {
  const s = makeDemo(tempDir());
  return s.files.length + s.manifests.length;
})();

const LAB_BYTES = Buffer.from('the lab\u2019s own recording, not demo data\n');

describe('lacuna init', () => {
  it('into a new folder writes the demo workspace and says so', () => {
    const cwd = tempDir();
    const r = lacuna(['init', 'lab'], cwd);
    expect(r.status, r.stderr).toBe(0);
    expect(readdirSync(join(cwd, 'lab', 'audits')).sort()).toEqual(['kc-imaging.md', 'kc-survey.md', 'pruned-net.md']);
    expect(existsSync(join(cwd, 'lab', 'data', 'kc', '2026-01', 'rig-a.npy'))).toBe(true);
    expect(r.stderr).toMatch(new RegExp(`workspace ready: .*lab \\(${demoFiles} files written\\)`));
  });

  it("refuses a folder that holds files, writes nothing, keeps the lab's bytes and lists what it would write", () => {
    const cwd = tempDir();
    const ws = join(cwd, 'ws');
    mkdirSync(join(ws, 'data', 'kc', '2026-01'), { recursive: true });
    writeFileSync(join(ws, 'data', 'kc', '2026-01', 'rig-a.npy'), LAB_BYTES);
    const r = lacuna(['init', 'ws'], cwd);
    expect(r.status).toBe(1);
    expect(readFileSync(join(ws, 'data', 'kc', '2026-01', 'rig-a.npy')).equals(LAB_BYTES)).toBe(true);
    expect(existsSync(join(ws, 'audits'))).toBe(false); // nothing written
    expect(r.stderr).toContain('is not empty');
    expect(r.stderr).toContain('nothing was written');
    expect(r.stderr).toMatch(new RegExp(`it would write ${demoFiles - 1} files:\\n(?:\\s+\\S+\\n)*\\s+audits/kc-survey\\.md\\n`));
    expect(r.stderr).toMatch(/keep 1 file already there untouched:\n\s+data\/kc\/2026-01\/rig-a\.npy/);
    expect(r.stderr).toContain('--add-missing');
  });

  it('--add-missing writes the missing files and never replaces an existing one', () => {
    const cwd = tempDir();
    const ws = join(cwd, 'ws');
    mkdirSync(join(ws, 'data', 'kc', '2026-01'), { recursive: true });
    mkdirSync(join(ws, 'audits'), { recursive: true });
    writeFileSync(join(ws, 'data', 'kc', '2026-01', 'rig-a.npy'), LAB_BYTES);
    writeFileSync(join(ws, 'audits', 'kc-survey.md'), '---\naudit: kc-survey\n---\nthe lab\u2019s manifest\n');
    const r = lacuna(['init', 'ws', '--add-missing'], cwd);
    expect(r.status, r.stderr).toBe(0);
    expect(readFileSync(join(ws, 'data', 'kc', '2026-01', 'rig-a.npy')).equals(LAB_BYTES)).toBe(true);
    expect(readFileSync(join(ws, 'audits', 'kc-survey.md'), 'utf8')).toContain('the lab\u2019s manifest');
    expect(existsSync(join(ws, 'data', 'kc', '2026-02', 'rig-a.npy'))).toBe(true);
    expect(existsSync(join(ws, 'audits', 'pruned-net.md'))).toBe(true);
    expect(r.stderr).toContain(`${demoFiles - 2} files written`);
    expect(r.stderr).toMatch(/kept 2 existing files untouched:\n\s+audits\/kc-survey\.md\n\s+data\/kc\/2026-01\/rig-a\.npy/);
    // No temporary files left beside the written ones.
    const walk = (d: string): string[] => readdirSync(d, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? walk(join(d, e.name)) : [e.name]));
    expect(walk(ws).filter((n) => n.includes('.tmp'))).toEqual([]);
  });

  it('over an existing workspace (init run twice) replaces nothing', () => {
    const cwd = tempDir();
    expect(lacuna(['init', 'lab', '--quiet'], cwd).status).toBe(0);
    const f = join(cwd, 'lab', 'data', 'weights', 'dense.safetensors');
    writeFileSync(f, LAB_BYTES);
    rmSync(join(cwd, 'lab', 'data', 'imaging', '2026-03.npy'));
    expect(lacuna(['init', 'lab'], cwd).status).toBe(1);
    expect(existsSync(join(cwd, 'lab', 'data', 'imaging', '2026-03.npy'))).toBe(false);
    const r = lacuna(['init', 'lab', '--add-missing', '--quiet'], cwd);
    expect(r.status, r.stderr).toBe(0);
    expect(readFileSync(f).equals(LAB_BYTES)).toBe(true);
    expect(existsSync(join(cwd, 'lab', 'data', 'imaging', '2026-03.npy'))).toBe(true);
  });

  it('an existing file given as the folder is an input error (exit 1) naming it, and the file is unchanged', () => {
    const cwd = tempDir();
    writeFileSync(join(cwd, 'notes.txt'), LAB_BYTES);
    const r = lacuna(['init', 'notes.txt'], cwd);
    expect(r.status).toBe(1);
    expect(r.stderr).not.toContain('internal error');
    expect(r.stderr).toMatch(/notes\.txt is a file, not a folder/);
    expect(readFileSync(join(cwd, 'notes.txt')).equals(LAB_BYTES)).toBe(true);
    const under = lacuna(['init', 'notes.txt/lab'], cwd);
    expect(under.status).toBe(1);
    expect(under.stderr).not.toContain('internal error');
    expect(under.stderr).toContain('notes.txt/lab');
  });
});
