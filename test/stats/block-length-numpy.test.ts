/**
 * The automatic block length (Politis & White 2004; Patton, Politis & White 2009) against an
 * independent numpy implementation of the same published rule, written here from the papers'
 * formulas (autocovariances by one dot product per lag, np.dot), computed at test time. The
 * series are long enough (n = 300,000) that the rule needs lags past the direct-sum range, so
 * the FFT path of src/stats/autocovariance.ts is what is checked; iid noise checks the direct path.
 * Expected: the same m̂, M and block length; Ĝ, ĝ and b̂ to 1e-9 relative (FFT rounding).
 */
import { describe, expect, it } from 'vitest';
import { politisWhiteDetails } from '../../src/stats/block-length.ts';
import { autocovariances, autocovariancesFft, DIRECT_LAGS } from '../../src/stats/autocovariance.ts';
import { createRandom } from '../../src/stats/random.ts';
import { hasScipy, runPython } from '../helpers/python.ts';

const RULE = `
x = np.array(inp['x'], dtype=np.float64)
n = len(x)
e = x - x.mean()
Kn = max(5, int(np.ceil(np.sqrt(np.log10(n)))))
mmax = min(n - 1, int(np.ceil(np.sqrt(n))) + Kn)
R = np.array([np.dot(e[:n - k], e[k:]) for k in range(mmax + 1)]) / n
rho = np.abs(R[1:] / R[0])
thr = 2 * np.sqrt(np.log10(n) / n)
mhat = -1
run = 0
for k in range(1, mmax + 1):
    run = run + 1 if rho[k - 1] < thr else 0
    if run == Kn:
        mhat = k - Kn
        break
M = mmax if mhat < 0 else min(2 * mhat, mmax)
if mhat < 0:
    mhat = mmax
k = np.arange(1, M + 1)
t = k / M if M > 0 else k
lam = np.where(t <= 0.5, 1.0, np.where(t <= 1, 2 * (1 - t), 0.0))
G = float(np.sum(2 * lam * k * R[1:M + 1]))
g = float(R[0] + np.sum(2 * lam * R[1:M + 1]))
bmax = max(1, int(np.ceil(min(3 * np.sqrt(n), n / 3))))
raw = float(np.cbrt(3 * n * G * G / (2 * g * g))) if g > 0 else None
bl = 1 if raw is None else max(1, min(bmax, int(np.floor(raw + 0.5))))
print(json.dumps({'mHat': mhat, 'M': M, 'G': G, 'g': g, 'raw': raw, 'blockLength': bl,
                  'R': R[:8].tolist() + R[-8:].tolist()}))
`;

function ar1(n: number, phi: number, seed: number): Float64Array {
  const r = createRandom(seed);
  const x = new Float64Array(n);
  let prev = r.normal() / Math.sqrt(1 - phi * phi);
  x[0] = prev;
  for (let i = 1; i < n; i++) x[i] = prev = phi * prev + r.normal();
  return x;
}

function randomWalk(n: number, seed: number): Float64Array {
  const r = createRandom(seed);
  const x = new Float64Array(n);
  for (let i = 1; i < n; i++) x[i] = x[i - 1] + r.normal();
  return x;
}

describe.skipIf(!hasScipy)('politisWhiteDetails against a numpy implementation of the rule', () => {
  const n = 300_000;
  it.each([
    ['AR(1) φ = 0.95 (m̂ past the direct lags: FFT)', () => ar1(n, 0.95, 11)],
    ['random walk (no run of small correlations: M = m_max, FFT)', () => randomWalk(n, 12)],
    ['AR(1) φ = 0.3 (m̂ small: direct sums only)', () => ar1(n, 0.3, 13)],
  ])('%s', (_name, make) => {
    const x = make();
    const ours = politisWhiteDetails(x);
    const ref = runPython<{ mHat: number; M: number; G: number; g: number; raw: number | null; blockLength: number }>(
      RULE,
      { x: Array.from(x) },
    );
    expect(ours.mHat).toBe(ref.mHat);
    expect(ours.M).toBe(ref.M);
    expect(ours.blockLength).toBe(ref.blockLength);
    expect(Math.abs(ours.G / ref.G - 1)).toBeLessThan(1e-9);
    expect(Math.abs(ours.g / ref.g - 1)).toBeLessThan(1e-9);
    expect(Math.abs(ours.raw / (ref.raw as number) - 1)).toBeLessThan(1e-9);
  }, 120_000);

  it('autocovariancesFft equals one numpy dot product per lag, to 1e-12 of R̂(0)', () => {
    const x = ar1(20_000, 0.7, 21);
    let mean = 0;
    for (const v of x) mean += v;
    mean /= x.length;
    const e = x.map((v) => v - mean);
    const maxLag = 300;
    const ours = autocovariancesFft(e, maxLag);
    const ref = runPython<number[]>(
      `e = np.array(inp['e']); n = len(e)
print(json.dumps([float(np.dot(e[:n-k], e[k:]) / n) for k in range(inp['L'] + 1)]))`,
      { e: Array.from(e), L: maxLag },
    );
    for (let k = 0; k <= maxLag; k++) expect(Math.abs(ours[k] - ref[k])).toBeLessThan(1e-12 * ref[0]);
    // The dispatcher takes the FFT for many lags and agrees with itself.
    expect(maxLag + 1).toBeGreaterThan(DIRECT_LAGS);
    expect(Array.from(autocovariances(e, maxLag))).toEqual(Array.from(ours));
  });
});
