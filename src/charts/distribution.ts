/**
 * A distribution of per-unit values (lifetime sparseness, kurtosis) with the audit's summary
 * estimate drawn as a rule and its bootstrap interval as a band, both taken from our own
 * computed bounds (never Vega-Lite's `extent: "ci"`, which is an unseeded bootstrap of a mean).
 *
 * Up to STRIP_MAX units are drawn as a strip (one tick per unit); more as a histogram.
 */
import type { MeasureResult } from '../types.ts';
import { estimateWithInterval } from './format.ts';
import { ROLE } from './theme.ts';

/** Largest number of units drawn one tick each; above this a histogram is drawn. */
export const STRIP_MAX = 80;

export interface DistributionInput {
  /** Per-unit values (null = undefined for that unit) and their labels. */
  values: (number | null)[];
  labels: string[];
  /** Axis title, e.g. "lifetime sparseness (per unit)". */
  axisTitle: string;
  /** Which summary the estimate is ("mean", "median"). */
  summaryName: string;
  measure: MeasureResult;
}

/** The defined values with their unit labels. */
export function definedValues(values: (number | null)[], labels: string[]): { unit: string; value: number }[] {
  const out: { unit: string; value: number }[] = [];
  values.forEach((v, i) => {
    if (v !== null && Number.isFinite(v)) out.push({ unit: labels[i] ?? `unit ${i}`, value: v });
  });
  return out;
}

/** The layered Vega-Lite body (no frame) and whether a strip or histogram was used. */
export function distributionBody(input: DistributionInput): { body: Record<string, unknown>; style: 'strip' | 'histogram'; height: number; subtitle: string } {
  const points = definedValues(input.values, input.labels);
  const m = input.measure;
  const style = points.length <= STRIP_MAX ? 'strip' : 'histogram';
  const x = { field: 'value', type: 'quantitative', title: input.axisTitle, scale: { zero: false } };
  const dataLayer =
    style === 'strip'
      ? {
          data: { values: points },
          mark: { type: 'tick', color: ROLE.data, thickness: 1.5, opacity: 0.85 },
          encoding: { x, tooltip: [{ field: 'unit', type: 'nominal' }, { field: 'value', type: 'quantitative', format: '.4~g' }] },
        }
      : {
          data: { values: points },
          mark: { type: 'bar', color: ROLE.data, opacity: 0.8, binSpacing: 1 },
          encoding: {
            x: { ...x, bin: { maxbins: 30 } },
            y: { aggregate: 'count', type: 'quantitative', title: 'units' },
          },
        };
  const layers: Record<string, unknown>[] = [];
  if (m.interval) {
    layers.push({
      data: { values: [{ estimate: m.estimate, lower: m.interval[0], upper: m.interval[1], level: m.level }] },
      mark: { type: 'rect', color: ROLE.estimate, opacity: 0.18 },
      encoding: { x: { field: 'lower', type: 'quantitative' }, x2: { field: 'upper' } },
    });
  }
  layers.push(dataLayer);
  if (m.estimate !== null) {
    // The rule only: its value goes in the subtitle, where it covers no data.
    layers.push({ data: { values: [{ estimate: m.estimate }] }, mark: { type: 'rule', color: ROLE.estimate, strokeWidth: 2 }, encoding: { x: { field: 'estimate', type: 'quantitative' } } });
  }
  const value = estimateWithInterval(m);
  const subtitle = `${style === 'strip' ? 'ticks: one per unit' : 'bars: units per bin'} · line: ${input.summaryName} ${value}${m.interval ? ' · band: its bootstrap interval' : ''}`;
  return { body: { layer: layers }, style, height: style === 'strip' ? 90 : 200, subtitle };
}
