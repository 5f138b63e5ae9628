/**
 * Percentile and BCa intervals against scipy.stats.bootstrap (live), same data, same B, same level.
 *
 * The two programs use different random streams, so each bound is compared within Monte Carlo
 * error. Tolerance reasoning: the α-quantile of B bootstrap values has standard error
 * ≈ √(α(1 − α)/B) / f(q_α) (asymptotic SE of a sample quantile; e.g. Serfling 1980, §2.3.3).
 * With f approximated by a normal density of the bootstrap SE, f(q_α) ≈ φ(z_α)/se, so
 * SE_q ≈ se·√(α(1 − α)/B)/φ(z_α). Two independent runs differ by √2·SE_q; we allow 4 of those.
 * For BCa the quantile level α₁ itself carries MC error through ẑ₀ = Φ⁻¹(p̂), sd(p̂) ≤ √(1/(4B)):
 * it moves α₁ by about φ(z_α)·2·δẑ₀ (∂α₁/∂ẑ₀ ≈ 2φ for small â), i.e. a bound shift of
 * about se·2·δẑ₀ — similar in size to SE_q at α = 0.025 — so BCa gets twice the tolerance.
 * A check that BCa and percentile bounds differ by more than the tolerance makes sure the
 * comparison can tell the methods apart.
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { bootstrapInterval, type BootstrapResult } from '../../src/stats/bootstrap.ts';
import { normalPdf, normalPpf } from '../../src/stats/normal.ts';

// Skewed data, deterministic: exponential quantiles −10·ln(1 − (i + ½)/30), i = 0…29.
const SKEWED = Float64Array.from({ length: 30 }, (_, i) => -10 * Math.log(1 - (i + 0.5) / 30));
// Right-skewed counts for a ratio (active / total per bin), deterministic: rounded exponential
// quantiles in a shuffled order ((17·i) mod 40 is a permutation of 0…39).
const NUM = Float64Array.from({ length: 40 }, (_, i) => Math.round(-8 * Math.log(1 - (((17 * i) % 40) + 0.5) / 40)));
const DEN = Float64Array.from({ length: 40 }, (_, i) => 20 + ((i * 3) % 7));
const B = 50_000;

const SCIPY = `
from scipy import stats
out = {}
x = np.array(inp["x"]); num = np.array(inp["num"]); den = np.array(inp["den"])
for level in (0.95, 0.9):
    for m in ("percentile", "BCa"):
        r = stats.bootstrap((x,), np.mean, n_resamples=inp["B"], confidence_level=level, method=m,
                            rng=np.random.default_rng(12345))
        out[f"mean-{m}-{level}"] = [float(r.confidence_interval.low), float(r.confidence_interval.high)]
        r = stats.bootstrap((num, den), lambda a, b, axis=-1: a.sum(axis=axis) / b.sum(axis=axis), paired=True,
                            vectorized=True, n_resamples=inp["B"], confidence_level=level, method=m,
                            rng=np.random.default_rng(54321))
        out[f"ratio-{m}-{level}"] = [float(r.confidence_interval.low), float(r.confidence_interval.high)]
print(json.dumps(out))
`;

function tolerance(r: BootstrapResult): number {
  const alpha = (1 - r.level) / 2;
  const seQ = (r.se * Math.sqrt((alpha * (1 - alpha)) / r.resamples)) / normalPdf(normalPpf(alpha));
  return 4 * Math.SQRT2 * seQ * (r.method === 'bca' ? 2 : 1);
}

describe.skipIf(!hasScipy)('bootstrapInterval against scipy.stats.bootstrap (live)', () => {
  const ref = hasScipy
    ? runPython<Record<string, [number, number]>>(SCIPY, {
        x: Array.from(SKEWED),
        num: Array.from(NUM),
        den: Array.from(DEN),
        B,
      })
    : {};

  for (const level of [0.95, 0.9]) {
    for (const kind of ['mean', 'ratio'] as const) {
      it(`${kind}, level ${level}: percentile and BCa bounds within Monte Carlo tolerance`, () => {
        const results: Record<string, BootstrapResult> = {};
        for (const [method, key] of [['percentile', 'percentile'], ['bca', 'BCa']] as const) {
          const r = bootstrapInterval({
            statistic:
              kind === 'mean'
                ? { kind: 'mean', values: SKEWED }
                : { kind: 'ratio', numerator: NUM, denominator: DEN },
            resampling: 'iid',
            resamplingUnit: 'bins',
            method,
            level,
            resamples: B,
            seed: 99,
          });
          const [lo, hi] = ref[`${kind}-${key}-${level}`];
          const tol = tolerance(r);
          expect(Math.abs(r.lower - lo)).toBeLessThan(tol);
          expect(Math.abs(r.upper - hi)).toBeLessThan(tol);
          results[method] = r;
        }
        // The methods must be distinguishable at this tolerance (skewed data: BCa shifts right).
        const shift = Math.abs(results.bca.upper - results.percentile.upper);
        expect(shift).toBeGreaterThan(tolerance(results.bca));
      });
    }
  }
});
