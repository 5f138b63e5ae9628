/**
 * Benchmark: bootstrapInterval over 50,000 bins with 10,000 resamples.
 *
 *   node --import tsx scripts/bench-bootstrap.ts
 *
 * Series: seeded AR(1) (φ = 0.5, unit-variance innovations) as a per-bin mean, and as a ratio
 * (numerator = a Poisson-like active count, denominator = units per bin). Prints wall time per
 * case (median of 3 runs after one warm-up run) and the block length chosen. The ℓ = 1 and iid
 * cases are the worst case (n draws per resample, 5·10⁸ in all); moving blocks of length 1
 * use the iid loop (same draws), so those two take about the same time.
 */
import { performance } from 'node:perf_hooks';
import { bootstrapInterval, type BootstrapOptions } from '../src/stats/bootstrap.ts';
import { createRandom } from '../src/stats/random.ts';

const N = 50_000;
const B = 10_000;
const rng = createRandom(20240601);
const series = new Float64Array(N);
let prev = rng.normal() / Math.sqrt(1 - 0.25);
for (let i = 0; i < N; i++) {
  prev = i === 0 ? prev : 0.5 * prev + rng.normal();
  series[i] = prev;
}
const units = new Float64Array(N).fill(200);
const active = series.map((v) => Math.max(0, Math.round(20 + 4 * v)));

function time(label: string, options: BootstrapOptions): void {
  bootstrapInterval(options); // warm-up
  const times: number[] = [];
  let last = bootstrapInterval(options);
  for (let r = 0; r < 3; r++) {
    const t0 = performance.now();
    last = bootstrapInterval(options);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  console.log(
    `${label.padEnd(44)} ${times[1].toFixed(0).padStart(6)} ms   block length ${String(last.blockLength).padStart(4)}` +
      `   [${last.lower.toFixed(4)}, ${last.upper.toFixed(4)}]`,
  );
}

console.log(`bootstrapInterval, n = ${N} bins, B = ${B} resamples (node ${process.version})`);
const common = { level: 0.95, resamples: B, seed: 1 } as const;
time('mean, moving-block auto, BCa', {
  ...common,
  statistic: { kind: 'mean', values: series },
  resampling: 'moving-block',
  resamplingUnit: 'blocks-of-bins',
  blockLength: 'auto',
  method: 'bca',
});
time('ratio, moving-block auto, BCa', {
  ...common,
  statistic: { kind: 'ratio', numerator: active, denominator: units },
  resampling: 'moving-block',
  resamplingUnit: 'blocks-of-bins',
  blockLength: 'auto',
  method: 'bca',
});
time('mean, moving-block ℓ = 1 (worst case), BCa', {
  ...common,
  statistic: { kind: 'mean', values: series },
  resampling: 'moving-block',
  resamplingUnit: 'blocks-of-bins',
  blockLength: 1,
  method: 'bca',
});
time('mean, iid, percentile', {
  ...common,
  statistic: { kind: 'mean', values: series },
  resampling: 'iid',
  resamplingUnit: 'bins',
  method: 'percentile',
});
