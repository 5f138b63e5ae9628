/**
 * Per-unit excess kurtosis g2 across bins (Joanes & Gill 1998's g2), one tick per unit (or a
 * histogram), with the audit's median over units and its bootstrap interval from our bounds.
 */
import type { ActivityChartData, ChartSpec, DatasetResult } from '../types.ts';
import { distributionBody, definedValues } from './distribution.ts';
import { estimatePhrase, fmt, frame, slug } from './format.ts';
import { minOf, maxOf } from '../util/arrays.ts';

/** The chart, or null when the dataset has no kurtosis estimate or no per-unit values. */
export function kurtosisChart(ds: DatasetResult): ChartSpec | null {
  const m = ds.measures.kurtosis;
  if (ds.kind !== 'activity' || !m) return null;
  const cd = ds.chartData as ActivityChartData;
  const defined = definedValues(cd.kurtosis, cd.unitLabels);
  if (defined.length === 0) return null;
  const { body, style, height, subtitle } = distributionBody({
    values: cd.kurtosis,
    labels: cd.unitLabels,
    axisTitle: 'excess kurtosis g2 of each unit',
    summaryName: 'median',
    measure: m,
  });
  const vals = defined.map((d) => d.value);
  const undefinedUnits = cd.kurtosis.length - defined.length;
  const q = m.spread && m.spread.q1 !== undefined && m.spread.q3 !== undefined ? `, quartiles ${fmt(m.spread.q1)} and ${fmt(m.spread.q3)}` : '';
  const title = `Excess kurtosis per unit — ${ds.id}`;
  const description =
    `Excess kurtosis (g2) of each of ${defined.length} units in dataset ${ds.id}` +
    (undefinedUnits ? ` (${undefinedUnits} more undefined or with too few nonzero bins, not shown)` : '') +
    `, drawn as a ${style === 'strip' ? 'strip with one tick per unit' : 'histogram'}, from ${fmt(minOf(vals))} to ${fmt(maxOf(vals))}${q}. ` +
    `Median over units: ${estimatePhrase(m)}; the shaded band is the bootstrap interval and the line the median.`;
  return { id: `${slug(ds.id)}--kurtosis`, title, description, datasetId: ds.id, spec: frame(title, description, body, { height, subtitle }) };
}
