/**
 * Weights: in- and out-degree distributions of each square layer read as a directed graph
 * (an edge where |w| is above the zero tolerance), as bar charts side by side.
 */
import type { ChartSpec, DatasetResult, WeightChartData } from '../types.ts';
import { fmt, frame, slug } from './format.ts';
import { ROLE } from './theme.ts';
import { minOf, maxOf } from '../util/arrays.ts';

/** One chart per layer with degree data (square layers); empty for activity datasets. */
export function degreeDistributionCharts(ds: DatasetResult): ChartSpec[] {
  if (ds.kind !== 'weights') return [];
  const cd = ds.chartData as WeightChartData;
  const names = [...new Set((cd.degrees ?? []).map((d) => d.layer))];
  return names.map((name) => {
    const rows = cd.degrees.filter((d) => d.layer === name);
    const stats = (['in', 'out'] as const).map((dir) => {
      const r = rows.filter((d) => d.direction === dir);
      const nodes = r.reduce((s, d) => s + d.count, 0);
      const mean = nodes ? r.reduce((s, d) => s + d.degree * d.count, 0) / nodes : null;
      const lo = r.length ? minOf(r.map((d) => d.degree)) : null;
      const hi = r.length ? maxOf(r.map((d) => d.degree)) : null;
      return `${dir}-degree of ${nodes} nodes: mean ${fmt(mean)}, from ${fmt(lo)} to ${fmt(hi)}`;
    });
    const layer = cd.layers.find((l) => l.name === name);
    const spec = {
      data: { values: rows.map((d) => ({ ...d, direction: `${d.direction}-degree` })) },
      mark: { type: 'bar', color: ROLE.data, opacity: 0.85 },
      encoding: {
        x: { field: 'degree', type: 'quantitative', title: 'degree (edges above zero tolerance)', bin: { binned: true, step: 1 } },
        x2: { field: 'degreeEnd' },
        y: { field: 'count', type: 'quantitative', title: 'nodes' },
        column: { field: 'direction', type: 'nominal', title: null, sort: ['in-degree', 'out-degree'] },
        tooltip: [{ field: 'direction', type: 'nominal' }, { field: 'degree', type: 'quantitative' }, { field: 'count', type: 'quantitative' }],
      },
      transform: [{ calculate: 'datum.degree + 1', as: 'degreeEnd' }],
    };
    const title = `Degree distributions — ${name} (${ds.id})`;
    const description =
      `In- and out-degree distributions of layer ${name} of ${ds.id}, read as a directed graph: ${stats.join('; ')}` +
      (layer && layer.graphDensity !== null ? `; graph density ${fmt(layer.graphDensity)}.` : '.');
    return { id: `${slug(ds.id)}--degrees--${slug(name)}`, title, description, datasetId: ds.id, spec: frame(title, description, spec, { width: 240, height: 180 }) };
  });
}
