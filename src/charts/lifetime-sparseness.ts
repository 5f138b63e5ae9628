/**
 * Lifetime sparseness across units: each unit's Vinje–Gallant sparseness across bins
 * (Willmore & Tolhurst 2001), one tick per unit (or a histogram), with the audit's mean over
 * defined units and its bootstrap interval drawn from our computed bounds.
 */
import type { ActivityChartData, ChartSpec, DatasetResult } from '../types.ts';
import { distributionBody, definedValues } from './distribution.ts';
import { estimatePhrase, fmt, frame, slug } from './format.ts';
import { minOf, maxOf } from '../util/arrays.ts';

/** The chart, or null when the dataset has no lifetime sparseness estimate or no per-unit values. */
export function lifetimeSparsenessChart(ds: DatasetResult): ChartSpec | null {
  const m = ds.measures.lifetime_sparseness;
  if (ds.kind !== 'activity' || !m) return null;
  const cd = ds.chartData as ActivityChartData;
  const defined = definedValues(cd.lifetimeSparseness, cd.unitLabels);
  if (defined.length === 0) return null;
  const { body, style, height, subtitle } = distributionBody({
    values: cd.lifetimeSparseness,
    labels: cd.unitLabels,
    axisTitle: 'lifetime sparseness of each unit',
    summaryName: 'mean',
    measure: m,
  });
  const vals = defined.map((d) => d.value);
  const undefinedUnits = cd.lifetimeSparseness.length - defined.length;
  const title = `Lifetime sparseness across units — ${ds.id}`;
  const description =
    `Lifetime sparseness of each of ${defined.length} units in dataset ${ds.id}` +
    (undefinedUnits ? ` (${undefinedUnits} more undefined, not shown)` : '') +
    `, drawn as a ${style === 'strip' ? 'strip with one tick per unit' : 'histogram'}, from ${fmt(minOf(vals))} to ${fmt(maxOf(vals))}. ` +
    `Mean over defined units: ${estimatePhrase(m)}; the shaded band is the bootstrap interval and the line the mean.`;
  return { id: `${slug(ds.id)}--lifetime-sparseness`, title, description, datasetId: ds.id, spec: frame(title, description, body, { height, subtitle }) };
}
