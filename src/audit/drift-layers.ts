/**
 * Drift for weights audits, per layer: each layer of a weights dataset as a small dataset of its
 * own, so the monthly series, trend tests and change screening of drift.ts run on it unchanged.
 *
 * Layers match by name across datasets (a checkpoint's `fc1.weight` in March is the same layer
 * as in January); a layer name met in fewer than two months makes no series. A layer's values
 * are those of `WeightChartData.layers` (density, Hoyer, Gini, kurtosis, graph density for
 * square layers); its n is the layer's element count (N(N − 1) pairs for graph density), which
 * weights the pooling of several datasets in one month. Weights have no sampling interval, so a
 * layer's points have none either. Cost: O(datasets × layers).
 */
import type { DatasetResult, MeasureName, MeasureResult, WeightChartData } from '../types.ts';

export interface LayerDataset extends DatasetResult {
  month: string;
  layer: string;
}

const LAYER_VALUES: [MeasureName, keyof WeightChartData['layers'][number]][] = [
  ['density', 'density'],
  ['hoyer', 'hoyer'],
  ['gini', 'gini'],
  ['kurtosis', 'kurtosis'],
  ['graph_density', 'graphDensity'],
];

function point(estimate: number | null, n: number): MeasureResult {
  const defined = typeof estimate === 'number' && Number.isFinite(estimate);
  return { estimate: defined ? estimate : null, interval: null, level: null, method: null, n, excluded: 0, summary: 'per layer', note: 'weights: no sampling interval' };
}

/** Per-layer stand-ins of the dated weights datasets, and the layer names met in at least two months. */
export function layerDatasets(dated: (DatasetResult & { month: string })[]): { layers: string[]; datasets: LayerDataset[] } {
  const out: LayerDataset[] = [];
  const monthsOf = new Map<string, Set<string>>();
  for (const d of dated) {
    if (d.kind !== 'weights') continue;
    const cd = d.chartData as Partial<WeightChartData>;
    for (const l of cd.layers ?? []) {
      const size = l.shape.reduce((a, b) => a * b, 1);
      const measures: DatasetResult['measures'] = {};
      for (const [name, key] of LAYER_VALUES) {
        const v = l[key] as number | null;
        if (name === 'graph_density' && v === null) continue;
        measures[name] = point(v, name === 'graph_density' ? l.shape[0] * (l.shape[0] - 1) : size);
      }
      out.push({ ...d, measures, findings: [], layer: l.name });
      if (!monthsOf.has(l.name)) monthsOf.set(l.name, new Set());
      monthsOf.get(l.name)!.add(d.month);
    }
  }
  const layers = [...monthsOf].filter(([, m]) => m.size >= 2).map(([name]) => name).sort();
  return { layers, datasets: out.filter((d) => layers.includes(d.layer)) };
}

/**
 * What change screening means for weights, for the drift summary. σ is the larger of the
 * baseline months' SD and their typical within-month standard error; weights have no sampling
 * error, so σ is the baseline months' SD alone.
 */
export const WEIGHTS_SIGMA_TEXT =
  'Weights are whole networks, not samples: no month has a sampling interval, so σ for change screening is the SD of the baseline months’ estimates alone ' +
  '(a series whose baseline months are all equal gets no chart), thin months are judged by n only, and group differences have no interval.';
