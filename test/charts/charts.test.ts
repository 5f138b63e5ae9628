/**
 * Chart specs: every spec compiles with vega-lite and renders with vega without a single
 * warning (collected through the loggers); interval bounds in the spec data are exactly the
 * fixture's; each chart carries a text alternative with its estimate. Sources for expected
 * values are named beside each check.
 */
import { describe, expect, it } from 'vitest';
import { buildCharts, compileToVega, renderChartSvg, renderChartSvgs } from '../../src/charts/index.ts';
import { STATIC_POINTS_MAX_ROWS, staticVariant } from '../../src/charts/render.ts';
import type { ActivityChartData, AuditResult, ChartSpec, MeasureResult } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

/** Independent formatting of an estimate to 3 significant digits (as the descriptions promise). */
const three = (x: number) => String(Number(x.toPrecision(3)));

/** Every inline `data.values` array anywhere in a Vega-Lite spec. */
function dataValues(spec: unknown): Record<string, unknown>[][] {
  const out: Record<string, unknown>[][] = [];
  const walk = (v: unknown) => {
    if (Array.isArray(v)) v.forEach(walk);
    else if (v && typeof v === 'object') {
      const o = v as Record<string, unknown>;
      const d = o.data as { values?: unknown } | undefined;
      if (d && Array.isArray(d.values)) out.push(d.values as Record<string, unknown>[]);
      Object.values(o).forEach(walk);
    }
  };
  walk(spec);
  return out;
}

function cusumVariant(): AuditResult {
  const r = activityFixture();
  r.drift!.chart = 'cusum';
  for (const s of r.drift!.series) {
    s.chart = 'cusum';
    // CUSUM points carry the decision interval H (DriftPoint.chartLimit); 0.05 is an arbitrary test value.
    for (const p of s.points) p.chartLimit = 0.05;
  }
  return r;
}

/** 200 units: forces the histogram form of the distributions. */
function manyUnitsVariant(): AuditResult {
  const r = activityFixture();
  const cd = r.datasets[0]!.chartData as ActivityChartData;
  // Deterministic spread of values in (0, 1): i/201 for i = 1..200.
  cd.unitLabels = Array.from({ length: 200 }, (_, i) => `u${i}`);
  cd.lifetimeSparseness = Array.from({ length: 200 }, (_, i) => (i + 1) / 201);
  cd.kurtosis = Array.from({ length: 200 }, (_, i) => (i % 20) - 1);
  cd.meanRate = Array.from({ length: 200 }, () => 1);
  return r;
}

const variants: [string, AuditResult][] = [
  ['activity fixture (EWMA drift)', activityFixture()],
  ['activity fixture with CUSUM drift', cusumVariant()],
  ['activity fixture with 200 units (histograms)', manyUnitsVariant()],
  ['weights fixture', weightsFixture()],
];

describe.each(variants)('%s', (_name, result) => {
  const charts = buildCharts(result);

  it('builds charts with unique ids, titles and descriptions', () => {
    expect(charts.length).toBeGreaterThan(3);
    expect(new Set(charts.map((c) => c.id)).size).toBe(charts.length);
    for (const c of charts) {
      expect(c.title.length).toBeGreaterThan(0);
      expect(c.description.length).toBeGreaterThan(40);
      expect(c.spec.description).toBe(c.description);
    }
  });

  it.each(charts.map((c) => [c.id, c] as [string, ChartSpec]))('%s compiles and renders without warnings', async (_id, chart) => {
    const warnings: string[] = [];
    const logger = { warn: (m: string) => warnings.push(m) };
    const vg = compileToVega(chart.spec, { logger });
    expect(Array.isArray(vg.marks)).toBe(true);
    const svg = await renderChartSvg(chart, { logger });
    expect(warnings).toEqual([]);
    expect(svg.startsWith('<svg')).toBe(true);
    expect(svg).toContain('</svg>');
  });

  it('never asks Vega-Lite for its own confidence intervals', () => {
    // Vega-Lite's `extent: "ci"` is an unseeded bootstrap of the mean (stack-notes.md).
    for (const c of charts) {
      const json = JSON.stringify(c.spec);
      expect(json).not.toContain('"ci"');
      expect(json).not.toMatch(/"(errorbar|errorband)"/);
    }
  });
});

