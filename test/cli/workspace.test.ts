/**
 * Without `--workspace`, commands use the current folder or the nearest folder above it
 * holding audits/, say so in one line, and write the site inside that workspace; run where there
 * is none, they say so and point to `lacuna init` and `--workspace`: never the demo inside the
 * installed package. Run from temporary folders outside the repository, as a user runs them.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { existsSync, mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { cleanUp, lacuna, tempDir } from './run.ts';

afterAll(cleanUp);

describe('default workspace', () => {
  let ws: string;
  beforeAll(() => {
    ws = join(tempDir(), 'lab');
    expect(lacuna(['init', ws, '--quiet']).status).toBe(0);
    // Keep one small audit so the build below stays short.
    rmSync(join(ws, 'audits', 'kc-survey.md'));
    rmSync(join(ws, 'audits', 'kc-imaging.md'));
  });

  it('outside any workspace: check, build and compare say none was found and suggest init or --workspace', () => {
    const elsewhere = tempDir();
    for (const args of [['check'], ['build'], ['compare', 'pruned-net', 'v001', 'v002'], ['serve']]) {
      const r = lacuna(args, elsewhere);
      expect(r.status, args.join(' ')).toBe(2);
      expect(r.stderr).toContain('no workspace found');
      expect(r.stderr).toContain(elsewhere);
      expect(r.stderr).toContain('lacuna init');
      expect(r.stderr).toContain('--workspace');
      expect(r.stderr).not.toMatch(/content|no problems/); // not the packaged demo
    }
    expect(lacuna(['serve'], elsewhere).stderr).toContain('--out SITE-DIR');
  });

  it('inside a workspace (or a folder under it): check uses it and says which in one line', () => {
    const top = lacuna(['check'], ws);
    expect(top.status, top.stderr).toBe(0);
    expect(top.stderr).toContain(`using workspace ${ws} (found from the current folder)\n`);
    expect(top.stderr).toContain('checked 1 manifest and 3 datasets: no problems');
    const deep = join(ws, 'data', 'weights');
    const below = lacuna(['check'], deep);
    expect(below.status, below.stderr).toBe(0);
    expect(below.stderr).toContain(`using workspace ${ws} (found from the current folder)\n`);
  });

  it('an explicit --workspace is used as given, relative to the current folder, without the line', () => {
    const r = lacuna(['check', '--workspace', 'lab'], join(ws, '..'));
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).not.toContain('using workspace');
    const none = lacuna(['check', '--workspace', 'nowhere'], join(ws, '..'));
    expect(none.status).toBe(1);
    expect(none.stderr).toContain('no audits/ folder');
  });

  it('build writes the site to WORKSPACE/_site by default and says so', () => {
    const sub = join(ws, 'data');
    mkdirSync(sub, { recursive: true });
    const r = lacuna(['build', '--workers', '1'], sub);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toContain(`using workspace ${ws} (found from the current folder), output ${join(ws, '_site')}\n`);
    expect(existsSync(join(ws, '_site', 'index.html'))).toBe(true);
    expect(existsSync(join(sub, '_site'))).toBe(false);
  });
});
