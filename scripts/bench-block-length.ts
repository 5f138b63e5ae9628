/**
 * Benchmark: the automatic block length (politisWhiteDetails) alone, on 2,000,000-item series.
 *
 *   node --import tsx scripts/bench-block-length.ts
 *
 * Series (seeded): Poisson-like counts with no dependence (m̂ small: direct sums only), AR(1)
 * φ = 0.5 and φ = 0.95 (m̂ past the direct lags: FFT), and a random walk (no run of small
 * correlations: every lag up to m_max, FFT). Prints wall time of one call per series and what the
 * rule chose. Run it in a capped child (e.g. `/usr/bin/time -v prlimit --as=4000000000 …`) for
 * the peak memory.
 */
import { performance } from 'node:perf_hooks';
import { politisWhiteDetails } from '../src/stats/block-length.ts';
import { createRandom } from '../src/stats/random.ts';

const N = 2_000_000;
const rng = createRandom(20261202);

function ar1(phi: number): Float64Array {
  const x = new Float64Array(N);
  let prev = 0;
  for (let i = 0; i < N; i++) x[i] = prev = phi * prev + rng.normal();
  return x;
}

const cases: [string, () => Float64Array][] = [
  ['counts, no dependence', () => Float64Array.from({ length: N }, () => (rng.next() < 0.3 ? 1 : 0))],
  ['AR(1) φ = 0.5', () => ar1(0.5)],
  ['AR(1) φ = 0.95', () => ar1(0.95)],
  ['random walk', () => ar1(1)],
];
for (const [label, make] of cases) {
  const x = make();
  const t0 = performance.now();
  const d = politisWhiteDetails(x);
  const s = (performance.now() - t0) / 1000;
  console.log(`${label.padEnd(24)} ${s.toFixed(2).padStart(7)} s   m̂ = ${d.mHat}, M = ${d.M}, block length ${d.blockLength}`);
}
