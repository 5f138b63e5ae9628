/**
 * Weights: density as a function of the magnitude threshold, one line per layer. Layers differ
 * by colour, dash pattern and point shape (never colour alone).
 */
import type { ChartSpec, DatasetResult, WeightChartData } from '../types.ts';
import { estimatePhrase, fmt, frame, slug } from './format.ts';
import { CATEGORY, DASHES, SHAPES } from './theme.ts';

/** Density-versus-threshold curves, or null when there is no curve. */
export function thresholdCurveChart(ds: DatasetResult): ChartSpec | null {
  if (ds.kind !== 'weights') return null;
  const cd = ds.chartData as WeightChartData;
  if (!cd.thresholdCurve || cd.thresholdCurve.length === 0) return null;
  const layerNames = [...new Set(cd.thresholdCurve.map((p) => p.layer))];
  const pick = <T>(list: T[]) => layerNames.map((_, i) => list[i % list.length]!);
  // Colour, dash and shape share field, title and domain, so Vega-Lite merges them into ONE
  // legend whose symbols show all three. (A `legend: null` on any of them dropped the legend.)
  const enc = (range: unknown[]) => ({ field: 'layer', type: 'nominal', title: 'layer', scale: { domain: layerNames, range } });
  const layer = {
    data: { values: cd.thresholdCurve },
    mark: { type: 'line', strokeWidth: 1.8, point: { filled: true, size: 30 } },
    encoding: {
      x: { field: 'threshold', type: 'quantitative', title: 'magnitude threshold' },
      y: { field: 'density', type: 'quantitative', title: 'density above threshold', scale: { domain: [0, 1] } },
      color: enc(pick(CATEGORY)),
      strokeDash: enc(pick(DASHES)),
      shape: enc(pick(SHAPES)),
      tooltip: [{ field: 'layer', type: 'nominal' }, { field: 'threshold', type: 'quantitative', format: '.4~g' }, { field: 'density', type: 'quantitative', format: '.4~g' }],
    },
  };
  const per = layerNames.map((name) => {
    const pts = cd.thresholdCurve.filter((p) => p.layer === name).sort((a, b) => a.threshold - b.threshold);
    const a = pts[0]!;
    const b = pts[pts.length - 1]!;
    return `${name} from ${fmt(a.density)} at ${fmt(a.threshold)} to ${fmt(b.density)} at ${fmt(b.threshold)}`;
  });
  const overall = ds.measures.density;
  const title = `Density versus magnitude threshold — ${ds.id}`;
  const description =
    `Fraction of weights whose magnitude exceeds each threshold, for ${layerNames.length} layers of ${ds.id}: ${per.join('; ')}.` +
    (overall ? ` Density at the audit's zero tolerance, all layers: ${estimatePhrase(overall)}.` : '');
  return { id: `${slug(ds.id)}--threshold-curve`, title, description, datasetId: ds.id, spec: frame(title, description, layer) };
}
