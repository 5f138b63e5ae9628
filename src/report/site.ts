/**
 * The static report site: one folder per audit version, an index per audit, one site index.
 *
 *   <out>/index.html                       renderSiteIndex   every audit
 *   <out>/assets/                          copyAssets        vega.min.js, lacuna.css, lacuna-charts.js
 *   <out>/<audit>/index.html               renderAuditIndex  every version, what changed
 *   <out>/<audit>/latest/index.html        renderAuditIndex  forwards to the newest version
 *   <out>/<audit>/<version>/               renderVersion     (written into a target folder the
 *        index.html drift.html compare.html                   caller renames into place)
 *        datasets/<id>/index.html (one page per dataset: its charts, findings, files)
 *        results.json summary.{csv,md,tex} references.bib methods.{md,txt} figures/<chart>.svg
 *
 * Pipeline of `renderVersion`, numbered as in its body:
 *   1. prepare charts (safe inline SVG, Vega spec compiled at build time, text alternative)
 *   2. build page models (plain text values: every number with what it is, its interval and n)
 *   3. write the pages with Eleventy (`eleventy.ts`; templates in `templates/`)
 *   4. write the downloads (`site-downloads.ts`)
 * Every page links `../../assets/` relatively, so the site works from `file://` and any static
 * host; nothing is requested from the network.
 */
import { compileToVega } from '../charts/index.ts';
import type { AuditResult, ChartSpec, VersionComparison, VersionEntry } from '../types.ts';
import { chartModels, isDriftChart } from './site-charts.ts';
import { compareModel, driftModel } from './site-drift.ts';
import { writeDownloads } from './site-downloads.ts';
import type { PageData } from './eleventy.ts';
import { writePages } from './eleventy.ts';
import { uniqueSlugger } from './site-format.ts';
import type { AuditIndexInput, SiteAuditInput } from './site-index.ts';
import { auditIndexModel, latestModel, siteIndexModel } from './site-index.ts';
import { datasetPaths, datasetSection, reportModel } from './site-model.ts';
import { versionTexts } from './site-texts.ts';

export { copyAssets } from './assets.ts';

export interface RenderVersionInput {
  result: AuditResult;
  /** Charts from `buildCharts` (with `svg` from `renderChartSvgs` where available). */
  charts: ChartSpec[];
  /** Changes since the previous version, or null for the first version. */
  comparison: VersionComparison | null;
  /** Every version of this audit, this one included (for navigation). */
  versions: VersionEntry[];
}

/** Problems that did not stop the build (a chart that failed to compile, an SVG refused). */
export interface RenderReport {
  problems: string[];
}

function versionNav(current: 'report' | 'drift' | 'compare', hasDrift: boolean, hasCompare: boolean): PageData['nav'] {
  const nav = [{ href: 'index.html', label: 'Report', current: current === 'report' }];
  if (hasDrift) nav.push({ href: 'drift.html', label: 'Drift', current: current === 'drift' });
  if (hasCompare) nav.push({ href: 'compare.html', label: 'Changes since previous', current: current === 'compare' });
  nav.push({ href: '../index.html', label: 'All versions', current: false }, { href: '../../index.html', label: 'All audits', current: false });
  return nav;
}

/**
 * Write the complete page set of one version into `targetDir` (created if missing; nothing is
 * written outside it). Assets are not copied here: call `copyAssets(outDir)` once per site.
 * The pages expect to end up at `<out>/<audit>/<version>/` (they link `../../assets/`).
 * Returns non-fatal problems (also visible on the page as a chart left static).
 */
