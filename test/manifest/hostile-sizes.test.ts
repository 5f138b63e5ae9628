/**
 * Inputs sized to exhaust memory, time or the stack must be refused early with an InputError
 * that names the file and the place. Huge files are sparse (`truncate -s`, coreutils), so they
 * cost no disk; each is given to `lacuna check` in a child process with a capped heap
 * (--max-old-space-size=512), so a regression cannot take the machine down.
 *
 * - a manifest that is a 3 GiB file: refused by its size before a byte is read (was read whole,
 *   exit 70);
 * - a CSV and a spike table of one 300 MB line (no line break): refused at the line-length bound
 *   (was 90 s and 3.6 GB before the error);
 * - YAML nested 3,000 levels deep (flow brackets, compact sequences, indentation): refused before
 *   the parser recurses (was a stack overflow, exit 70).
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { parseManifestText } from '../../src/manifest/parse.ts';
import { MAX_YAML_DEPTH } from '../../src/manifest/yaml-depth.ts';
import { MAX_LINE } from '../../src/readers/text-lines.ts';

const root = mkdtempSync(join(tmpdir(), 'lacuna-sizes-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

function workspace(name: string): string {
  const ws = join(root, name);
  mkdirSync(join(ws, 'audits'), { recursive: true });
  mkdirSync(join(ws, 'data'), { recursive: true });
  return ws;
}
function sparse(file: string, size: string): void {
  const r = spawnSync('truncate', ['-s', size, file]);
  if (r.status !== 0) throw new Error(`truncate failed: ${r.stderr}`);
}
const run = (command: 'check' | 'build', ws: string) =>
  spawnSync(process.execPath, ['--max-old-space-size=512', resolve('bin/lacuna.mjs'), command, '--workspace', ws, ...(command === 'build' ? ['--out', join(ws, 'site')] : [])], {
    encoding: 'utf8',
    timeout: 120_000,
    env: { ...process.env, NO_COLOR: '1' },
  });
const manifest = (dataset: string) =>
  `---\naudit: big\ntitle: big\nkind: activity\naxis: time\nbin_ms: 10\ndatasets:\n  - ${dataset}\n---\n`;

describe('huge files are refused by size or line length, naming the file and place', () => {
  it('a 3 GiB manifest: refused by its size, without reading it', () => {
    const ws = workspace('manifest');
    sparse(join(ws, 'audits', 'huge.md'), '3G');
    const r = run('check', ws);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('audits/huge.md, file size: manifest is 3221225472 bytes; allowed: at most 1048576 bytes');
  }, 120_000);

  // `check` reads every line of a CSV table; for a spike table it reads the header only, so the
  // spike table goes through `build`, which reads every line.
  it.each([
    ['csv', 'check', 'data/one-line.csv', '{ id: a, path: ../data/one-line.csv }'],
    ['spikes', 'build', 'data/one-line-spikes.csv', '{ id: a, path: ../data/one-line-spikes.csv, format: spikes }'],
  ] as const)('a %s file of one 300 MB line (%s): refused at the line-length bound', (format, command, rel, entry) => {
    const ws = workspace(`line-${format}`);
    writeFileSync(join(ws, 'audits', 'big.md'), manifest(entry));
    sparse(join(ws, rel), '300M');
    const r = run(command, ws);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain(`${rel}, line 1: line is longer than ${MAX_LINE.toLocaleString('en-US')} characters`);
  }, 120_000);
});

describe('YAML nested deeper than the bound is refused before parsing', () => {
  const head = '---\naudit: deep\n';
  const cases: [string, string, number][] = [
    ['3,000 flow brackets', `${head}x: ${'['.repeat(3000)}${']'.repeat(3000)}\n---\n`, 3],
    ['3,000 flow mappings', `${head}x: ${'{a: '.repeat(3000)}1${'}'.repeat(3000)}\n---\n`, 3],
    ['3,000 compact sequences on one line', `${head}x:\n  ${'- '.repeat(3000)}1\n---\n`, 4],
    ['brackets after an apostrophe in a plain scalar', `${head}title: Kenyon's cells\nx: ${'['.repeat(3000)}${']'.repeat(3000)}\n---\n`, 4],
  ];
  it.each(cases)('%s: an InputError naming the line', (_name, text, line) => {
    let err: unknown;
    try {
      parseManifestText(text, 'audits/deep.md');
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).file).toBe('audits/deep.md');
    expect((err as InputError).line).toBe(line);
    expect((err as Error).message).toContain(`allowed: at most ${MAX_YAML_DEPTH} levels`);
  });

  it('deep block indentation is counted too', () => {
    let text = `${head}`;
    for (let d = 0; d < 100; d++) text += `${' '.repeat(d)}k${d}:\n`;
    text += `${' '.repeat(100)}v\n---\n`;
    expect(() => parseManifestText(text, 'audits/deep.md')).toThrow(/at most 64 levels/);
  });

  it('nesting at the bound, quoted brackets, comments and block scalars parse as before', () => {
    const ok = `${head}x: ${'['.repeat(MAX_YAML_DEPTH - 1)}1${']'.repeat(MAX_YAML_DEPTH - 1)}\n` +
      `q: "${'['.repeat(200)}"\ns: '${'{'.repeat(200)}'\n# ${'['.repeat(200)}\n` +
      `notes: |\n  ${'['.repeat(200)}\n  - - - - text\nafter: 1\n---\n`;
    const { data } = parseManifestText(ok, 'audits/ok.md');
    const d = data as Record<string, unknown>;
    expect(d.q).toBe('['.repeat(200));
    expect(d.s).toBe('{'.repeat(200));
    expect(d.notes).toBe(`${'['.repeat(200)}\n- - - - text\n`);
    expect(d.after).toBe(1);
    let depth = 0;
    for (let v: unknown = d.x; Array.isArray(v); v = v[0]) depth++;
    expect(depth).toBe(MAX_YAML_DEPTH - 1);
  });
});
