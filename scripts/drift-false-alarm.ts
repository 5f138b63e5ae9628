/**
 * How often does the drift screening flag a series that did not change?
 *
 * Seeded simulation of in-control monthly series, run through `buildDrift` with the manifest's
 * default drift settings (baseline 3 months; EWMA λ = 0.2, L = 3; CUSUM k = 0.5, h = 5):
 * each month one dataset whose estimate is μ + SE·ε (ε standard normal), SE = s/√n with n units
 * drawn in [40, 80], and a reported 95% interval estimate ± 1.96·SE·(1 + 0.1·ε′) (bootstrap
 * intervals are themselves noisy). Optionally a true month-to-month wobble τ (SD, in SE units),
 * which the screening, by design, treats as change.
 *
 * Prints, for 6 and 12 months: the share of series with at least one EWMA signal, with at
 * least one CUSUM signal, and with an unadjusted Mann–Kendall p < 0.05.
 *
 *   npx tsx scripts/drift-false-alarm.ts [reps=2000] [seed=1]
 */
import { buildDrift } from '../src/audit/drift.ts';
import type { DriftSettings } from '../src/manifest/types.ts';
import { createRandom, type Random } from '../src/stats/random.ts';
import type { DatasetResult } from '../src/types.ts';

const DEFAULTS: DriftSettings = { baseline_months: 3, chart: 'ewma', ewma_lambda: 0.2, ewma_L: 3, cusum_k: 0.5, cusum_h: 5, adjust: 'holm' };

function month(i: number): string {
  return `${2024 + Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, '0')}`;
}

function series(rng: Random, months: number, tau: number): DatasetResult[] {
  const out: DatasetResult[] = [];
  for (let m = 0; m < months; m++) {
    const n = 40 + rng.int(41);
    const se = 0.2 / Math.sqrt(n);
    const est = 0.6 + se * (tau * rng.normal() + rng.normal());
    const half = 1.959964 * se * (1 + 0.1 * rng.normal());
    out.push({
      id: `d${m}`, month: month(m), group: null, kind: 'activity', shape: [n, 5000], files: [], findings: [], cacheKey: '',
      measures: { lifetime_sparseness: { estimate: est, interval: [est - half, est + half], level: 0.95, method: 'percentile', n, excluded: 0, summary: '' } },
      chartData: { unitLabels: [], lifetimeSparseness: [], kurtosis: [], meanRate: [], populationWindows: [], windowBins: 1, binMs: null },
    });
  }
  return out;
}

function run(reps: number, seed: number, months: number, tau: number): { ewma: number; cusum: number; mk: number } {
  const rng = createRandom(seed);
  let ewma = 0;
  let cusum = 0;
  let mk = 0;
  for (let r = 0; r < reps; r++) {
    const ds = series(rng, months, tau);
    const opts = { level: 0.95, seed: 1, resamples: 100 };
    const e = buildDrift(ds, DEFAULTS, opts)?.series[0];
    const c = buildDrift(ds, { ...DEFAULTS, chart: 'cusum' }, opts)?.series[0];
    if (e?.firstSignal) ewma++;
    if (c?.firstSignal) cusum++;
    if (e?.mannKendall && e.mannKendall.p < 0.05) mk++;
  }
  return { ewma: ewma / reps, cusum: cusum / reps, mk: mk / reps };
}

const reps = Number(process.argv[2] ?? 2000);
const seed = Number(process.argv[3] ?? 1);
const pct = (v: number) => `${(100 * v).toFixed(1)}%`;
// Binomial SE of a rate near 5% with `reps` series: √(0.05·0.95/reps).
console.log(`in-control series, ${reps} per row (seed ${seed}; binomial SE of a 5% rate ≈ ${pct(Math.sqrt(0.0475 / reps))})`);
console.log('months  τ/SE   EWMA any signal   CUSUM any signal   Mann–Kendall p<0.05');
for (const tau of [0, 0.5]) {
  for (const months of [6, 12]) {
    const r = run(reps, seed + months, months, tau);
    console.log(`${String(months).padStart(6)}  ${tau.toFixed(1).padStart(4)}   ${pct(r.ewma).padStart(15)}   ${pct(r.cusum).padStart(16)}   ${pct(r.mk).padStart(19)}`);
  }
}
