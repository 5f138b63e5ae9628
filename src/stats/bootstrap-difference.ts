/**
 * Bootstrap percentile interval of a difference of means, mean(a) − mean(b), for two
 * independent groups (e.g. rig A vs rig B in one month).
 *
 * Each resample draws n_a indices into `a` and then n_b indices into `b`, uniformly with
 * replacement (`rng.int`, one `createRandom(seed)` stream), and records mean(a*) − mean(b*)
 * (Efron & Tibshirani 1993, §8.3, two-sample bootstrap). Limits: type-7 quantiles at α and 1 − α,
 * α = (1 − level)/2 (percentile method, see bootstrap-interval.ts).
 *
 * NaN items are left out of their group and counted (`excludedA`, `excludedB`); ±Infinity, fewer
 * than 2 defined items in a group, level ∉ (0, 1) or resamples not an integer ≥ 2 is a `RangeError`.
 * Cost: O((n_a + n_b)·B) draws plus O(B log B).
 */
import { fsum } from '../metrics/fsum.ts';
import { intervalFromDistribution } from './bootstrap-interval.ts';
import { createRandom } from './random.ts';

export interface DifferenceOptions {
  a: Float64Array;
  b: Float64Array;
  level: number;
  resamples: number;
  seed: number;
}

export interface DifferenceResult {
  /** mean(a) − mean(b) on the defined items. */
  estimate: number;
  lower: number;
  upper: number;
  level: number;
  method: 'percentile';
  resamples: number;
  seed: number;
  /** Standard deviation of the bootstrap differences (denominator B − 1). */
  se: number;
  nA: number;
  nB: number;
  excludedA: number;
  excludedB: number;
}

function defined(x: Float64Array, name: string): Float64Array {
  for (let i = 0; i < x.length; i++) {
    if (x[i] === Infinity || x[i] === -Infinity) {
      throw new RangeError(`bootstrapDifference: ${name}[${i}] is ${x[i]}; only NaN (undefined item) is allowed`);
    }
  }
  const kept = x.filter((v) => v === v);
  if (kept.length < 2) throw new RangeError(`bootstrapDifference: group ${name} has ${kept.length} defined items, needs 2`);
  return kept;
}

/** Percentile interval of mean(a) − mean(b) with independent iid resampling of each group. */
export function bootstrapDifference(options: DifferenceOptions): DifferenceResult {
  const { level, resamples, seed } = options;
  if (!(level > 0 && level < 1)) throw new RangeError(`bootstrapDifference: level must be in (0, 1), got ${level}`);
  if (!Number.isInteger(resamples) || resamples < 2) {
    throw new RangeError(`bootstrapDifference: resamples must be an integer >= 2, got ${resamples}`);
  }
  const a = defined(options.a, 'a');
  const b = defined(options.b, 'b');
  const na = a.length;
  const nb = b.length;
  const rng = createRandom(seed);
  const dist = new Float64Array(resamples);
  for (let r = 0; r < resamples; r++) {
    let sa = 0;
    for (let i = 0; i < na; i++) sa += a[rng.int(na)];
    let sb = 0;
    for (let i = 0; i < nb; i++) sb += b[rng.int(nb)];
    dist[r] = sa / na - sb / nb;
  }
  let mean = 0;
  for (let r = 0; r < resamples; r++) mean += dist[r];
  mean /= resamples;
  let ss = 0;
  for (let r = 0; r < resamples; r++) ss += (dist[r] - mean) ** 2;
  dist.sort();
  const estimate = fsum(a) / na - fsum(b) / nb;
  const iv = intervalFromDistribution(dist, estimate, 'percentile', level);
  return {
    estimate,
    lower: iv.lower,
    upper: iv.upper,
    level,
    method: 'percentile',
    resamples,
    seed,
    se: Math.sqrt(ss / (resamples - 1)),
    nA: na,
    nB: nb,
    excludedA: options.a.length - na,
    excludedB: options.b.length - nb,
  };
}
