/**
 * Nothing from a result can run in a report page: titles, ids, notes, paths and finding
 * messages are escaped; inline JSON cannot close its `<script>`; only plain SVG is inlined.
 * Attack strings: the OWASP XSS Filter Evasion Cheat Sheet forms (`<script>`, `onerror=`,
 * `javascript:` links) and the HTML Living Standard's script-data end-tag rule (`</script>`
 * ends a script element wherever it appears, so JSON inside must not contain `<`).
 */
import { readFileSync, readdirSync, statSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildCharts, renderChartSvgs } from '../../src/charts/index.ts';
import { safeSvg, scriptJson } from '../../src/report/site-charts.ts';
import { renderAuditIndex, renderSiteIndex, renderVersion } from '../../src/report/site.ts';
import type { AuditResult } from '../../src/types.ts';
import { activityFixture } from '../fixtures/audit-result.ts';

const XSS = '<script>alert(1)</script>';

function hostile(): AuditResult {
  const r = activityFixture();
  r.title = `Rig ${XSS} "quoted" & 'single'`;
  r.audit = `a${XSS}`;
  r.notes = `Notes ${XSS}\n\n[x](javascript:alert(1)) <img src=x onerror=alert(1)> {{ 7*7 }} {% raw %}`;
  r.tool.commit = `"><script>alert(1)</script>`;
  const ds = r.datasets[0];
  ds.id = `<img src=x onerror=alert(1)>`;
  ds.findings[0].message = `bad ${XSS}`;
  ds.findings[0].where = [`</code>${XSS}`];
  ds.files[0].path = `data/"><svg onload=alert(1)>.npy`;
  r.inputs[0].path = ds.files[0].path;
  r.parameters.bootstrap = { seed: XSS };
  ds.measures.population_sparseness!.summary = `</td>${XSS}`;
  return r;
}

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => (statSync(join(dir, name)).isDirectory() ? walk(join(dir, name)) : [join(dir, name)]));
}

let tmp = '';
let pages: { file: string; html: string }[] = [];

beforeAll(async () => {
  tmp = await mkdtemp(join(tmpdir(), 'lacuna-safety-'));
  const r = hostile();
  const charts = await renderChartSvgs(buildCharts(r));
  const versions = [{ version: r.version, created: r.created, inputsHash: 'x', changes: `changed ${XSS}` }];
  const comparison = {
    audit: r.audit,
    from: `v0${XSS}`,
    to: r.version,
    inputs: [{ path: `p${XSS}`, change: 'changed' as const }],
    parameters: [{ name: `n${XSS}`, from: XSS, to: { a: XSS } }],
    datasets: [{ id: ds0(r), change: 'changed' as const, measures: [] }],
    summary: `s ${XSS}`,
  };
  await renderVersion({ result: r, charts, comparison, versions }, join(tmp, 'out', 'audit', 'v'));
  await renderAuditIndex({ audit: r.audit, title: r.title, versions, latest: `..${XSS}` }, join(tmp, 'out', 'audit'));
  await renderSiteIndex([{ audit: r.audit, title: r.title, latest: r.version, created: r.created, datasets: 2, findings: { exclude: 1, caution: 0, notice: 0 } }], join(tmp, 'out'));
  pages = walk(join(tmp, 'out'))
    .filter((f) => f.endsWith('.html'))
    .map((file) => ({ file, html: readFileSync(file, 'utf8') }));
});

function ds0(r: AuditResult) {
  return r.datasets[0].id;
}

