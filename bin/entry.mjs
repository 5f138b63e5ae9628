// Which code runs: the compiled JavaScript in dist/ when it was compiled from exactly the
// sources now in src/, otherwise the TypeScript sources through tsx.
//
// Why: transpiling on the fly costs about 0.4 s at every start (the loader hooks also see every
// module Eleventy and vega load), and each worker thread pays it again. `npm ci` compiles once
// (the `prepare` script, scripts/compile.mjs); an edit to any file under src/ changes the
// fingerprint, so a contributor's edit is never shadowed by stale output: it runs through tsx
// until the next `npm run compile`.
import { createHash } from 'node:crypto';
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export const REPO = fileURLToPath(new URL('..', import.meta.url));
export const SRC = join(REPO, 'src');
export const DIST = join(REPO, 'dist');
export const STAMP = join(DIST, '.compiled-from');

/** SHA-256 over every file under `root` (relative path and bytes, in sorted order): ~15 ms for src/. */
export function sourceFingerprint(root = SRC) {
  const hash = createHash('sha256');
  const walk = (dir) => {
    const entries = readdirSync(dir, { withFileTypes: true }).sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0));
    for (const e of entries) {
      const path = join(dir, e.name);
      if (e.isDirectory()) walk(path);
      else if (e.isFile()) hash.update(`${relative(root, path)}\0`).update(readFileSync(path)).update('\0');
    }
  };
  walk(root);
  return hash.digest('hex');
}

/** True when dist/ holds the compilation of the current src/. */
export function compiledIsCurrent() {
  if (process.env.LACUNA_RUN_SOURCES === '1') return false;
  let stamp;
  try {
    stamp = readFileSync(STAMP, 'utf8').trim();
  } catch {
    return false;
  }
  return stamp === sourceFingerprint();
}

/**
 * Import one of Lacuna's modules by its path under src/ without extension ('cli/main'):
 * dist/<path>.js when current, else src/<path>.ts through tsx. Returns the module and which ran.
 */
export async function importLacuna(path) {
  if (compiledIsCurrent()) {
    // Stack traces name the TypeScript lines (dist/ carries source maps); measured free at start-up.
    process.setSourceMapsEnabled(true);
    return { module: await import(pathToFileURL(join(DIST, `${path}.js`)).href), compiled: true };
  }
  const { register } = await import('tsx/esm/api');
  register();
  return { module: await import(pathToFileURL(join(SRC, `${path}.ts`)).href), compiled: false };
}
