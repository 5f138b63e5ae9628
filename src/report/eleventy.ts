/**
 * Run Eleventy 3 programmatically over Lacuna's templates with plain page data.
 *
 *   page models (plain objects) ──addGlobalData('pages')──▶ templates/pages.njk (paginated,
 *   one output file per model, `permalink` = model.file) ──▶ files in `outDir`
 *
 * The shared rules (JS front matter refused, Nunjucks only with autoescape, no data files) live
 * in the top-level `.eleventy.js` and are applied here by calling its `configureLacunaSite`.
 * `configPath: ''` stops Eleventy from loading any config file from the working directory (a
 * lab's workspace could hold one, and it would run as code).
 */
import './eleventy-env.ts'; // first: switches off Eleventy's watch-mode import hook (see there)
import Eleventy from '@11ty/eleventy';
import type { EleventyUserConfig } from '@11ty/eleventy';
import { fileURLToPath } from 'node:url';
import { InternalError } from '../errors.ts';
import { siteData } from './site-data.ts';

/** Kinds of page the templates know (`templates/_includes/page-<kind>.njk`). */
export type PageKind = 'report' | 'dataset' | 'drift' | 'compare' | 'audit' | 'latest' | 'site';

/** One output page: where it goes, its layout data and its model. */
export interface PageData {
  kind: PageKind;
  /** Output path relative to the output folder, forward slashes, e.g. `index.html`, `latest/index.html`. */
  file: string;
  /** `<title>` text. */
  title: string;
  /** The page's `<h1>` where the model does not carry one. */
  heading: string;
  /** Audit id and version shown in page heads ('' where not relevant). */
  audit: string;
  version: string;
  /** Relative path from this page to the site root (`../../`), ending with `/` or empty. */
  root: string;
  /** Links for the page's top navigation, relative to the page. */
  nav: { href: string; label: string; current: boolean }[];
  /** The page model (shape depends on `kind`). */
  model: unknown;
}

export interface SharedConfig {
  configureLacunaSite(cfg: EleventyUserConfig): void;
}

/** Folder of the templates (input of every Eleventy run). */
export const TEMPLATES_DIR = fileURLToPath(new URL('./templates/', import.meta.url));

let shared: Promise<SharedConfig> | null = null;

/** Load the shared configuration from the top-level `.eleventy.js` (one place for both entry points). */
export function loadSharedConfig(): Promise<SharedConfig> {
  shared ??= import(new URL('../../.eleventy.js', import.meta.url).href).then((mod: Partial<SharedConfig>) => {
    if (typeof mod.configureLacunaSite !== 'function') throw new InternalError('.eleventy.js does not export configureLacunaSite');
    return mod as SharedConfig;
  });
  return shared;
}

/** Refuse output paths that could leave the output folder or are not plain relative paths. */
function checkFile(file: string): void {
  if (!/^[A-Za-z0-9._-]+(\/[A-Za-z0-9._-]+)*$/.test(file) || file.split('/').some((p) => p === '..' || p === '.')) {
    throw new InternalError(`page path "${file}" is not a plain relative path`);
  }
}

/**
 * Render `pages` into `outDir` (which must not be inside the templates folder). Pages are plain
 * JSON-serialisable values; Eleventy sees them only as global data. Throws the Eleventy error
 * (with its cause chain) when a template fails. Cost: ~100 ms for the first run in a process,
 * ~15–30 ms per run after (measured on this project's machines, three small pages).
 */
export async function writePages(pages: PageData[], outDir: string): Promise<void> {
  for (const p of pages) checkFile(p.file);
  const { configureLacunaSite } = await loadSharedConfig();
  const elev = new Eleventy(TEMPLATES_DIR, outDir, {
    quietMode: true,
    configPath: '',
    config(cfg) {
      configureLacunaSite(cfg);
      cfg.addGlobalData('pages', pages);
      // Site-wide words from `_data/` (JSON, read by site-data.ts): page labels and the like.
      cfg.addGlobalData('lacuna', siteData());
    },
  });
  elev.disableLogger();
  try {
    await elev.write();
  } catch (err) {
    // The templates are ours and the data plain values, so a failure here is a bug; keep every
    // message of Eleventy's chain (it nests them as `originalError`) in the one we throw.
    throw new InternalError(`report pages could not be written to ${outDir}: ${eleventyMessages(err).join(' ← ')}`, err);
  }
}

/** Messages of an Eleventy error and the errors it wraps (`originalError`, or `cause`). */
export function eleventyMessages(err: unknown): string[] {
  const out: string[] = [];
  for (let e = err; e instanceof Error && out.length < 10; ) {
    out.push(e.message);
    const inner = e as Error & { originalError?: unknown; cause?: unknown };
    e = inner.originalError ?? inner.cause;
  }
  return out;
}