describe('interval bounds and descriptions come from the result', () => {
  const result = activityFixture();
  const charts = buildCharts(result);
  const byId = new Map(charts.map((c) => [c.id, c]));

  it.each([
    ['lifetime-sparseness', 'lifetime_sparseness'],
    ['kurtosis', 'kurtosis'],
    ['population-sparseness', 'population_sparseness'],
  ] as const)('%s chart carries the fixture interval exactly and names the estimate', (suffix, measure) => {
    for (const ds of result.datasets) {
      const m = ds.measures[measure] as MeasureResult;
      const chart = byId.get(`${ds.id}--${suffix}`)!;
      expect(chart).toBeDefined();
      const bands = dataValues(chart.spec).flat().filter((v) => 'lower' in v && 'upper' in v);
      expect(bands.length).toBe(1);
      // Exact equality: the chart draws our bounds, not a recomputation (fixture values).
      expect(bands[0]!.lower).toBe(m.interval![0]);
      expect(bands[0]!.upper).toBe(m.interval![1]);
      expect(chart.description).toContain(three(m.estimate!));
      expect(chart.description).toContain(three(m.interval![0]));
      expect(chart.description).toContain(`n = ${m.n}`);
    }
  });

  it('across-datasets chart rows carry every dataset\'s estimate and interval exactly (null when there is none)', () => {
    for (const name of Object.keys(result.datasets[0]!.measures)) {
      const chart = byId.get(`across--${name.replace(/_/g, '-')}`)!;
      expect(chart, name).toBeDefined();
      const rows = dataValues(chart.spec).flat().filter((r) => 'dataset' in r);
      for (const ds of result.datasets) {
        const m = ds.measures[name as keyof typeof ds.measures];
        if (!m) continue;
        const row = rows.find((r) => r.dataset === ds.id)!;
        // Exact equality: the chart draws our numbers, not a recomputation (fixture values).
        expect(row.estimate).toBe(m.estimate);
        expect(row.lower).toBe(m.interval ? m.interval[0] : null);
        expect(row.upper).toBe(m.interval ? m.interval[1] : null);
      }
    }
  });

  it('population chart runs in seconds when the bin width is known', () => {
    const ds = result.datasets[0]!;
    const chart = byId.get(`${ds.id}--population-sparseness`)!;
    const rows = dataValues(chart.spec).flat().filter((v) => 'mid' in v);
    // Hand: last window starts at bin 5500, 500 bins of 50 ms → ends at 6000 × 0.05 s = 300 s.
    expect(rows[rows.length - 1]!.end).toBeCloseTo(300, 12);
    expect(JSON.stringify(chart.spec)).toContain('time (s)');
    // Dataset 2 has no bin width: the axis stays in bins (last window ends at bin 4800).
    const c2 = byId.get(`${result.datasets[1]!.id}--population-sparseness`)!;
    const rows2 = dataValues(c2.spec).flat().filter((v) => 'mid' in v);
    expect(rows2[rows2.length - 1]!.end).toBe(4800);
  });

  it('drift rows carry each month interval exactly; flagged months get a shape and a text label', async () => {
    const series = result.drift!.series[0]!;
    const chart = charts.find((c) => c.id.startsWith('drift--population-sparseness'))!;
    const rows = dataValues(chart.spec).flat().filter((v) => 'month' in v && 'status' in v);
    for (const p of series.points) {
      const r = rows.find((x) => x.month === p.month)!;
      expect(r.lower).toBe(p.interval ? p.interval[0] : null);
      expect(r.upper).toBe(p.interval ? p.interval[1] : null);
      expect(r.status).toBe(p.signal ? 'signal' : p.thin ? 'thin month' : 'in control');
    }
    const json = JSON.stringify(chart.spec);
    expect(json).toContain('"triangle-up"');
    const svg = await renderChartSvg(chart, { logger: { warn: () => undefined } });
    const flagged = series.points.filter((p) => p.signal).length; // 2 in the fixture
    // One text label per flagged month, plus the legend entry "signal".
    expect(svg.match(/>signal<\/text>/g)?.length).toBe(flagged + 1);
    for (const p of series.points.filter((q) => q.signal)) expect(chart.description).toContain(p.month);
    expect(chart.description).toContain(three(series.baseline!.mean));
  });
});

