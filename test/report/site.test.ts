/**
 * The report site rendered from the hand-made fixtures (`test/fixtures/audit-result.ts`):
 * every file listed in issue 4 is written, the numbers on the page are the fixture's numbers
 * (rounded by hand below), every local link and asset resolves, and each page has one `<h1>`,
 * headings in order, landmarks and a skip link.
 */
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { mkdtemp, readdir, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { dirname, join, relative } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildCharts } from '../../src/charts/index.ts';
import { renderVersion } from '../../src/report/site.ts';
import { activityFixture } from '../fixtures/audit-result.ts';
import { buildFixtureSite } from '../browser/fixture-site.ts';
import type { FixtureSite } from '../browser/fixture-site.ts';

let tmp = '';
let site: FixtureSite;

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = join(dir, name);
    return statSync(p).isDirectory() ? walk(p) : [p];
  });
}

const read = (p: string) => readFileSync(p, 'utf8');
/** Collapse whitespace between tags so a row can be matched in one pattern. */
const squash = (html: string) => html.replace(/>\s+</g, '><');
/** The table row holding `needle` (short failure messages instead of the whole page). */
function rowWith(html: string, needle: string): string {
  const at = html.indexOf(needle);
  if (at < 0) return `(no row with ${needle})`;
  return html.slice(html.lastIndexOf('<tr>', at), html.indexOf('</tr>', at) + 5);
}
/** The element that starts at `open` up to the first `close` after it. */
function slice(html: string, open: string, close: string): string {
  const at = html.indexOf(open);
  return at < 0 ? `(missing ${open})` : html.slice(at, html.indexOf(close, at) + close.length);
}

beforeAll(async () => {
  tmp = await mkdtemp(join(tmpdir(), 'lacuna-site-'));
  site = await buildFixtureSite(join(tmp, 'site'));
});

