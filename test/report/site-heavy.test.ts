/**
 * A chart too large to inline (more than INLINE_CHART_MAX characters of SVG and spec) does not
 * make its page large: the page shows the figure file as an image and loads the spec from a
 * script beside it. The chart here is made large on purpose: a line of 40,000 points.
 */
import { existsSync, readFileSync, statSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { runInNewContext } from 'node:vm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildCharts, compileToVega } from '../../src/charts/index.ts';
import { INLINE_CHART_MAX } from '../../src/report/site-charts.ts';
import { renderVersion } from '../../src/report/site.ts';
import type { ChartSpec } from '../../src/types.ts';
import { activityFixture } from '../fixtures/audit-result.ts';

let tmp = '';
const r = activityFixture();
const dsId = r.datasets[0]!.id;

function bigChart(): ChartSpec {
  const values = Array.from({ length: 40_000 }, (_, i) => ({ bin: i, value: Math.sin(i / 50) }));
  const rects = Array.from({ length: 4_000 }, (_, i) => `<rect x="${i % 400}" y="${Math.floor(i / 400)}" width="1" height="1"/>`).join('');
  return {
    id: `${dsId}--big`,
    title: 'A large chart',
    description: 'Forty thousand points.',
    datasetId: dsId,
    spec: { $schema: 'https://vega.github.io/schema/vega-lite/v6.json', data: { values }, mark: 'line', encoding: { x: { field: 'bin', type: 'quantitative' }, y: { field: 'value', type: 'quantitative' } } },
    svg: `<svg xmlns="http://www.w3.org/2000/svg" width="400" height="10">${rects}</svg>`,
  };
}

beforeAll(async () => {
  tmp = await mkdtemp(join(tmpdir(), 'lacuna-heavy-'));
  const charts = [...buildCharts(r).map((c) => ({ ...c, svg: '<svg xmlns="http://www.w3.org/2000/svg"></svg>' })), bigChart()];
  await renderVersion({ result: r, charts, comparison: null, versions: [] }, join(tmp, 'v'));
});

afterAll(async () => {
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('a chart too large to inline', () => {
  it('is larger than the inline limit (so the test means something)', () => {
    expect(JSON.stringify(compileToVega(bigChart().spec)).length).toBeGreaterThan(INLINE_CHART_MAX);
  });

  it('leaves its page small: the SVG file as an image, the spec in a script beside it that yields the compiled spec', () => {
    const page = join(tmp, 'v', 'datasets', dsId, 'index.html');
    const html = readFileSync(page, 'utf8');
    expect(statSync(page).size).toBeLessThan(INLINE_CHART_MAX);
    expect(html).toContain(`<img class="chart-img" src="../../figures/${dsId}--big.svg" alt="">`);
    expect(html).toContain(`<script src="../../figures/${dsId}--big.spec.js"></script>`);
    expect(html).toContain(`data-vega-spec="fig-${dsId}--big-spec"`);
    const script = join(tmp, 'v', 'figures', `${dsId}--big.spec.js`);
    expect(existsSync(script)).toBe(true);
    const text = readFileSync(script, 'utf8');
    expect(text.includes('<')).toBe(false);
    // Run it as a browser would (a fresh context with only `window`): it sets the spec by holder id.
    const window: { lacunaSpecs?: Record<string, unknown> } = {};
    runInNewContext(text, { window });
    expect(window.lacunaSpecs![`fig-${dsId}--big-spec`]).toEqual(JSON.parse(JSON.stringify(compileToVega(bigChart().spec, { logger: { warn() {} } }))));
    // Ordinary charts stay inline.
    expect(html).toContain('<script type="application/json" id="fig-');
  });
});
