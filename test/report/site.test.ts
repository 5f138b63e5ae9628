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
  it('pages, downloads and one SVG per chart (issue 4 list), a page per dataset', () => {
    const { versionDir, result } = site.audits[0];
    for (const f of ['index.html', 'drift.html', 'compare.html', 'results.json', 'summary.csv', 'summary.md', 'summary.tex', 'references.bib', 'methods.md', 'methods.txt']) {
      expect(existsSync(join(versionDir, f)), f).toBe(true);
    }
    for (const ds of result.datasets) expect(existsSync(join(versionDir, 'datasets', ds.id, 'index.html')), ds.id).toBe(true);
    // The per-dataset "all measures" chart is left off the pages (the overview table holds its numbers).
    const chartIds = buildCharts(result).map((c) => c.id).filter((id) => !id.endsWith('--measures'));
    expect(chartIds.length).toBeGreaterThan(5);
    for (const id of chartIds) expect(existsSync(join(versionDir, 'figures', `${id}.svg`)), id).toBe(true);
    expect(existsSync(join(versionDir, 'figures', 'rig-a-2024-01--measures.svg'))).toBe(false);
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
  it('overview table: one row per dataset, estimate with its interval, findings per level', () => {
    const html = squash(read(join(site.audits[0].versionDir, 'index.html')));
    const row1 = rowWith(html, '>rig-a-2024-01</a>');
    // rig-a-2024-01 population sparseness: estimate 0.4948261737… → 3 significant digits 0.495;
    // interval [0.4712, 0.5179] → [0.471, 0.518] (fixture).
    expect(row1).toContain('<th scope="row"><a href="datasets/rig-a-2024-01/index.html">rig-a-2024-01</a></th><td>rig A</td><td class="num">0.495<span class="ci">[0.471, 0.518]</span></td>');
    // Kurtosis of rig-a-2024-01: 4.4555 → 4.46 (the 4th digit 5 rounds up); [2.0412, 7.9903] → [2.04, 7.99].
    expect(row1).toContain('<td class="num">4.46<span class="ci">[2.04, 7.99]</span></td>');
    // Fixture findings of rig-a-2024-01: 2 exclude, 1 notice; no event measures (a dash).
    expect(row1).toContain('<td class="num">—</td><td class="findings-cell">2 exclude, 1 notice</td>');
    const row2 = rowWith(html, '>rig-a-2024-02</a>');
    // rig-a-2024-02 Hoyer has no interval: the estimate alone.
    expect(row2).toContain('<td class="num">0.551</td>');
    // Event-based measures get their own column: 0.8125 is exact in binary, a tie at 3 digits, and
    // ECMA-262 toPrecision picks the larger n on a tie → 0.813; [0.7904, 0.8336] → [0.790, 0.834].
    expect(html).toContain('<th scope="col" class="num">Population sparseness (event-based)</th>');
    expect(row2).toContain('<td class="num">0.813<span class="ci">[0.790, 0.834]</span></td>');
    // 2 datasets → 2 data rows (plus one month heading row each).
    expect(html.match(/<th scope="row"><a href="datasets\//g)?.length).toBe(2);
    // Method and level said once per column, not per row: kurtosis intervals are percentile (fixture).
    expect(html).toContain('<dt>Kurtosis</dt><dd>median over units of each unit’s excess kurtosis g2 across bins; interval: 95% percentile bootstrap.</dd>');
  });

  it('dataset page: each measure in words with n and excluded, and a measure without an interval says why', () => {
    const page = squash(read(join(site.audits[0].versionDir, 'datasets', 'rig-a-2024-01', 'index.html')));
    // n 5964, excluded 36 (fixture) for population sparseness.
    expect(page).toContain('<li>Population sparseness: 0.495, [0.471, 0.518] (95% BCa bootstrap, 2,000 resamples of blocks-of-bins, blocks of 12 bins (auto), seed 20240117); n = 5,964, excluded 36.');
    const weights = squash(read(join(site.audits[1].versionDir, 'datasets', 'mlp-checkpoint-40', 'index.html')));
    // density 0.4213 → 0.421; n 3392 → 3,392 (fixture).
    expect(weights).toContain('<li>Density: 0.421, no interval: every weight was read: no sampling interval; n = 3,392');
  });

  it('findings grouped by kind, those that can bias a number before routine ones', () => {
    const html = squash(read(join(site.audits[0].versionDir, 'index.html')));
    // Fixture: silent-bins (exclude, 36) and silent-units (exclude, 1) in rig-a-2024-01, session-join
    // (caution) in rig-a-2024-02, few-units (notice) in rig-a-2024-01.
    expect(rowWith(html, '>silent bins<')).toContain('<td class="num">36</td><td><a href="datasets/rig-a-2024-01/index.html">rig-a-2024-01</a> (36)</td>');
    const order = ['>silent bins<', '>session join<', '>few units<'].map((k) => html.indexOf(k));
    expect(order.every((x) => x > 0)).toBe(true);
    expect(order).toEqual([...order].sort((a, b) => a - b));
    // No internal code on the version page; the dataset page keeps it beside the words.
    expect(html).not.toContain('<code>silent-bins</code>');
    const page = squash(read(join(site.audits[0].versionDir, 'datasets', 'rig-a-2024-01', 'index.html')));
    expect(page).toContain('<code>bins 101–110</code>, <code>bins 3302–3327</code>');
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
    const perDataset = buildCharts(result).filter((c) => c.datasetId !== null && !c.id.endsWith('--measures'));
    for (const c of perDataset) {
      const html = read(join(versionDir, 'datasets', c.datasetId!, 'index.html'));
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

describe('site-wide words come from _data/', () => {
  it('every page label of _data/labels.json heads its section on the version page', () => {
    const html = read(join(site.audits[0].versionDir, 'index.html'));
    const labels = JSON.parse(read('_data/labels.json')) as Record<string, string>;
    for (const [key, text] of Object.entries(labels)) expect(html, key).toMatch(new RegExp(`<h2 [^>]*>${text}</h2>`));
    // And the level meanings, from _data/levels.json.
    const levels = JSON.parse(read('_data/levels.json')) as { levels: Record<string, { meaning: string }> };
    for (const l of Object.values(levels.levels)) expect(html).toContain(l.meaning);
  });
});

describe('the comparison page shows only what changed', () => {
  it('a dataset whose estimates did not move gets one line, not a table of zeros', () => {
    // fixtureComparison: rig-a-2024-01 is `same` with a delta of 0; rig-a-2024-02 changed
    // (lifetime sparseness 0.7012 → 0.72717, +0.02597, intervals overlap).
    const html = squash(read(join(site.audits[0].versionDir, 'compare.html')));
    expect(html).not.toContain('<code>rig-a-2024-01</code>');
    expect(html).toContain('<p class="unchanged">The other dataset: no estimate changed.</p>');
    expect(rowWith(html, '>Lifetime sparseness<')).toContain('<td class="num">0.701</td><td class="num">0.727</td><td class="num">+0.0260</td>');
    expect(rowWith(html, '>Lifetime sparseness<')).toContain('<td>intervals overlap</td>');
    expect(html).toContain('<code>data/2024-02/session_2.csv</code>');
  });
});

describe('every page links only to files that exist, and loads nothing from the network', () => {
  it('local href/src targets resolve; no http(s) src; assets linked relatively', () => {
    const pages = walk(site.outDir).filter((p) => p.endsWith('.html'));
    // site index, 2 × (audit index + latest/), v1-rig-a: report, drift, compare, 2 dataset pages +
    // previous version's report, drift and 2 dataset pages; mlp-pruning: report and 1 dataset page
    expect(pages.length).toBe(16);
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
