/**
 * Weights: density per layer — the fraction of each tensor's elements whose magnitude is above
 * the zero tolerance — as bars, with the dataset's overall density as a rule.
 */
import type { ChartSpec, DatasetResult, WeightChartData } from '../types.ts';
import { estimatePhrase, fmt, frame, slug } from './format.ts';
import { ROLE } from './theme.ts';

/** Density per layer, or null for activity datasets or weights without layers. */
export function layerDensityChart(ds: DatasetResult): ChartSpec | null {
  if (ds.kind !== 'weights') return null;
  const cd = ds.chartData as WeightChartData;
  if (!cd.layers || cd.layers.length === 0) return null;
  const rows = cd.layers.map((l) => ({ layer: l.name, shape: l.shape.join(' × '), elements: l.shape.reduce((a, b) => a * b, 1), density: l.density, label: fmt(l.density) }));
  const x = { field: 'layer', type: 'nominal', title: 'layer', sort: rows.map((r) => r.layer), axis: { labelAngle: rows.length > 6 ? -40 : 0 } };
  const y = { field: 'density', type: 'quantitative', title: 'density (fraction above zero tolerance)', scale: { domain: [0, 1] } };
  const layers: Record<string, unknown>[] = [
    {
      data: { values: rows },
      layer: [
        {
          mark: { type: 'bar', color: ROLE.data, opacity: 0.85 },
          encoding: { x, y, tooltip: [{ field: 'layer', type: 'nominal' }, { field: 'shape', type: 'nominal' }, { field: 'elements', type: 'quantitative' }, { field: 'density', type: 'quantitative', format: '.4~g' }] },
        },
        { mark: { type: 'text', baseline: 'bottom', dy: -3, color: ROLE.ink }, encoding: { x, y, text: { field: 'label', type: 'nominal' } } },
      ],
    },
  ];
  const overall = ds.measures.density;
  if (overall && overall.estimate !== null) {
    const est = { data: { values: [{ estimate: overall.estimate, label: `all layers ${fmt(overall.estimate)}` }] } };
    layers.push({ ...est, mark: { type: 'rule', color: ROLE.estimate, strokeDash: [5, 3], strokeWidth: 1.5 }, encoding: { y: { field: 'estimate', type: 'quantitative' } } });
    layers.push({
      ...est,
      mark: { type: 'text', align: 'right', baseline: 'bottom', dy: -3, color: ROLE.estimate, fontWeight: 600 },
      encoding: { y: { field: 'estimate', type: 'quantitative' }, x: { value: { expr: 'width' } }, text: { field: 'label', type: 'nominal' } },
    });
  }
  const title = `Density per layer — ${ds.id}`;
  const description =
    `Density (fraction of elements above the zero tolerance) of ${rows.length} layers of ${ds.id}: ` +
    rows.map((r) => `${r.layer} (${r.shape}) ${fmt(r.density)}`).join(', ') +
    (overall ? `. All layers together: ${estimatePhrase(overall)}.` : '.');
  return { id: `${slug(ds.id)}--layer-density`, title, description, datasetId: ds.id, spec: frame(title, description, { layer: layers }) };
}
