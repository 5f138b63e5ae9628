/**
 * Samplers for the demo scenario, on top of a seeded uniform generator.
 * Poisson: inversion by sequential search for small means (Devroye 1986, ch. X.3), normal
 * approximation with continuity correction above 30 (demo data only; not used by any measure).
 * Gamma: Marsaglia & Tsang (2000), ACM TOMS 26:363–372, with the shape < 1 boost.
 */
export interface Uniform {
  next(): number;
  normal(): number;
}

export function poisson(rng: Uniform, mean: number): number {
  if (!(mean > 0)) return 0;
  if (mean > 30) return Math.max(0, Math.round(mean + Math.sqrt(mean) * rng.normal()));
  let k = 0;
  let p = Math.exp(-mean);
  let cdf = p;
  const u = rng.next();
  while (u > cdf && k < 1000) {
    k += 1;
    p *= mean / k;
    cdf += p;
  }
  return k;
}

export function gamma(rng: Uniform, shape: number, scale: number): number {
  if (shape < 1) {
    const u = rng.next();
    return gamma(rng, shape + 1, scale) * Math.pow(u === 0 ? Number.MIN_VALUE : u, 1 / shape);
  }
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = rng.normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next();
    if (u < 1 - 0.0331 * x ** 4) return d * v * scale;
    if (Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v * scale;
  }
}
