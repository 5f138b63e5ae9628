/**
 * One measure across datasets (src/charts/across-datasets.ts). The rows must carry each
 * dataset's estimate and interval exactly as the result holds them (fixture values, not a
 * recomputation); groups must differ by colour AND shape AND be named; the rendered SVG must
 * name every dataset and group. Expected values are the fixture's own inputs, and the median
 * is worked out by hand beside the check.
 */
import { describe, expect, it } from 'vitest';
import { acrossDatasetsChart, acrossDatasetsCharts, acrossDatasetsMeasures, acrossDatasetsRows, NO_GROUP } from '../../src/charts/across-datasets.ts';
import { compileToVega, renderChartSvg } from '../../src/charts/render.ts';
import type { AuditResult, DatasetResult } from '../../src/types.ts';
import { activityFixture } from '../fixtures/audit-result.ts';
import { specMarks } from '../helpers/chart-marks.ts';

/** The activity fixture's two datasets (rig A) plus two copies as rig B, one an outlier. */
function fourDatasets(): DatasetResult[] {
  const r: AuditResult = activityFixture();
  const [a1, a2] = r.datasets as [DatasetResult, DatasetResult];
  const b1 = structuredClone(a1);
  b1.id = 'rig-b-2024-01';
  b1.group = 'rig B';
  b1.measures.lifetime_sparseness = { ...b1.measures.lifetime_sparseness!, estimate: 0.31, interval: [0.25, 0.37] };
  const b2 = structuredClone(a2);
  b2.id = 'rig-b-2024-02';
  b2.group = 'rig B';
  return [a1, a2, b1, b2];
}


const markType = (l: Record<string, any>) => (typeof l.mark === 'string' ? l.mark : l.mark.type);

