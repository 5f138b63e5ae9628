/**
 * Sample autocovariances R̂(k) = (1/n) Σ_{t=0}^{n−1−k} eₜ·eₜ₊ₖ for k = 0 … maxLag, of a series `e`
 * that is already centred (the caller subtracts the mean), as used by the automatic block length
 * (Politis & White 2004).
 *
 * Two ways to the same sums:
 * - direct: one dot product per lag, O(n·(maxLag + 1)); exact summation order, used for few lags;
 * - FFT (Wiener–Khinchin): zero-pad to N ≥ n + maxLag (a power of two, so the circular
 *   correlation has no wrapped terms at lags ≤ maxLag), transform, take |E|², transform back;
 *   O(N log N) time, two Float64Arrays of N items and a twiddle table of N/2 complex values. Cooley & Tukey (1965), Math. Comp.
 *   19:297–301, radix 2, iterative. Rounding error is about ε·log₂N·R̂(0) per lag (Schatzman 1996,
 *   SIAM J. Sci. Comput. 17:1150–1166), far below any threshold the rule compares against.
 *
 * `autocovariances` picks direct when maxLag + 1 ≤ `DIRECT_LAGS` (or n is small), FFT otherwise.
 * The input is not changed. Non-finite input gives non-finite output (callers check first).
 */

/** At most this many lags are computed by direct dot products (about the cost of one FFT pair). */
export const DIRECT_LAGS = 64;

/** R̂(k) for k = from … to (inclusive) by direct dot products, written into `out[k]`. */
export function autocovariancesDirect(e: Float64Array, from: number, to: number, out: Float64Array): void {
  const n = e.length;
  for (let k = from; k <= to; k++) {
    let s = 0;
    for (let t = 0; t + k < n; t++) s += e[t] * e[t + k];
    out[k] = s / n;
  }
}

/** In-place iterative radix-2 complex FFT (forward, e^{−2πi jk/N}); N a power of two. */
function fft(re: Float64Array, im: Float64Array): void {
  const N = re.length;
  for (let i = 1, j = 0; i < N; i++) {
    let bit = N >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      let t = re[i];
      re[i] = re[j];
      re[j] = t;
      t = im[i];
      im[i] = im[j];
      im[j] = t;
    }
  }
  // Twiddles e^{−2πik/N}, k < N/2, from cos/sin of each angle (not by repeated multiplication,
  // which would accumulate rounding); stage `len` uses every (N/len)-th.
  const half0 = N >> 1;
  const cosT = new Float64Array(half0);
  const sinT = new Float64Array(half0);
  for (let k = 0; k < half0; k++) {
    cosT[k] = Math.cos((2 * Math.PI * k) / N);
    sinT[k] = -Math.sin((2 * Math.PI * k) / N);
  }
  for (let len = 2; len <= N; len <<= 1) {
    const half = len >> 1;
    const step = N / len;
    for (let i0 = 0; i0 < N; i0 += len) {
      for (let k = 0, t = 0; k < half; k++, t += step) {
        const wr = cosT[t];
        const wi = sinT[t];
        const i = i0 + k;
        const j = i + half;
        const xr = re[j] * wr - im[j] * wi;
        const xi = re[j] * wi + im[j] * wr;
        re[j] = re[i] - xr;
        im[j] = im[i] - xi;
        re[i] += xr;
        im[i] += xi;
      }
    }
  }
}

/** R̂(0 … maxLag) by FFT; see the module comment. */
export function autocovariancesFft(e: Float64Array, maxLag: number): Float64Array {
  const n = e.length;
  let N = 1;
  while (N < n + maxLag) N <<= 1;
  const re = new Float64Array(N);
  const im = new Float64Array(N);
  re.set(e);
  fft(re, im);
  for (let i = 0; i < N; i++) {
    re[i] = re[i] * re[i] + im[i] * im[i];
    im[i] = 0;
  }
  // |E|² is real and even, so its inverse transform is the forward transform divided by N.
  fft(re, im);
  const R = new Float64Array(maxLag + 1);
  for (let k = 0; k <= maxLag; k++) R[k] = re[k] / N / n;
  return R;
}

/** R̂(0 … maxLag), direct for few lags, FFT for many; see the module comment. */
export function autocovariances(e: Float64Array, maxLag: number): Float64Array {
  if (maxLag + 1 <= DIRECT_LAGS || e.length <= 4 * DIRECT_LAGS) {
    const R = new Float64Array(maxLag + 1);
    autocovariancesDirect(e, 0, maxLag, R);
    return R;
  }
  return autocovariancesFft(e, maxLag);
}