describe('purity and rendering helpers', () => {
  it('does not change its input and gives the same specs twice', () => {
    const r = activityFixture();
    const before = JSON.stringify(r);
    const a = buildCharts(r);
    expect(JSON.stringify(r)).toBe(before);
    expect(JSON.stringify(buildCharts(r))).toBe(JSON.stringify(a));
  });

  it('renderChartSvgs fills svg on copies', async () => {
    const charts = buildCharts(weightsFixture());
    const out = await renderChartSvgs(charts, { logger: { warn: () => undefined } });
    expect(out.every((c) => typeof c.svg === 'string' && c.svg.startsWith('<svg'))).toBe(true);
    expect(charts.every((c) => c.svg === undefined)).toBe(true);
  });
});

describe('CUSUM drift chart', () => {
  it('draws the decision interval H from the points, labelled with its value', () => {
    const r = cusumVariant();
    const chart = buildCharts(r).find((c) => c.id.startsWith('drift--'))!;
    const text = JSON.stringify(chart.spec);
    expect(text).toContain('"h":0.05');
    expect(text).toContain('decision interval H = 0.0500');
  });
});

describe('static SVG variant', () => {
  // Common practice, no source: a static image cannot show tooltips, and point overlays denser
  // than a few pixels apart only thicken the line. The live chart keeps the full spec.
  const lineSpec = (rows: number) => ({
    data: { values: Array.from({ length: rows }, (_, i) => ({ t: i, v: Math.sin(i / 7), tooltip: 'kept in data' })) },
    mark: { type: 'line', point: { size: 14, filled: true } },
    encoding: { x: { field: 't', type: 'quantitative' }, y: { field: 'v', type: 'quantitative' }, tooltip: [{ field: 'v', type: 'quantitative' }] },
  });

  it('drops tooltips always and point overlays above the row limit, leaving data and input untouched', () => {
    const dense = lineSpec(STATIC_POINTS_MAX_ROWS + 1);
    const before = JSON.stringify(dense);
    const s = staticVariant(dense) as typeof dense;
    expect(JSON.stringify(dense)).toBe(before);
    expect(s.mark).toEqual({ type: 'line' });
    expect('tooltip' in s.encoding).toBe(false);
    expect(s.data).toEqual(dense.data);
    const sparse = staticVariant(lineSpec(STATIC_POINTS_MAX_ROWS)) as ReturnType<typeof lineSpec>;
    expect(sparse.mark).toEqual({ type: 'line', point: { size: 14, filled: true } });
    // With a gap, a value between two gaps is a line of one point: the points must stay.
    const gappy = lineSpec(STATIC_POINTS_MAX_ROWS + 50);
    (gappy.data.values[10] as { v: number | null }).v = null;
    (gappy.data.values[12] as { v: number | null }).v = null;
    expect((staticVariant(gappy) as typeof gappy).mark).toEqual({ type: 'line', point: { size: 14, filled: true } });
  });

  it('the drawn SVG has point symbols only for the sparse series', async () => {
    const chart = (rows: number): ChartSpec => ({ id: `t${rows}`, title: 't', description: 'd', spec: lineSpec(rows) } as unknown as ChartSpec);
    const quiet = { logger: { warn: () => undefined } };
    expect(await renderChartSvg(chart(20), quiet)).toContain('mark-symbol');
    expect(await renderChartSvg(chart(500), quiet)).not.toContain('mark-symbol');
    // the value between two gaps is still drawn, as a point
    const gappy = chart(500);
    const rows = (gappy.spec as ReturnType<typeof lineSpec>).data.values as { v: number | null }[];
    rows[10].v = null;
    rows[12].v = null;
    expect(await renderChartSvg(gappy, quiet)).toContain('mark-symbol');
  });
});
