/**
 * One weights dataset: every tensor (layer) measured on its own, and the whole dataset measured
 * over all its elements together. Weights are the whole population of a network, not a sample
 * of one, so no sampling interval is attached (the report says so).
 *
 * Per layer: density (|w| > zero tolerance), Hoyer, Gini, excess kurtosis g2, and for square
 * 2-D layers the graph density without self-loops (entry [i][j] = connection i → j) with in-
 * and out-degrees; density as a function of a magnitude threshold. A non-finite weight is left
 * out of every measure and counted; in graph density it is neither an edge nor a non-edge, so it
 * leaves the possible pairs (and the degrees) instead of dropping the layer.
 */
import {
  scanValues,
  hoyerSparseness,
  giniIndex,
  excessKurtosis,
  densityCurve,
  graphDensity,
} from '../metrics/index.ts';
import type { ResolvedDataset, ResolvedManifest } from '../manifest/types.ts';
import type { DatasetResult, Finding, MeasureResult, Numeric, WeightChartData, WeightsSource } from '../types.ts';

const NO_INTERVAL = 'weights are the whole network, not a sample: no sampling interval';

function finiteOnly(data: Numeric): { values: Numeric; dropped: number } {
  const c = scanValues(data, 0);
  const dropped = c.nan + c.posInf + c.negInf;
  if (dropped === 0) return { values: data, dropped };
  return { values: data.filter((v) => Number.isFinite(v)) as Numeric, dropped };
}

function measure(estimate: number | null, n: number, excluded: number, summary: string): MeasureResult {
  return { estimate, interval: null, level: null, method: null, n, excluded, summary, note: NO_INTERVAL };
}

function thresholdsFor(values: Numeric): number[] {
  let max = 0;
  for (let i = 0; i < values.length; i++) {
    const a = Math.abs(values[i]);
    if (a > max) max = a;
  }
  if (max === 0) return [0];
  return Array.from({ length: 41 }, (_, i) => (max * i) / 40);
}

export async function computeWeights(
  ds: ResolvedDataset,
  m: ResolvedManifest,
  source: WeightsSource,
  onBytes: (n: number) => void,
): Promise<Omit<DatasetResult, 'cacheKey'>> {
  const tol = m.zero_tolerance;
  const findings: Finding[] = [...source.findings];
  const layers: WeightChartData['layers'] = [];
  const curve: WeightChartData['thresholdCurve'] = [];
  const degrees: WeightChartData['degrees'] = [];
  const parts: Numeric[] = [];
  let edges = 0;
  let possible = 0;
  let omittedPairs = 0;
  let dropped = 0;

  for await (const t of source.tensors()) {
    onBytes(t.data.byteLength);
    const { values, dropped: d } = finiteOnly(t.data);
    dropped += d;
    const square = t.shape.length === 2 && t.shape[0] === t.shape[1];
    if (d > 0) {
      const inGraph = square ? ' (in graph density each is neither an edge nor a non-edge: its pair is left out of the possible pairs and the degrees)' : '';
      findings.push({ level: 'exclude', code: 'non-finite-weights', message: `${d} non-finite weight(s) in layer ${t.name}, left out of every measure${inGraph}.`, where: [t.name], count: d });
    }
    parts.push(values);
    const c = scanValues(values, tol);
    const dens = values.length ? c.nonzero / values.length : 0;
    let gd: number | null = null;
    if (square) {
      const g = graphDensity({ rows: t.shape[0], cols: t.shape[1], data: t.data }, { directed: true, selfLoops: false, tolerance: tol, nonFinite: 'omit' });
      gd = g.density;
      edges += g.edges;
      possible += g.possible;
      omittedPairs += g.omitted;
      for (const [dir, deg] of [['in', g.inDegree], ['out', g.outDegree]] as const) {
        const hist = new Map<number, number>();
        for (const v of deg) hist.set(v, (hist.get(v) ?? 0) + 1);
        for (const [degree, count] of [...hist].sort((a, b) => a[0] - b[0])) degrees.push({ layer: t.name, direction: dir, degree, count });
      }
    }
    layers.push({
      name: t.name,
      shape: t.shape,
      density: dens,
      hoyer: hoyerSparseness(values),
      gini: giniIndex(values),
      kurtosis: excessKurtosis(values),
      graphDensity: gd,
    });
    const th = thresholdsFor(values);
    densityCurve(values, th).forEach((v, i) => curve.push({ layer: t.name, threshold: th[i], density: v ?? 0 }));
    if (c.zero === values.length) {
      findings.push({ level: 'caution', code: 'all-zero-layer', message: `layer ${t.name} is entirely zero: its ratio measures are undefined.`, where: [t.name], count: values.length });
    }
  }

  const total = parts.reduce((s, p) => s + p.length, 0);
  const all = new Float64Array(total);
  let off = 0;
  for (const p of parts) {
    all.set(p, off);
    off += p.length;
  }
  const c = scanValues(all, tol);
  const measures: DatasetResult['measures'] = {
    density: measure(total ? c.nonzero / total : null, total, dropped, 'fraction of all weights with |w| above the zero tolerance, over every layer'),
    hoyer: measure(hoyerSparseness(all), total, dropped, 'Hoyer sparseness of all weights together'),
    gini: measure(giniIndex(all), total, dropped, 'Gini index of |w| over all weights together'),
    kurtosis: measure(excessKurtosis(all), total, dropped, 'excess kurtosis g2 of all weights together'),
  };
  if (possible > 0 || omittedPairs > 0) {
    measures.graph_density = measure(possible > 0 ? edges / possible : null, possible, omittedPairs, 'directed graph density without self-loops, edges over possible edges (pairs with a finite weight) summed over square layers');
  }
  return {
    id: ds.id,
    month: ds.month,
    group: ds.group,
    kind: 'weights',
    shape: layers.length === 1 ? layers[0].shape : [],
    files: source.files,
    measures,
    findings,
    chartData: { layers, thresholdCurve: curve, degrees },
  };
}