describe('acrossDatasetsChart', () => {
  const datasets = fourDatasets();
  const chart = acrossDatasetsChart(datasets, 'lifetime_sparseness')!;

  it('has one row per dataset with the result’s estimate and interval, exactly', () => {
    const rows = acrossDatasetsRows(datasets, 'lifetime_sparseness');
    expect(rows.map((r) => r.dataset)).toEqual(['rig-a-2024-01', 'rig-a-2024-02', 'rig-b-2024-01', 'rig-b-2024-02']);
    for (const [i, ds] of datasets.entries()) {
      const m = ds.measures.lifetime_sparseness!;
      expect(rows[i]!.estimate).toBe(m.estimate);
      expect(rows[i]!.lower).toBe(m.interval ? m.interval[0] : null);
      expect(rows[i]!.upper).toBe(m.interval ? m.interval[1] : null);
      expect(rows[i]!.group).toBe(ds.group);
    }
  });

  it('draws interval bars, points told apart by colour and shape, and one shared x axis', () => {
    const ls = specMarks(chart.spec);
    const point = ls.find((l) => markType(l) === 'point')!;
    expect(point.encoding.color.field).toBe('group');
    expect(point.encoding.shape.field).toBe('group');
    expect(point.encoding.color.scale.domain).toEqual(['rig A', 'rig B']);
    // Two different shapes for the two groups (not colour alone).
    const shapes = point.encoding.shape.scale.range as string[];
    expect(new Set(shapes.slice(0, 2)).size).toBe(2);
    const bar = ls.find((l) => markType(l) === 'rule' && l.encoding?.x2)!;
    expect(bar.encoding.x.field).toBe('lower');
    expect(bar.encoding.x2.field).toBe('upper');
    // One axis for every dataset: the datasets are rows of one view, not separate views.
    const vg = compileToVega(chart.spec, { logger: { warn: () => undefined } }) as { scales?: { name: string }[] };
    expect((vg.scales ?? []).filter((s) => s.name === 'x')).toHaveLength(1);
    expect(JSON.stringify(chart.spec)).not.toContain('"ci"');
  });

  it('the axis spans every estimate and interval bound', () => {
    const domain = specMarks(chart.spec).find((l) => markType(l) === 'point')!.encoding.x.scale.domain as [number, number];
    for (const ds of datasets) {
      const m = ds.measures.lifetime_sparseness!;
      for (const v of [m.estimate!, ...(m.interval ?? [])]) {
        expect(v).toBeGreaterThanOrEqual(domain[0]);
        expect(v).toBeLessThanOrEqual(domain[1]);
      }
    }
  });

  it('the rendered SVG names every dataset and every group, without warnings', async () => {
    const warnings: string[] = [];
    const svg = await renderChartSvg(chart, { logger: { warn: (m) => warnings.push(m) } });
    expect(warnings).toEqual([]);
    for (const ds of datasets) expect(svg).toContain(`>${ds.id}</text>`);
    expect(svg).toContain('>rig A</text>');
    expect(svg).toContain('>rig B</text>');
  });

  it('the caption gives every value, the median and the outlier', () => {
    // Estimates 0.6921545454545455, 0.72717, 0.31, 0.72717 (fixture and the copies above):
    // sorted 0.31, 0.6922, 0.7272, 0.7272 → median (0.6922 + 0.7272) / 2 = 0.7097 → "0.710".
    expect(chart.description).toContain('Median of the estimates 0.710');
    expect(chart.description).toContain('farthest from it: rig-b-2024-01 (0.310)');
    for (const ds of datasets) expect(chart.description).toContain(ds.id);
  });

  it('by month: one row per month, datasets of a month in separate slots', () => {
    const c = acrossDatasetsChart(datasets, 'lifetime_sparseness', { by: 'month' })!;
    const rows = acrossDatasetsRows(datasets, 'lifetime_sparseness', { by: 'month' });
    expect(rows.map((r) => [r.row, r.slot])).toEqual([['2024-01', 0], ['2024-02', 0], ['2024-01', 1], ['2024-02', 1]]);
    expect(specMarks(c.spec).find((l) => markType(l) === 'point')!.encoding.yOffset.field).toBe('slot');
    expect(c.id).not.toBe(chart.id);
  });

  it('event measures, missing measures, no groups, and no estimate', async () => {
    const ds = fourDatasets();
    expect(acrossDatasetsMeasures(ds)).toContain('event_population_sparseness');
    expect(acrossDatasetsMeasures(ds)).toContain('kurtosis');
    // Only dataset 2 of the fixture has event measures.
    expect(acrossDatasetsRows(ds, 'event_population_sparseness').map((r) => r.estimate)).toEqual([0.8125, 0.8125]);
    expect(acrossDatasetsChart(ds, 'graph_density')).toBeNull();
    for (const d of ds) d.group = null;
    ds[0]!.measures.kurtosis = { ...ds[0]!.measures.kurtosis!, estimate: null, interval: null, note: 'too few units' };
    const c = acrossDatasetsChart(ds, 'kurtosis')!;
    expect(acrossDatasetsRows(ds, 'kurtosis')[0]!.group).toBe(NO_GROUP);
    const svg = await renderChartSvg(c, { logger: { warn: (m) => expect.fail(m) } });
    expect(svg).toContain('no estimate');
    expect(svg).not.toContain('role-legend'); // one group: nothing to tell apart
  });

  it('one chart per measure present, each narrow enough for a phone even with long dataset ids', async () => {
    const ds = fourDatasets();
    ds[0]!.id = 'a-very-long-dataset-identifier-from-a-lab-2024-01';
    const charts = acrossDatasetsCharts(ds);
    expect(charts.map((c) => c.id)).toEqual(acrossDatasetsMeasures(ds).map((m) => `across--${m.replace(/_/g, '-')}`));
    // 12 px text at 362 / width ≥ 10 px needs width ≤ 434 px (the phone column, test/browser/phone.test.ts).
    for (const c of charts) {
      const svg = await renderChartSvg(c, { logger: { warn: (m) => expect.fail(m) } });
      expect(Number(svg.match(/^<svg[^>]*\swidth="(\d+(?:\.\d+)?)"/)![1])).toBeLessThanOrEqual(434);
    }
  });
});
