/**
 * What a published site was built from: `<out>/.lacuna-site.json`.
 *
 *   { format, workspace, pages: { <audit>: { <version>: <SHA-256 of the record file> } }, indexes }
 *
 * - `workspace`: the real path of the workspace the site belongs to. A site shows one
 *   workspace's audits; building another workspace into it is refused unless the build is told
 *   to adopt the site (`--adopt-site`), and then every page whose record differs is regenerated.
 * - `pages`: the record each version folder was rendered from. A version whose record differs
 *   (or is unknown and its `results.json` differs) is rendered again.
 * - `indexes`: a digest of everything the audit indexes, the `latest/` forwarders and the site
 *   index show. It is written only after they are, so a build killed anywhere before leaves a
 *   digest that no longer matches, and the next build writes them again: the site converges to
 *   the records whatever was interrupted.
 */
import { createHash } from 'node:crypto';
import { existsSync, readFileSync, realpathSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import { canonicalJson } from './versions.ts';
import { refuseSymlink, writeFileDurable } from './state-files.ts';

export const SITE_STATE_FORMAT = 'lacuna-site/1';

export interface SiteState {
  format: typeof SITE_STATE_FORMAT;
  workspace: string;
  pages: Record<string, Record<string, string>>;
  indexes: string;
}

export function siteStateFile(out: string): string {
  return join(out, '.lacuna-site.json');
}

export function sha256Hex(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** The digest of the index pages' inputs. */
export function indexesDigest(inputs: unknown): string {
  return sha256Hex(canonicalJson(inputs));
}

/** The site's state, or null when it has none (a new folder, or a site from before this file). */
export function readSiteState(out: string): SiteState | null {
  const file = siteStateFile(out);
  refuseSymlink(file, out, 'site state file');
  if (!existsSync(file)) return null;
  try {
    const s = JSON.parse(readFileSync(file, 'utf8')) as SiteState;
    if (s && s.format === SITE_STATE_FORMAT && typeof s.workspace === 'string' && s.pages && typeof s.pages === 'object') return s;
  } catch {
    // unreadable: treated as no state, so every page is checked against its record
  }
  return null;
}

/**
 * The pages known to be current for `workspace`: the state's when the site is this workspace's;
 * none when it is another's and `adopt` is set (every page is then checked); an error otherwise.
 */
export function claimSite(out: string, workspace: string, state: SiteState | null, adopt: boolean): SiteState['pages'] {
  const real = realpathSync(workspace);
  if (!state) return {};
  if (state.workspace === real) return state.pages;
  if (adopt) return {};
  throw new InputError(`the site folder ${out} holds the reports of another workspace, ${state.workspace}`, {
    file: siteStateFile(out),
    hint: `build into another --out, or pass --adopt-site to make this site show ${real} (its pages are then regenerated from this workspace's records)`,
  });
}

export function writeSiteState(out: string, state: Omit<SiteState, 'format'>): void {
  writeFileDurable(siteStateFile(out), `${JSON.stringify({ format: SITE_STATE_FORMAT, ...state }, null, 1)}\n`);
}
