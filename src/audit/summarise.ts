/**
 * From per-item values (one per unit or per bin) to a `MeasureResult`: the estimate, the
 * other summaries (median, quartiles, sd), and a bootstrap interval with its full record.
 *
 * Which items are resampled is decided here, once, for every measure:
 *  - per-unit measures (lifetime sparseness, kurtosis, Hoyer, Gini, activity ratio): units are
 *    resampled independently (iid);
 *  - per-bin measures (population sparseness, density): with `axis: time`, moving blocks of
 *    consecutive bins (Künsch 1989; block length by Politis & White 2004/2009 unless set);
 *    with `axis: stimuli`, stimuli are resampled independently.
 * NaN marks an undefined item (e.g. an all-zero bin): it is left out and counted in `excluded`.
 */
import { bootstrapInterval, type BootstrapStatistic } from '../stats/bootstrap.ts';
import { quantileSorted } from '../stats/quantile.ts';
import type { BootstrapSettings, Axis } from '../manifest/types.ts';
import type { MeasureResult, ResamplingUnit } from '../types.ts';

export interface IntervalPlan {
  bootstrap: BootstrapSettings;
  /** Items: per-unit values, or per-bin values along `axis`. */
  over: 'units' | 'bins';
  axis: Axis;
  /** Fewest defined items for an interval (min_bins for bins; 3 for units). */
  minItems: number;
}

export function spreadOf(values: Float64Array): NonNullable<MeasureResult['spread']> {
  const d = values.filter((v) => v === v).sort();
  if (d.length === 0) return {};
  let mean = 0;
  for (let i = 0; i < d.length; i++) mean += (d[i] - mean) / (i + 1);
  let ss = 0;
  for (let i = 0; i < d.length; i++) ss += (d[i] - mean) ** 2;
  return {
    median: quantileSorted(d, 0.5),
    q1: quantileSorted(d, 0.25),
    q3: quantileSorted(d, 0.75),
    sd: d.length > 1 ? Math.sqrt(ss / (d.length - 1)) : undefined,
    min: d[0],
    max: d[d.length - 1],
  };
}

function resamplingFor(plan: IntervalPlan): { resampling: 'iid' | 'moving-block'; unit: ResamplingUnit } {
  if (plan.over === 'units') return { resampling: 'iid', unit: 'units' };
  return plan.axis === 'time' ? { resampling: 'moving-block', unit: 'blocks-of-bins' } : { resampling: 'iid', unit: 'stimuli' };
}

/**
 * Summarise per-item values with an interval.
 * `statistic`: 'mean' or 'median' of the defined items, or a ratio of per-item sums.
 */
export function summarise(
  plan: IntervalPlan,
  stat: { kind: 'mean' | 'median'; values: Float64Array } | { kind: 'ratio'; numerator: Float64Array; denominator: Float64Array },
  summary: string,
): MeasureResult {
  const items = stat.kind === 'ratio' ? stat.denominator : stat.values;
  let defined = 0;
  if (stat.kind === 'ratio') {
    for (let i = 0; i < items.length; i++) if (stat.denominator[i] > 0) defined++;
  } else {
    for (let i = 0; i < items.length; i++) if (items[i] === items[i]) defined++;
  }
  const excluded = items.length - defined;
  const base: MeasureResult = { estimate: null, interval: null, level: null, method: null, n: defined, excluded, summary };
  if (defined === 0) return { ...base, note: 'undefined: no item had a defined value' };

  let estimate: number;
  let bstat: BootstrapStatistic;
  if (stat.kind === 'ratio') {
    // Items with no defined element (denominator 0) carry nothing; mark them NaN so the bootstrap leaves them out.
    const num = new Float64Array(items.length);
    const den = new Float64Array(items.length);
    let sn = 0;
    let sd = 0;
    for (let i = 0; i < items.length; i++) {
      const ok = stat.denominator[i] > 0;
      num[i] = ok ? stat.numerator[i] : NaN;
      den[i] = ok ? stat.denominator[i] : NaN;
      if (ok) {
        sn += stat.numerator[i];
        sd += stat.denominator[i];
      }
    }
    estimate = sn / sd;
    bstat = { kind: 'ratio', numerator: num, denominator: den };
  } else {
    const sorted = stat.values.filter((v) => v === v).sort();
    if (stat.kind === 'median') {
      estimate = quantileSorted(sorted, 0.5);
      bstat = { kind: 'function', values: stat.values, fn: medianOf };
    } else {
      let m = 0;
      for (let i = 0; i < sorted.length; i++) m += (sorted[i] - m) / (i + 1);
      estimate = m;
      bstat = { kind: 'mean', values: stat.values };
    }
  }
  const spread = stat.kind === 'ratio' ? undefined : spreadOf(stat.values);
  const withEstimate: MeasureResult = { ...base, estimate, ...(spread ? { spread } : {}) };
  if (defined < plan.minItems) {
    return { ...withEstimate, note: `no interval: ${defined} defined ${plan.over} (at least ${plan.minItems} needed)` };
  }
  const { resampling, unit } = resamplingFor(plan);
  const b = bootstrapInterval({
    statistic: bstat,
    resampling,
    resamplingUnit: unit,
    ...(resampling === 'moving-block' ? { blockLength: plan.bootstrap.block_length } : {}),
    method: plan.bootstrap.method,
    level: plan.bootstrap.level,
    resamples: plan.bootstrap.resamples,
    seed: plan.bootstrap.seed,
  });
  if (!Number.isFinite(b.lower) || !Number.isFinite(b.upper)) {
    return { ...withEstimate, note: 'no interval: the bootstrap distribution was degenerate' };
  }
  return {
    ...withEstimate,
    interval: [b.lower, b.upper],
    level: b.level,
    method: b.method,
    intervalRecord: {
      lower: b.lower,
      upper: b.upper,
      level: b.level,
      method: b.method,
      resamples: b.resamples,
      resampling: b.resampling,
      blockLength: b.blockLength,
      blockLengthChoice: b.blockLengthChoice,
      seed: b.seed,
      n: b.n,
    },
  };
}

function medianOf(sample: Float64Array): number {
  sample.sort();
  return quantileSorted(sample, 0.5);
}