afterAll(async () => {
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('hostile strings in a result render as inert text', () => {
  it('wrote every page (report, a page per dataset, drift, compare, audit index, latest, site index)', () => {
    const files = pages.map((p) => p.file.slice(tmp.length)).sort();
    const datasetPages = files.filter((f) => f.startsWith('/out/audit/v/datasets/'));
    // One page per dataset, each in a folder named by a slug of the (hostile) id: letters, digits, . _ - only.
    expect(datasetPages.length).toBe(hostile().datasets.length);
    for (const f of datasetPages) expect(f).toMatch(/^\/out\/audit\/v\/datasets\/[A-Za-z0-9._-]+\/index\.html$/);
    expect(files.filter((f) => !datasetPages.includes(f))).toEqual(
      ['/out/audit/index.html', '/out/audit/latest/index.html', '/out/audit/v/compare.html', '/out/audit/v/drift.html', '/out/audit/v/index.html', '/out/index.html'].sort(),
    );
  });

  it('no injected element, handler or javascript: address on any page', () => {
    for (const { file, html } of pages) {
      expect(html.includes('<script>alert'), file).toBe(false);
      expect(/<img[\s>]/i.test(html), file).toBe(false);
      expect(/<svg[^>]*\sonload=/i.test(html), file).toBe(false);
      expect(/href\s*=\s*["']?\s*javascript:/i.test(html), file).toBe(false);
      // Event handler attributes: look inside real tags only, with quoted values removed (escaped
      // text such as `&lt;img onerror=…&gt;` is inert and must not count).
      const tags = html.replace(/<script type="application\/json"[\s\S]*?<\/script>/g, '').match(/<[a-zA-Z][^>]*>/g) ?? [];
      const handlers = tags.filter((t) => /\son[a-z]+\s*=/i.test(t.replace(/"[^"]*"/g, '""')));
      expect(handlers, file).toEqual([]);
      // Every <script> is either one of our two files or inert JSON.
      for (const m of html.matchAll(/<script([^>]*)>/g)) expect(m[1], file).toMatch(/^ (src="(\.\.\/)*assets\/(vega\.min|lacuna-charts)\.js"|type="application\/json" id="[^"]+")$/);
    }
  });

  it('the text is still there, escaped', () => {
    const report = pages.find((p) => p.file.endsWith('/v/index.html'))!.html;
    expect(report).toContain('Rig &lt;script&gt;alert(1)&lt;/script&gt; &quot;quoted&quot; &amp; &#39;single&#39;');
    expect(report).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(report).toContain('bad &lt;script&gt;alert(1)&lt;/script&gt;');
    // Notes are markdown, not a template: the braces come through unchanged (no "49").
    expect(report).toContain('{{ 7*7 }} {% raw %}');
    expect(report).toContain('[x](javascript:alert(1))');
  });

  it('inline JSON blocks hold no "<" at all, and parse back to the compiled spec', () => {
    const report = pages.filter((p) => p.file.includes('/v/datasets/')).map((p) => p.html).join('\n');
    const blocks = [...report.matchAll(/<script type="application\/json" id="[^"]+">([\s\S]*?)<\/script>/g)].map((m) => m[1]);
    expect(blocks.length).toBeGreaterThan(3);
    for (const b of blocks) {
      expect(b.includes('<')).toBe(false);
      expect(() => JSON.parse(b)).not.toThrow();
    }
    // The hostile dataset id reaches the chart titles, escaped as \u003c inside the JSON.
    expect(blocks.some((b) => b.includes('\\u003cimg src=x onerror=alert(1)\\u003e'))).toBe(true);
  });
});

describe('scriptJson', () => {
  it('round-trips and never contains <, >, & or the JS line separators', () => {
    const value = { a: '</script><!-- x -->', b: '\u2028\u2029', c: [1.5, null, 'a&b'] };
    const text = scriptJson(value);
    expect(/[<>&\u2028\u2029]/.test(text)).toBe(false);
    expect(JSON.parse(text)).toEqual(value);
  });
});

describe('safeSvg', () => {
  it('accepts what Vega draws', async () => {
    const [chart] = await renderChartSvgs(buildCharts(activityFixture()).slice(0, 1));
    expect(chart.svg).toBeTruthy();
    expect(safeSvg(chart.svg)).toBe(chart.svg!.trim());
  });

  it.each([
    ['a script element', '<svg><script>alert(1)</script></svg>'],
    ['an event handler', '<svg onload="alert(1)"></svg>'],
    ['a handler on a child', '<svg><rect onmouseover="x()"/></svg>'],
    ['foreign HTML', '<svg><foreignObject><div>x</div></foreignObject></svg>'],
    ['an external image', '<svg><image href="https://t.example/p.png"/></svg>'],
    ['a javascript: link', '<svg><a href="javascript:alert(1)"><text>x</text></a></svg>'],
    ['an external url() fill', '<svg><rect style="fill:url(https://t.example/#g)"/></svg>'],
    ['two documents', '<svg></svg><script>alert(1)</script><svg></svg>'],
    ['not SVG', '<div>x</div>'],
  ])('refuses %s', (_what, svg) => {
    expect(safeSvg(svg)).toBeNull();
  });
});
