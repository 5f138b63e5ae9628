/**
 * Weights: in- and out-degree distributions of each square layer read as a directed graph
 * (an edge where |w| is above the zero tolerance), as bar charts side by side.
 */
import type { ChartSpec, DatasetResult, WeightChartData } from '../types.ts';
import { fmt, frame, slug } from './format.ts';
import { degreeBins } from './degree-bins.ts';
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
    // Bins from the data: one bar per integer degree (or integer-aligned bins), shared x domain.
    const all = degreeBins(rows);
    const binned = (['in', 'out'] as const).map((dir) => ({ dir, ...degreeBins(rows.filter((d) => d.direction === dir), { width: all.width }) }));
    const width = all.width;
    const [x0, x1] = all.domain;
    const values = binned.flatMap((b) => b.bins.map((bin) => ({ ...bin, direction: `${b.dir}-degree` })));
    const spec = {
      data: { values },
      mark: { type: 'rect', color: ROLE.data, stroke: ROLE.paper, strokeWidth: 1 },
      encoding: {
        x: { field: 'x0', type: 'quantitative', title: width === 1 ? 'degree' : `degree, bins of ${width}`, scale: { domain: [x0, x1], nice: false, zero: false }, axis: { tickMinStep: 1, format: 'd' } },
        x2: { field: 'x1' },
        y: { field: 'count', type: 'quantitative', title: 'nodes', axis: { tickMinStep: 1, format: ',d' } },
        y2: { datum: 0 },
        column: { field: 'direction', type: 'nominal', title: null, sort: ['in-degree', 'out-degree'] },
        tooltip: [{ field: 'direction', type: 'nominal' }, { field: 'label', type: 'nominal', title: 'degree' }, { field: 'count', type: 'quantitative', title: 'nodes' }],
      },
    };
    const title = `Degree distributions — ${name} (${ds.id})`;
    const description =
      `In- and out-degree distributions of layer ${name} of ${ds.id}, read as a directed graph (an edge where |w| is above the zero tolerance)${width === 1 ? ', one bar per degree' : `, in bins of ${width} degrees`}: ${stats.join('; ')}` +
      (layer && layer.graphDensity !== null ? `; graph density ${fmt(layer.graphDensity)}.` : '.');
    return { id: `${slug(ds.id)}--degrees--${slug(name)}`, title, description, datasetId: ds.id, spec: frame(title, description, { ...spec, spacing: 12 }, { width: 140, height: 160 }) };
  });
}
