/**
 * The files every page shares, copied once into `<out>/assets/`: Vega's browser build (charts
 * become interactive; compiled to Vega at build time, so neither Vega-Lite nor vega-embed is
 * needed), Lacuna's stylesheet and the small script that starts the charts. Pages link them with
 * relative paths; nothing is fetched from the network.
 */
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { copyFile, mkdir, readFile, rename, writeFile } from 'node:fs/promises';
import { InternalError } from '../errors.ts';
import { cssCustomProperties } from '../charts/theme.ts';

/** Names of the shared files under `<out>/assets/`. */
export const ASSET_FILES = { vega: 'vega.min.js', css: 'lacuna.css', client: 'lacuna-charts.js' } as const;

/**
 * Where a package's main entry lives. `import.meta.resolve` (Node ≥ 20.6) is used where the
 * runtime offers it; `require.resolve` otherwise (some test runners rewrite `import.meta`).
 * Package `exports` hide `package.json`, so the entry file is the only stable handle.
 */
function packageEntryDir(name: string): string {
  const resolve = (import.meta as ImportMeta & { resolve?: (s: string) => string }).resolve;
  if (typeof resolve === 'function') {
    try {
      return dirname(fileURLToPath(resolve(name)));
    } catch {
      // fall through to require.resolve
    }
  }
  return dirname(createRequire(import.meta.url).resolve(name));
}

/** Absolute source paths of the shared assets, keyed by their name under `assets/`. */
export function assetSources(): Record<string, string> {
  return {
    [ASSET_FILES.vega]: join(packageEntryDir('vega'), 'vega.min.js'),
    [ASSET_FILES.css]: fileURLToPath(new URL('./style.css', import.meta.url)),
    [ASSET_FILES.client]: fileURLToPath(new URL('./site-client.js', import.meta.url)),
  };
}

/**
 * Copy the shared assets into `<outDir>/assets/` (created if needed; existing copies are
 * replaced whole: each file is copied beside its target and renamed over it).
 * Throws InternalError when a source is missing (a broken install).
 */
export async function copyAssets(outDir: string): Promise<void> {
  const dir = join(outDir, 'assets');
  await mkdir(dir, { recursive: true });
  for (const [name, src] of Object.entries(assetSources())) {
    const tmp = join(dir, `.${name}.tmp-${process.pid}`);
    try {
      // The stylesheet opens with the chart theme's values, which it uses for its ink and type.
      if (name === ASSET_FILES.css) await writeFile(tmp, `:root { ${cssCustomProperties()} }\n${await readFile(src, 'utf8')}`);
      else await copyFile(src, tmp);
    } catch (err) {
      throw new InternalError(`asset ${name} could not be copied from ${src}`, err);
    }
    await rename(tmp, join(dir, name));
  }
}