afterAll(async () => {
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('renderVersion writes every file of a version folder', () => {
  it('pages, downloads and one SVG per chart (issue 4 list)', () => {
    const { versionDir, result } = site.audits[0];
    for (const f of ['index.html', 'drift.html', 'compare.html', 'results.json', 'summary.csv', 'summary.md', 'summary.tex', 'references.bib', 'methods.md']) {
      expect(existsSync(join(versionDir, f)), f).toBe(true);
    }
    const chartIds = buildCharts(result).map((c) => c.id);
    expect(chartIds.length).toBeGreaterThan(5);
    for (const id of chartIds) expect(existsSync(join(versionDir, 'figures', `${id}.svg`)), id).toBe(true);
    expect(JSON.parse(read(join(versionDir, 'results.json')))).toEqual(result);
  });

  it('writes no drift or comparison page when there is none (weights fixture)', () => {
    const { versionDir } = site.audits[1];
    expect(existsSync(join(versionDir, 'index.html'))).toBe(true);
    expect(existsSync(join(versionDir, 'drift.html'))).toBe(false);
    expect(existsSync(join(versionDir, 'compare.html'))).toBe(false);
  });

  it('writes only inside the target folder', async () => {
    const parent = await mkdtemp(join(tmpdir(), 'lacuna-target-'));
    try {
      await renderVersion({ result: activityFixture(), charts: [], comparison: null, versions: [] }, join(parent, 'staging'));
      expect(await readdir(parent)).toEqual(['staging']);
    } finally {
      await rm(parent, { recursive: true, force: true });
    }
  });

  it('writes the audit index, the latest/ forwarder, the site index and the assets', () => {
    const out = site.outDir;
    for (const f of ['index.html', 'assets/vega.min.js', 'assets/lacuna.css', 'assets/lacuna-charts.js', 'v1-rig-a/index.html', 'v1-rig-a/latest/index.html']) {
      expect(existsSync(join(out, f)), f).toBe(true);
    }
    const latest = read(join(out, 'v1-rig-a/latest/index.html'));
    expect(latest).toContain('<meta http-equiv="refresh" content="0; url=../2024-06-30T12-00-00Z/index.html">');
    expect(latest).toContain('<a href="../2024-06-30T12-00-00Z/index.html">');
    // Newest first: the fixture version (2024-06-30) before the made-up previous one (2024-05-31).
    const audit = read(join(out, 'v1-rig-a/index.html'));
    expect(audit.indexOf('2024-06-30T12-00-00Z')).toBeLessThan(audit.indexOf('2024-05-31T08-00-00Z'));
    expect(audit).toContain('[latest]');
  });
});

describe('the report page shows the fixture numbers with what they are', () => {
  it('summary rows: estimate, interval, level and method, n, excluded', () => {
    const html = squash(read(join(site.audits[0].versionDir, 'index.html')));
    // rig-a-2024-01 population sparseness: estimate 0.4948261737… → 3 significant digits 0.495;
    // interval [0.4712, 0.5179] → [0.471, 0.518]; level 0.95 BCa; n 5964; excluded 36 (fixture).
    expect(rowWith(html, '>0.495<')).toContain(
      '<th scope="row" class="measure-cell">Population sparseness</th><td class="num">0.495</td><td class="num">[0.471, 0.518]</td><td>95% BCa bootstrap</td><td class="num">5,964</td><td class="num">36</td>',
    );
    // Kurtosis of rig-a-2024-01: 4.4555 → 4.46 (the 4th digit 5 rounds up); [2.0412, 7.9903] → [2.04, 7.99], percentile.
    expect(rowWith(html, '>4.46<')).toContain('<th scope="row" class="measure-cell">Kurtosis</th><td class="num">4.46</td><td class="num">[2.04, 7.99]</td><td>95% percentile bootstrap</td><td class="num">10</td><td class="num">2</td>');
    // rig-a-2024-02 Hoyer has no interval: a dash and the fixture's note, with n 10 and 0 excluded.
    expect(rowWith(html, '>0.551<')).toContain(
      '<td class="num">0.551</td><td class="num">—</td><td><span class="no-interval">no interval: the bootstrap distribution was degenerate</span></td><td class="num">10</td><td class="num">0</td>',
    );
    // Event-based measures are labelled as such: 0.8125 is exact in binary, a tie at 3 digits, and
    // ECMA-262 toPrecision picks the larger n on a tie → 0.813; [0.7904, 0.8336] → [0.790, 0.834].
    expect(rowWith(html, '(event-based)')).toMatch(/Population sparseness <span class="variant">\(event-based\)<\/span><\/th><td class="num">0\.813<\/td><td class="num">\[0\.790, 0\.834\]<\/td>/);
  });

  it('weights audit: a measure without a sampling interval says why', () => {
    const html = squash(read(join(site.audits[1].versionDir, 'index.html')));
    // density 0.4213 → 0.421; n 3392 → 3,392 (fixture).
    expect(rowWith(html, '>0.421<')).toContain('<th scope="row" class="measure-cell">Density</th><td class="num">0.421</td><td class="num">—</td><td><span class="no-interval">every weight was read: no sampling interval</span></td><td class="num">3,392</td>');
  });

  it('findings grouped by level, with the bracketed level word, counts and places', () => {
    const html = squash(read(join(site.audits[0].versionDir, 'index.html')));
    // Fixture: 2 exclude findings (rig-a-2024-01), 1 caution (rig-a-2024-02), 1 notice.
    expect(slice(html, '<h3 id="findings-exclude-h">', '</h3>')).toBe('<h3 id="findings-exclude-h"><span class="marker marker-exclude">[exclude]</span> 2 findings</h3>');
    expect(slice(html, '<h3 id="findings-caution-h">', '</h3>')).toBe('<h3 id="findings-caution-h"><span class="marker marker-caution">[caution]</span> 1 finding</h3>');
    const bins = slice(html, '<code>silent-bins</code>', '</li>');
    expect(bins).toContain('<span class="count">count 36</span>');
    expect(bins).toContain('<code>bins 101–110</code>, <code>bins 3302–3327</code>');
    // Levels come in the order exclude, caution, notice.
    expect(html.indexOf('findings-exclude-h')).toBeLessThan(html.indexOf('findings-caution-h'));
    expect(html.indexOf('findings-caution-h')).toBeLessThan(html.indexOf('findings-notice-h'));
  });

  it('header: version, tool, commit, and the provenance of every input with hash and size', () => {
    const { versionDir, result } = site.audits[0];
    const html = read(join(versionDir, 'index.html'));
    expect(html).toContain(`<code>${result.version}</code>`);
    expect(html).toContain('lacuna 0.1.0, Node v20.18.0');
    expect(html).toContain('<code>abc1234</code>');
    for (const f of result.inputs) {
      expect(html).toContain(`<code>${f.path}</code>`);
      expect(html).toContain(`<code class="hash">${f.sha256}</code>`);
    }
    // 576128 bytes = 562.6 KiB → "563 KiB" (one decimal only below 10); exact count beside it.
    expect(html).toContain('563 KiB<span class="exact"> (576,128 bytes)</span>');
    expect(html).toContain(`<code class="hash">${result.manifest.sha256}</code>`);
    expect(html).toContain('<code>bootstrap.seed</code></dt><dd><code>20240117</code>');
  });

  it('each chart is a figure with inline SVG, its Vega spec as inert JSON, and its description as caption', () => {
    const { versionDir, result } = site.audits[0];
    const html = read(join(versionDir, 'index.html'));
    const perDataset = buildCharts(result).filter((c) => c.datasetId !== null);
    for (const c of perDataset) {
      const at = html.indexOf(`id="fig-${c.id}"`);
      expect(at, c.id).toBeGreaterThan(0);
      const fig = html.slice(at, html.indexOf('</figure>', at));
      expect(fig).toContain('<svg');
      expect(fig).toContain('<script type="application/json"');
      expect(fig).toContain(`<figcaption id="fig-${c.id}-cap">`);
    }
    const drift = read(join(versionDir, 'drift.html'));
    expect(drift).toContain('id="fig-drift--population-sparseness--rig-a"');
    expect(drift).toContain('Screening aid, not a verdict.');
  });

  it('cautions, methods, notes and downloads are on the page', () => {
    const html = read(join(site.audits[0].versionDir, 'index.html'));
    expect(html).toMatch(/Drift flags \(control-chart signals and trend tests\) are screening aids/);
    expect(html).toMatch(/Data from human participants may be published/);
    expect(html).toContain('Recorded on rig A; the May 2024 sessions used a new amplifier.');
    for (const f of ['results.json', 'summary.csv', 'summary.md', 'summary.tex', 'references.bib', 'methods.md']) expect(html).toContain(`<a href="${f}">`);
  });
});

describe('every page links only to files that exist, and loads nothing from the network', () => {
  it('local href/src targets resolve; no http(s) src; assets linked relatively', () => {
    const pages = walk(site.outDir).filter((p) => p.endsWith('.html'));
    // site index, 2 × (audit index + latest/), v1-rig-a: report, drift, compare + previous version's
    // report and drift; mlp-pruning: report
    expect(pages.length).toBe(11);
    for (const page of pages) {
      const html = read(page);
      for (const m of html.matchAll(/\s(href|src)="([^"]*)"/g)) {
        const [, attr, url] = m;
        if (url.startsWith('#') || url === 'data:,') continue;
        if (attr === 'src') expect(url, `${page}: ${url}`).not.toMatch(/^[a-z]+:/i);
        if (/^https?:/.test(url)) continue; // a link a reader may follow; never loaded by the page
        const target = join(dirname(page), decodeURIComponent(url.split('#')[0]));
        expect(existsSync(target), `${relative(site.outDir, page)} → ${url}`).toBe(true);
      }
      expect(html).toContain('<link rel="icon" href="data:,">');
    }
  });

  it('one h1, headings never skip a level going down, main landmark and skip link', () => {
    for (const page of walk(site.outDir).filter((p) => p.endsWith('.html'))) {
      const html = read(page);
      const levels = [...html.matchAll(/<h([1-6])[\s>]/g)].map((m) => Number(m[1]));
      expect(levels.filter((l) => l === 1).length, page).toBe(1);
      expect(levels[0], page).toBe(1);
      for (let i = 1; i < levels.length; i++) expect(levels[i] - levels[i - 1], `${page} heading ${i}`).toBeLessThanOrEqual(1);
      expect(html).toContain('<main id="main"');
      expect(html).toContain('<a class="skip-link" href="#main">');
      // Every table has a caption and its column headers a scope.
      const tables = html.match(/<table/g)?.length ?? 0;
      expect(html.match(/<caption/g)?.length ?? 0, page).toBe(tables);
      expect(html).not.toMatch(/<th(?=[\s>])(?![^>]*scope=)[^>]*>/);
    }
  });
});
