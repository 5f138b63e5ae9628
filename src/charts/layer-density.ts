/**
 * Weights: density per layer — the fraction of each tensor's elements whose magnitude is above
 * the zero tolerance — as bars, with the dataset's overall density as a rule.
 */
import type { ChartSpec, DatasetResult, WeightChartData } from '../types.ts';
import { estimatePhrase, fmt, frame, slug } from './format.ts';
import { CHART_WIDTH, estimateTextWidth, ROLE, TYPE } from './theme.ts';

/** Whether layer names side by side would not fit their bands (then they are set at an angle). */
function crowded(names: string[]): boolean {
  let widest = 0;
  for (const n of names) widest = Math.max(widest, estimateTextWidth(n, TYPE.label));
  return widest > CHART_WIDTH / names.length - 4;
}

/** Density per layer, or null for activity datasets or weights without layers. */
export function layerDensityChart(ds: DatasetResult): ChartSpec | null {
  if (ds.kind !== 'weights') return null;
  const cd = ds.chartData as WeightChartData;
  if (!cd.layers || cd.layers.length === 0) return null;
  const rows = cd.layers.map((l) => ({ layer: l.name, shape: l.shape.join(' × '), elements: l.shape.reduce((a, b) => a * b, 1), density: l.density, label: fmt(l.density) }));
  const x = { field: 'layer', type: 'nominal', title: 'layer', sort: rows.map((r) => r.layer), axis: { labelAngle: crowded(rows.map((r) => r.layer)) ? -40 : 0 } };
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
    // The rule only: its value is in the subtitle, where it covers no bar.
    layers.push({ data: { values: [{ estimate: overall.estimate }] }, mark: { type: 'rule', color: ROLE.estimate, strokeDash: [5, 3], strokeWidth: 1.5 }, encoding: { y: { field: 'estimate', type: 'quantitative' } } });
  }
  const subtitle = `bars: each layer's density${overall && overall.estimate !== null ? ` · dashed line: all layers, ${fmt(overall.estimate)}` : ''}`;
  const title = `Density per layer — ${ds.id}`;
  const description =
    `Density (fraction of elements above the zero tolerance) of ${rows.length} layers of ${ds.id}: ` +
    rows.map((r) => `${r.layer} (${r.shape}) ${fmt(r.density)}`).join(', ') +
    (overall ? `. All layers together: ${estimatePhrase(overall)}.` : '.');
  return { id: `${slug(ds.id)}--layer-density`, title, description, datasetId: ds.id, spec: frame(title, description, { layer: layers }, { subtitle }) };
}