export async function renderVersion(input: RenderVersionInput, targetDir: string): Promise<RenderReport> {
  const { result, comparison } = input;
  // 1. charts
  const anchorFor = uniqueSlugger();
  const prepared = chartModels(input.charts, { compile: (spec) => compileToVega(spec, { logger: { warn() {} } }), slugger: anchorFor });
  const reportCharts = prepared.charts.filter((c) => !isDriftChart(c));
  const datasetHref = datasetPaths(result);
  const driftCharts = prepared.charts.filter((c) => isDriftChart(c));
  const figures = prepared.charts.flatMap((c) => (c.file ? [{ file: c.file, title: c.title }] : []));
  // 2. models
  const texts = versionTexts(result);
  const hasDrift = result.drift !== null;
  const hasCompare = comparison !== null;
  const common = { root: '../../', audit: result.audit, version: result.version };
  const pages: PageData[] = [
    {
      ...common,
      kind: 'report',
      file: 'index.html',
      title: `${result.title} — ${result.version}`,
      heading: result.title,
      nav: versionNav('report', hasDrift, hasCompare),
      model: reportModel(result, reportCharts, texts, { hasCompare, figures, datasetHref }),
    },
  ];
  for (const ds of result.datasets) {
    const dir = datasetHref.get(ds.id) ?? '';
    // Figure files live in the version folder, two levels up from a dataset page.
    const charts = reportCharts.filter((c) => c.datasetId === ds.id).map((c) => ({ ...c, file: c.file ? `../../${c.file}` : null, specScript: c.specScript ? `../../${c.specScript}` : null }));
    pages.push({
      root: '../../../../',
      audit: result.audit,
      version: result.version,
      kind: 'dataset',
      file: `${dir}index.html`,
      title: `${ds.id} — ${result.title} — ${result.version}`,
      heading: ds.id,
      nav: versionNav('report', hasDrift, hasCompare).map((n) => ({ ...n, href: `../../${n.href}`, current: false })),
      model: { section: datasetSection(ds, `${dir}index.html`, charts), title: result.title, version: result.version },
    });
  }
  if (result.drift) {
    pages.push({
      ...common,
      kind: 'drift',
      file: 'drift.html',
      title: `Drift — ${result.title} — ${result.version}`,
      heading: `Drift: ${result.title}`,
      nav: versionNav('drift', hasDrift, hasCompare),
      model: driftModel(result.drift, driftCharts, uniqueSlugger()),
    });
  }
  if (comparison) {
    pages.push({
      ...common,
      kind: 'compare',
      file: 'compare.html',
      title: `Changes ${comparison.from} → ${comparison.to} — ${result.title}`,
      heading: `Changes since ${comparison.from}`,
      nav: versionNav('compare', hasDrift, hasCompare),
      model: compareModel(comparison),
    });
  }
  // 3. pages
  await writePages(pages, targetDir);
  // 4. downloads
  await writeDownloads(result, prepared.charts, texts, targetDir);
  return { problems: prepared.problems };
}

/**
 * Write `<auditDir>/index.html` (every version, newest first, with date and what changed) and
 * `<auditDir>/latest/index.html`, which forwards to the newest version with a meta refresh and
 * a plain link (no symlink: some static hosts do not follow them). Other files in `auditDir`
 * (the version folders) are left alone.
 */
export async function renderAuditIndex(audit: AuditIndexInput, auditDir: string): Promise<void> {
  const common = { audit: audit.audit, version: audit.latest, heading: audit.title };
  await writePages(
    [
      {
        ...common,
        kind: 'audit',
        file: 'index.html',
        title: `${audit.title} — versions`,
        root: '../',
        nav: [
          { href: 'latest/index.html', label: 'Latest report', current: false },
          { href: 'index.html', label: 'All versions', current: true },
          { href: '../index.html', label: 'All audits', current: false },
        ],
        model: auditIndexModel(audit),
      },
      {
        ...common,
        kind: 'latest',
        file: 'latest/index.html',
        title: `${audit.title} — latest version`,
        root: '../../',
        nav: [],
        model: latestModel(audit),
      },
    ],
    auditDir,
  );
}

/** Write `<outDir>/index.html`, listing every audit with its latest version and findings per level. */
export async function renderSiteIndex(audits: SiteAuditInput[], outDir: string): Promise<void> {
  await writePages(
    [
      {
        kind: 'site',
        file: 'index.html',
        title: 'Lacuna — sparsity audits',
        heading: 'Sparsity audits',
        audit: '',
        version: '',
        root: '',
        nav: [],
        model: siteIndexModel(audits),
      },
    ],
    outDir,
  );
}
