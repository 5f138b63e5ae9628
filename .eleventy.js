/**
 * Lacuna's Eleventy setup, kept in ONE place.
 *
 * - `src/report/eleventy.ts` imports `configureLacunaSite` from this file for every page set it
 *   builds (it passes `configPath: ''` so Eleventy never loads a config file from the working
 *   directory, which in a lab's workspace could be anyone's code, and then calls this function).
 * - `npx @11ty/eleventy` in this repository picks up the default export, so people who drive
 *   Eleventy by hand see the same rules. The templates need the data `lacuna build` hands over
 *   with `addGlobalData` (`pages` and the page models); without it there is nothing to render,
 *   so the default export builds no pages unless that data is present.
 *
 * The rules, and why:
 * 1. Front matter is data, never code: Eleventy 3 runs `---js` / `---javascript` front matter by
 *    default and keeps a `jsLegacy` eval engine; each is replaced by an engine that throws.
 *    `setFrontMatterParsingOptions` deep-merges, so these must be objects with `parse`, not bare
 *    functions (bare functions leave `jsLegacy` on).
 * 2. Only Nunjucks templates (`.njk`) are processed, with autoescape on and undefined values
 *    treated as errors, so a missing field is a loud bug rather than an empty cell.
 * 3. No template or directory data files (`*.11tydata.js`, `_data/*.js`) are read: the data dir
 *    points at a name that does not exist and data file suffixes are emptied.
 * 4. `.gitignore` is not consulted and `node_modules` is not ignored, so the templates still
 *    build when Lacuna is installed as a package (inside `node_modules`).
 */

/** @param {string} name */
function refuse(name) {
  return {
    parse() {
      throw new Error(`front matter of type "${name}" is refused: Lacuna templates and inputs are data, never code`);
    },
  };
}

/** Front matter engine names that would run JavaScript (gray-matter aliases `js` to `javascript`). */
export const REFUSED_FRONT_MATTER = ['js', 'javascript', 'jsLegacy', 'node'];

/** Where the templates live, relative to this file. */
export const TEMPLATES_DIR = 'src/report/templates';

/**
 * Apply Lacuna's shared Eleventy rules to a user config object.
 * @param {import('@11ty/eleventy').EleventyUserConfig} cfg
 */
export function configureLacunaSite(cfg) {
  /** @type {Record<string, {parse(): never}>} */
  const engines = {};
  for (const name of REFUSED_FRONT_MATTER) engines[name] = refuse(name);
  cfg.setFrontMatterParsingOptions({ engines });
  cfg.setTemplateFormats(['njk']);
  cfg.setNunjucksEnvironmentOptions({ autoescape: true, throwOnUndefined: true, trimBlocks: true, lstripBlocks: true });
  cfg.setDataFileSuffixes([]);
  cfg.setDataDirectory('.lacuna-no-data-files');
  cfg.setIncludesDirectory('_includes');
  cfg.setUseGitIgnore(false);
  cfg.ignores.delete('**/node_modules/**');
}

/** @param {import('@11ty/eleventy').EleventyUserConfig} cfg */
export default function (cfg) {
  configureLacunaSite(cfg);
  // Without page data from `lacuna build` the paginated template yields no pages.
  cfg.addGlobalData('pages', []);
  return { dir: { input: TEMPLATES_DIR, output: '_site' } };
}
