/**
 * Faults seen on the built demo report, each checked through the public chart builders:
 * a legend for the threshold curves, estimate labels kept off the data, a fitted axis for
 * population sparseness near 1, whole numbers written in full, integer degree bins, and charts
 * narrow enough to stay legible on a phone. Sources of expected values are named per check.
 */
import { describe, expect, it } from 'vitest';
import { buildCharts, renderChartSvg } from '../../src/charts/index.ts';
import { acrossDatasetsChart } from '../../src/charts/across-datasets.ts';
import { formatNumber } from '../../src/report/site-format.ts';
import type { ActivityChartData, ChartSpec, WeightChartData } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';
import { specMarks } from '../helpers/chart-marks.ts';

const quiet = { logger: { warn: (m: string) => expect.fail(`chart warning: ${m}`) } };

const type = (l: Record<string, any>) => (typeof l.mark === 'string' ? l.mark : l.mark.type);
/** Text of the `<text>` elements of an SVG. */
const texts = (svg: string) => [...svg.matchAll(/<text[^>]*>([^<]*)<\/text>/g)].map((m) => m[1]!);

describe('threshold curves have a legend naming each layer', () => {
  it('the SVG holds a legend whose labels are the layer names', async () => {
    const chart = buildCharts(weightsFixture()).find((c) => c.id.endsWith('--threshold-curve'))!;
    const svg = await renderChartSvg(chart, quiet);
    expect(svg).toContain('role-legend');
    const legend = svg.slice(svg.indexOf('role-legend'));
    for (const layer of ['fc1.weight', 'fc2.weight', 'out.weight']) expect(texts(legend)).toContain(layer);
  });
});

describe('estimate labels do not cover data', () => {
  const r = activityFixture();
  const charts = [...buildCharts(r), ...buildCharts(weightsFixture())];
  it.each(['--population-sparseness', '--lifetime-sparseness', '--kurtosis', '--layer-density'])('%s: no text mark sits at the estimate; its value is in the subtitle', (suffix) => {
    const some = charts.filter((c) => c.datasetId !== null && c.id.endsWith(suffix)); // per-dataset charts (not the across-datasets ones)
    expect(some.length).toBeGreaterThan(0);
    for (const c of some) {
      const textAtEstimate = specMarks(c.spec).filter((l) => type(l) === 'text' && (l.encoding?.x?.field === 'estimate' || l.encoding?.y?.field === 'estimate'));
      expect(textAtEstimate).toEqual([]);
      const ds = [...r.datasets, ...weightsFixture().datasets].find((d) => d.id === c.datasetId)!;
      const m = suffix === '--layer-density' ? ds.measures.density! : suffix === '--kurtosis' ? ds.measures.kurtosis! : ds.measures[suffix.slice(2).replace('-', '_') as 'lifetime_sparseness']!;
      const subtitle = ((c.spec.title as { subtitle?: string[] }).subtitle ?? []).join(' ');
      // The estimate to 3 significant digits (ECMA-262 toPrecision), as the subtitle writes it.
      expect(subtitle).toContain(m.estimate!.toPrecision(3));
    }
  });
});

describe('population sparseness near 1 is drawn on a fitted axis', () => {
  // Windows between 0.95 and 1 and an interval [0.989, 0.994], as on the demo (values made up).
  const r = activityFixture();
  const ds = r.datasets[0]!;
  const cd = ds.chartData as ActivityChartData;
  cd.populationWindows = cd.populationWindows.map((w, i) => ({ ...w, mean: 0.99 + (i % 3) * 0.002, min: 0.951 + i * 0.001, max: 1 }));
  ds.measures.population_sparseness = { ...ds.measures.population_sparseness!, estimate: 0.991, interval: [0.989, 0.994] };
  const chart = buildCharts(r).find((c) => c.id === `${ds.id}--population-sparseness`)!;

  it('the y domain covers the windows and the interval, not 0 to 1', () => {
    const line = specMarks(chart.spec).find((l) => type(l) === 'line')!;
    const domain = line.encoding.y.scale.domain as [number, number];
    expect(domain[0]).toBeGreaterThan(0.9); // a fitted axis, far above 0
    expect(domain[0]).toBeLessThanOrEqual(0.951); // the lowest window minimum
    expect(domain[1]).toBe(1); // the highest maximum is 1, and sparseness cannot exceed 1
  });

  it('the caption says the axis is fitted', () => {
    expect(chart.description).toMatch(/vertical axis spans 0\.9\d* to 1, fitted to the window values and the interval/);
  });
});

