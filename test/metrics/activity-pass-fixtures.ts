/**
 * Seeded matrices for the activity-pass tests. Cell codes: 0 finite, 1 NaN, 2 +Inf, 3 −Inf,
 * 4 missing (the value stays finite; the mask marks it).
 */
import type { Numeric, UnitBlock } from '../../src/types.ts';
import { createActivityPass, finishActivityPass, type ActivityPassOptions, type ActivityPassResult } from '../../src/metrics/activity-pass.ts';

/** mulberry32: a small public-domain 32-bit generator; seeded, reproducible. */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal by Box–Muller from a uniform generator. */
export function normal(rand: () => number): () => number {
  return () => Math.sqrt(-2 * Math.log(1 - rand())) * Math.cos(2 * Math.PI * rand());
}

export function poisson(rand: () => number, lambda: number): number {
  const L = Math.exp(-lambda);
  let k = 0;
  let p = rand();
  while (p > L) {
    k++;
    p *= rand();
  }
  return k;
}

export interface Matrix {
  units: number;
  bins: number;
  /** Finite values (float64), with 0 where the code is NaN/±Inf. */
  values: number[];
  code: number[];
}

/**
 * 40 units × 300 bins with every case the pass must handle: Poisson counts (histogram Gini),
 * Gaussian values with negatives (sorted Gini), a silent, a constant, a one-spike and an
 * all-NaN unit, scattered NaN/±Inf, missing cells, an integer unit with negatives, a duplicate
 * of unit 0, exponential values.
 */
export function mixedMatrix(seed = 7): Matrix {
  const rand = mulberry32(seed);
  const gauss = normal(rand);
  const units = 40, bins = 300;
  const values: number[] = new Array(units * bins).fill(0);
  const code: number[] = new Array(units * bins).fill(0);
  for (let u = 0; u < units; u++) {
    const lam = 0.1 + 2.9 * rand();
    for (let j = 0; j < bins; j++) {
      const i = u * bins + j;
      let v: number;
      if (u < 10 || (u >= 24 && u < 30)) v = poisson(rand, lam);
      else if (u < 20) v = 1 + gauss();
      else if (u === 20) v = 0;
      else if (u === 21) v = 2.5;
      else if (u === 22) v = j === 17 ? 3 : 0;
      else if (u === 23) { v = 0; code[i] = 1; }
      else if (u < 35) v = Math.abs(gauss()) * (rand() < 0.4 ? 0 : 1);
      else if (u === 35) v = Math.floor(rand() * 8) - 2;
      else if (u === 36) v = values[j]; // duplicate of unit 0
      else v = -Math.log(1 - rand()) * lam;
      values[i] = v;
      if (u >= 24 && u < 30 && rand() < 0.03) code[i] = 1 + Math.floor(rand() * 3);
      if (u >= 30 && u < 35 && rand() < 0.1) code[i] = 4;
      if (code[i] >= 1 && code[i] <= 3) values[i] = 0;
    }
  }
  return { units, bins, values, code };
}

/** The matrix as typed data + mask, with NaN/±Inf put in. */
export function toArrays(m: Matrix, type: 'f64' | 'f32'): { data: Numeric; mask: Uint8Array | undefined } {
  const data = type === 'f64' ? new Float64Array(m.values.length) : new Float32Array(m.values.length);
  const mask = new Uint8Array(m.values.length);
  let anyMissing = false;
  for (let i = 0; i < m.values.length; i++) {
    const c = m.code[i];
    data[i] = c === 1 ? NaN : c === 2 ? Infinity : c === 3 ? -Infinity : m.values[i];
    if (c === 4) { mask[i] = 1; anyMissing = true; }
  }
  return { data, mask: anyMissing ? mask : undefined };
}

/** Blocks of `size` units, each a fresh copy (as a reader reusing one buffer would hand out). */
export function* blocksOf(data: Numeric, mask: Uint8Array | undefined, units: number, bins: number, size: number, from = 0, to = units): Generator<UnitBlock> {
  for (let u = from; u < to; u += size) {
    const n = Math.min(size, to - u);
    yield {
      unitStart: u, units: n, bins,
      data: data.slice(u * bins, (u + n) * bins),
      missing: mask?.slice(u * bins, (u + n) * bins),
    };
  }
}

export function runPass(m: Matrix, options: ActivityPassOptions, type: 'f64' | 'f32' = 'f64', blockUnits = 7): ActivityPassResult {
  const { data, mask } = toArrays(m, type);
  const pass = createActivityPass({ units: m.units, bins: m.bins }, options);
  for (const b of blocksOf(data, mask, m.units, m.bins, blockUnits)) pass.addBlock(b);
  return finishActivityPass(pass.state());
}

/** |a − b| ≤ rel · max(1, |b|), with null/NaN matching only null/NaN. */
export function close(a: number, b: number | null, rel = 1e-12): boolean {
  if (b === null) return Number.isNaN(a);
  return Math.abs(a - b) <= rel * Math.max(1, Math.abs(b));
}
