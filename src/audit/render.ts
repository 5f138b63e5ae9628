/**
 * Step 6 of a build: make the published site show what the records say now.
 *
 *   1. claim     — the site belongs to this workspace (`site-state.ts`), or is adopted by it
 *   2. clean     — leftovers of a killed build (`.tmp-*` folders) are removed
 *   3. plan      — every version of every audit in `records/` (its manifest present or not):
 *                  a version is current when its folder has `index.html` and was rendered from
 *                  this very record (SHA-256 of the record file; or, when the site does not
 *                  know, its `results.json` equals the record's result); others are pending
 *   4. versions  — each pending version rendered into `.tmp-<version>-<pid>` and renamed into
 *                  place (an existing folder is moved aside first and removed after)
 *   5. indexes   — the audit indexes, `latest/` forwarders, site index and assets, written again
 *                  whenever what they show differs from what the site state says they show
 *   6. state     — `.lacuna-site.json`, written last and durably
 *
 * A build killed at any point leaves the state no newer than the pages, so the next build
 * redoes whatever was not finished. A rebuild with nothing to do loads neither Eleventy nor
 * the chart renderer.
 */
import { existsSync, lstatSync, mkdirSync, readdirSync, readFileSync, realpathSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import type { Progress } from '../cli/progress.ts';
import { TOOL_VERSION } from '../version.ts';
import { compareVersions } from './compare.ts';
import { RenderFailure, type RenderFailureItem } from './render-failure.ts';
import { cleanSiteLeftovers, refuseSymlink } from './state-files.ts';
import { claimSite, indexesDigest, readSiteState, writeSiteState, type SiteState } from './site-state.ts';
import { listRecords, type VersionRecord } from './versions.ts';
import type { AuditResult, VersionEntry } from '../types.ts';

export interface RenderOptions {
  /** Take over a site folder that holds another workspace's reports. */
  adoptSite?: boolean;
}

/** The report and chart modules (loaded on first use: a no-op rebuild never loads them). */
export function loadRenderModules() {
  return Promise.all([import('../report/site.ts'), import('../charts/index.ts')]);
}

const own = <T>(o: Record<string, T> | undefined, k: string): T | undefined => (o && Object.hasOwn(o, k) ? o[k] : undefined);

/** Does `<dir>/results.json` hold exactly what rendering this result writes there? */
function sameResults(dir: string, result: AuditResult): boolean {
  const file = join(dir, 'results.json');
  if (!existsSync(file)) return false;
  return readFileSync(file, 'utf8') === `${JSON.stringify(result, null, 2)}\n`;
}

interface IndexInput {
  audit: string;
  title: string;
  versions: VersionEntry[];
  latest: string;
  created: string;
  datasets: number;
  findings: { exclude: number; caution: number; notice: number };
  manifestRemoved: boolean;
}

/**
 * Bring `out` up to date with every audit's records. `manifestAudits` are the audits that have
 * a manifest now; an audit with records but no manifest keeps its pages and is listed in the
 * site index as having lost its manifest. Returns the versions rendered (`audit/version`).
 */
export async function renderSite(out: string, workspace: string, manifestAudits: string[], progress: Progress, options: RenderOptions = {}): Promise<string[]> {
  // 1–2. Claim and clean.
  mkdirSync(out, { recursive: true });
  const state = readSiteState(out);
  const known = claimSite(out, workspace, state, options.adoptSite ?? false);
  const realWorkspace = realpathSync(workspace);
  const recordsRoot = join(workspace, 'records');
  const allAudits = existsSync(recordsRoot)
    ? readdirSync(recordsRoot).filter((a) => !a.startsWith('.') && lstatSync(join(recordsRoot, a)).isDirectory()).sort()
    : [];
  for (const audit of allAudits) refuseSymlink(join(out, audit), out, 'site folder');
  const removed = cleanSiteLeftovers(out, allAudits);
  if (removed.length) progress.info(`removed what an interrupted build left in ${out}: ${removed.join(', ')}`);

  // 3. Plan.
  const present = new Set(manifestAudits);
  const pages: SiteState['pages'] = {};
  const pending: { audit: string; version: string; digest: string }[] = [];
  const indexes: IndexInput[] = [];
  const recordsOf = new Map<string, VersionRecord[]>();
  for (const audit of allAudits) {
    const records = listRecords(workspace, audit);
    if (!records.length) continue;
    recordsOf.set(audit, records.map((r) => r.record));
    pages[audit] = {};
    for (const { record, sha256: digest } of records) {
      const version = record.entry.version;
      const dir = join(out, audit, version);
      const was = own(own(known, audit), version);
      const current = existsSync(join(dir, 'index.html')) && (was === digest || (was === undefined && sameResults(dir, record.result)));
      if (current) pages[audit][version] = digest;
      else pending.push({ audit, version, digest });
    }
    const versions = records.map((r) => r.record.entry);
    const latest = records[records.length - 1].record.result;
    const findings = { exclude: 0, caution: 0, notice: 0 };
    for (const d of latest.datasets) for (const f of d.findings) findings[f.level] += 1;
    indexes.push({ audit, title: latest.title, versions, latest: latest.version, created: latest.created, datasets: latest.datasets.length, findings, manifestRemoved: !present.has(audit) });
  }
  const digest = indexesDigest({ tool: TOOL_VERSION, indexes });
  const missing = (p: string) => !existsSync(join(out, p));
  const indexesCurrent =
    state !== null &&
    state.workspace === realWorkspace &&
    state.indexes === digest &&
    !missing('index.html') &&
    !missing('assets') &&
    indexes.every((a) => !missing(join(a.audit, 'index.html')) && !missing(join(a.audit, 'latest', 'index.html')));
  if (!pending.length && indexesCurrent) {
    if (JSON.stringify(pages) !== JSON.stringify(state.pages)) writeSiteState(out, { workspace: realWorkspace, pages, indexes: digest });
    return [];
  }

  // 4. Versions.
  const [{ renderVersion, renderAuditIndex, renderSiteIndex, copyAssets }, { buildCharts, renderChartSvgs }] = await loadRenderModules();
  const rendered: string[] = [];
  const step = progress.step('rendering pages', pending.length);
  // A version that cannot be rendered is left out (its record stays the truth); the rest of the
  // site is written and the build then stops with a RenderFailure naming it. The site state does
  // not list it, so the next build renders it again.
  const failures: RenderFailureItem[] = [];
  for (const p of pending) {
    const records = recordsOf.get(p.audit)!;
    const all = records.map((r) => r.entry);
    const idx = all.findIndex((v) => v.version === p.version);
    const rec = records[idx];
    const prev = idx > 0 ? records[idx - 1].result : null;
    const failed = (what: 'charts' | 'pages', cause: unknown) =>
      failures.push({ audit: p.audit, version: p.version, step: what, record: `records/${p.audit}/${p.version}.json`, cause });
    let charts: Awaited<ReturnType<typeof renderChartSvgs>>;
    try {
      charts = await renderChartSvgs(buildCharts(rec.result));
    } catch (err) {
      failed('charts', err);
      continue;
    }
    const target = join(out, p.audit, p.version);
    const tmp = join(out, p.audit, `.tmp-${p.version}-${process.pid}`);
    const old = join(out, p.audit, `.tmp-old-${p.version}-${process.pid}`);
    rmSync(tmp, { recursive: true, force: true });
    mkdirSync(tmp, { recursive: true });
    try {
      // A version's page lists only its own history, so regenerating it later gives the same page.
      await renderVersion({ result: rec.result, charts, comparison: prev ? compareVersions(prev, rec.result) : null, versions: all.slice(0, idx + 1) }, tmp);
      // A folder already there is a leftover or a page of another record: moved aside, then removed.
      if (existsSync(target)) renameSync(target, old);
      renameSync(tmp, target);
      rmSync(old, { recursive: true, force: true });
    } catch (err) {
      rmSync(tmp, { recursive: true, force: true });
      failed('pages', err);
      continue;
    }
    pages[p.audit][p.version] = p.digest;
    rendered.push(`${p.audit}/${p.version}`);
    step.advance(1);
  }
  step.done();

  // 5. Indexes.
  for (const a of indexes) await renderAuditIndex({ audit: a.audit, title: a.title, versions: a.versions, latest: a.latest }, join(out, a.audit));
  await renderSiteIndex(
    indexes.map(({ audit, title, latest, created, datasets, findings, manifestRemoved }) => ({ audit, title, latest, created, datasets, findings, manifestRemoved })),
    out,
  );
  await copyAssets(out);

  // 6. State, last.
  writeSiteState(out, { workspace: realWorkspace, pages, indexes: digest });
  if (failures.length) throw new RenderFailure(failures);
  return rendered;
}
