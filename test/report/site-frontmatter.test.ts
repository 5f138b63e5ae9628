/**
 * Canaries: JavaScript front matter in an Eleventy input cannot run under Lacuna's shared
 * configuration (`.eleventy.js`), and a config file in the working directory is never loaded.
 * A positive control shows the canary does fire when the rules are off, so the test can fail.
 * Engine names are those Eleventy 3.1 registers (UserConfig.js) plus gray-matter's `js` alias.
 */
import { existsSync } from 'node:fs';
import { mkdir, mkdtemp, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Eleventy from '@11ty/eleventy';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadSharedConfig, writePages } from '../../src/report/eleventy.ts';

let tmp = '';
beforeAll(async () => {
  tmp = await mkdtemp(join(tmpdir(), 'lacuna-frontmatter-'));
});
afterAll(async () => {
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

/** A template whose front matter, if evaluated, names an output file `canary-42.html`. */
const canary = (engine: string) => `---${engine}\n{ permalink: "canary-" + (6 * 7) + ".html" }\n---\nbody\n`;

async function build(engine: string, locked: boolean): Promise<{ error: unknown; files: string[] }> {
  const input = join(tmp, `in-${engine}-${locked}`);
  const output = join(tmp, `out-${engine}-${locked}`);
  await mkdir(input, { recursive: true });
  await writeFile(join(input, 'page.njk'), canary(engine));
  const { configureLacunaSite } = await loadSharedConfig(); // the top-level .eleventy.js
  const elev = new Eleventy(input, output, { quietMode: true, configPath: '', config: locked ? (cfg) => configureLacunaSite(cfg) : undefined });
  elev.disableLogger();
  let error: unknown = null;
  try {
    await elev.write();
  } catch (e) {
    error = e;
  }
  return { error, files: existsSync(output) ? await readdir(output) : [] };
}

/** Messages of an error and its causes (Eleventy keeps the inner error as `originalError`). */
function chain(e: unknown): string {
  const out: string[] = [];
  for (let x = e; x instanceof Error && out.length < 10; ) {
    out.push(x.message);
    const next = x as Error & { originalError?: unknown; cause?: unknown };
    x = next.originalError ?? next.cause;
  }
  return out.join(' <- ');
}

describe('JavaScript front matter', () => {
  it('positive control: with Eleventy defaults the canary runs (so the check below can fail)', async () => {
    const { error, files } = await build('js', false);
    expect(error).toBeNull();
    expect(files).toContain('canary-42.html');
  });

  it.each(['js', 'javascript', 'jsLegacy', 'JS', 'node'])('---%s is refused and never evaluated under the shared config', async (engine) => {
    const { error, files } = await build(engine, true);
    expect(error).not.toBeNull();
    expect(files).not.toContain('canary-42.html');
    if (engine !== 'node') expect(chain(error)).toMatch(/refused/);
  });
});

describe('writePages', () => {
  it('never loads an Eleventy config file from the working directory', async () => {
    const cwd = join(tmp, 'workspace');
    await mkdir(cwd, { recursive: true });
    const marker = join(tmp, 'config-ran');
    for (const name of ['.eleventy.js', 'eleventy.config.js', 'eleventy.config.mjs', 'eleventy.config.cjs']) {
      await writeFile(join(cwd, name), `require('node:fs').writeFileSync(${JSON.stringify(marker)}, 'x'); module.exports = () => ({});\n`);
    }
    await writeFile(join(cwd, 'package.json'), '{"type":"commonjs"}');
    const before = process.cwd();
    process.chdir(cwd);
    try {
      await writePages([{ kind: 'latest', file: 'index.html', title: 't', heading: 'h', audit: 'a', version: 'v', root: '', nav: [], model: { title: 't', version: 'v', target: 'v/index.html' } }], join(tmp, 'pages-out'));
    } finally {
      process.chdir(before);
    }
    expect(existsSync(join(tmp, 'pages-out', 'index.html'))).toBe(true);
    expect(existsSync(marker)).toBe(false);
  });

  it('refuses output paths that could leave the output folder', async () => {
    for (const file of ['../x.html', '/etc/x.html', 'a/../../x.html', 'a\\b.html', '']) {
      await expect(writePages([{ kind: 'site', file, title: '', heading: '', audit: '', version: '', root: '', nav: [], model: { audits: [] } }], join(tmp, 'never'))).rejects.toThrow(/not a plain relative path/);
    }
    expect(existsSync(join(tmp, 'never'))).toBe(false);
  });
});
