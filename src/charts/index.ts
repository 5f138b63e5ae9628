/**
 * Chart specs for an audit result.
 *
 *   AuditResult ─1→ per dataset: measures summary, then
 *                     activity: population sparseness over time (and event-based), lifetime
 *                               sparseness across units, per-unit kurtosis
 *                     weights:  density per layer, density versus threshold, degree distributions
 *               ─2→ drift: one chart per series, when `result.drift`
 *               ─3→ (optional) renderChartSvgs: SVG for each, server-side
 *
 * Every builder is pure (plain values in, a plain `ChartSpec` out); charts whose data are
 * missing are left out rather than drawn empty. One measure across all datasets
 * (`acrossDatasetsCharts`, one chart per measure) is built separately, for the page to place.
 */
import type { AuditResult, ChartSpec } from '../types.ts';
import { degreeDistributionCharts } from './degree-distribution.ts';
import { driftCharts } from './drift.ts';
import { kurtosisChart } from './kurtosis.ts';
import { layerDensityChart } from './layer-density.ts';
import { lifetimeSparsenessChart } from './lifetime-sparseness.ts';
import { acrossDatasetsCharts } from './across-datasets.ts';
import { populationSparsenessChart } from './population-sparseness.ts';
import { thresholdCurveChart } from './threshold-curve.ts';
import { pushAll } from '../util/arrays.ts';

export { compileToVega, renderChartSvg, renderChartSvgs } from './render.ts';
export type { ChartLogger } from './render.ts';
export { driftCharts, driftSeriesChart } from './drift.ts';
export { kurtosisChart } from './kurtosis.ts';
export { layerDensityChart } from './layer-density.ts';
export { lifetimeSparsenessChart } from './lifetime-sparseness.ts';
export { populationSparsenessChart } from './population-sparseness.ts';
export { thresholdCurveChart } from './threshold-curve.ts';
export { degreeDistributionCharts } from './degree-distribution.ts';
export { acrossDatasetsChart, acrossDatasetsCharts, acrossDatasetsMeasures, acrossDatasetsRows } from './across-datasets.ts';
export type { AcrossDatasetsOptions, AcrossDatasetsRow } from './across-datasets.ts';

/** Every chart of every dataset, in dataset order, then the drift charts. Ids are unique. */
export function buildCharts(result: AuditResult): ChartSpec[] {
  const out: (ChartSpec | null)[] = [];
  for (const ds of result.datasets) {
    // 1. per dataset
    if (ds.kind === 'activity') {
      out.push(populationSparsenessChart(ds), populationSparsenessChart(ds, { events: true }), lifetimeSparsenessChart(ds), kurtosisChart(ds));
    } else {
      out.push(layerDensityChart(ds), thresholdCurveChart(ds));
      pushAll(out, degreeDistributionCharts(ds));
    }
  }
  // 2. one chart per measure across datasets (the version page's overview charts)
  pushAll(out, acrossDatasetsCharts(result.datasets));
  // 3. drift
  if (result.drift) pushAll(out, driftCharts(result.drift));
  const charts = out.filter((c): c is ChartSpec => c !== null);
  // Ids must be unique on a page: suffix repeats (two dataset ids that slug alike).
  const seen = new Map<string, number>();
  return charts.map((c) => {
    const k = seen.get(c.id) ?? 0;
    seen.set(c.id, k + 1);
    return k === 0 ? c : { ...c, id: `${c.id}-${k + 1}` };
  });
}