describe('whole numbers are written in full', () => {
  it('a page writes an event count of 9,596 and a value of 9,470.4 as whole numbers', () => {
    // Hand: 9596 has no fraction; 9470.4 has four integer digits, more than 3 significant.
    expect(formatNumber(9596)).toBe('9,596');
    expect(formatNumber(9470.4)).toBe('9,470');
  });

  it('the across-datasets chart of a count shows 9,596 and no 9600, 9.6e+3 or 9,596.000000', async () => {
    const r = activityFixture();
    const ds = r.datasets[1]!;
    ds.eventMeasures = { ...ds.eventMeasures, l0: { estimate: 9596, interval: null, level: null, method: null, n: 40, excluded: 0, summary: 'count of events', note: 'a count' } };
    const chart = acrossDatasetsChart(r.datasets, 'event_l0')!;
    // The value is written in the caption (the chart's description); the axis holds ticks only.
    expect(chart.description).toContain('9,596');
    expect(chart.description).not.toMatch(/9600|9\.6e|9,596\.0/);
    const t = texts(await renderChartSvg(chart, quiet)).join(' | ');
    expect(t).not.toMatch(/9\.6e|9,596\.0/);
  });
});

describe('degree histograms use integer bins from the data', () => {
  const degreeChart = (degrees: WeightChartData['degrees']): ChartSpec => {
    const r = weightsFixture();
    (r.datasets[0]!.chartData as WeightChartData).degrees = degrees;
    return buildCharts(r).find((c) => c.id.includes('--degrees--'))!;
  };

  it('every node with degree 47 (a dense 48-node layer): one bar from 46.5 to 47.5, axis labels without decimals', async () => {
    const chart = degreeChart([{ layer: 'fc2.weight', direction: 'in', degree: 47, count: 48 }, { layer: 'fc2.weight', direction: 'out', degree: 47, count: 48 }]);
    const bars = (chart.spec.data as { values: Record<string, number>[] }).values;
    expect(bars.map((b) => [b.x0, b.x1, b.count])).toEqual([[46.5, 47.5, 48], [46.5, 47.5, 48]]);
    const svg = await renderChartSvg(chart, quiet);
    expect(texts(svg)).toContain('47');
    expect(texts(svg).some((t) => /^4[78]\.0$/.test(t))).toBe(false);
  });

  it('a wide spread: integer-aligned bins of a whole width, counts kept', () => {
    // Degrees 0..99, one node each: 100 values over at most 40 bars → width ceil(100/40) = 3.
    const rows = Array.from({ length: 100 }, (_, d) => ({ layer: 'fc2.weight', direction: 'in' as const, degree: d, count: 1 }));
    const chart = degreeChart(rows);
    const bars = (chart.spec.data as { values: Record<string, number>[] }).values;
    expect(bars.every((b) => b.first % 3 === 0 && b.last - b.first === 2)).toBe(true);
    expect(bars.reduce((s, b) => s + b.count, 0)).toBe(100);
    expect(bars).toHaveLength(34); // bins 0–2, 3–5, …, 99–101
  });
});

describe('charts stay legible at a phone width', () => {
  // A 420 px-wide phone shows the chart column about 362 px wide (measured in Chromium on the
  // demo report); 12 px text scaled by 362 / width stays ≥ 10 px when width ≤ 434 px.
  const all = [...buildCharts(activityFixture()), ...buildCharts(weightsFixture())];
  it.each(all.map((c) => [c.id, c] as [string, ChartSpec]))('%s is at most 434 px wide', async (_id, chart) => {
    const svg = await renderChartSvg(chart, quiet);
    expect(Number(svg.match(/^<svg[^>]*\swidth="(\d+(?:\.\d+)?)"/)![1])).toBeLessThanOrEqual(434);
  });
});
