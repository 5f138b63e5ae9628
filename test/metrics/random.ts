/**
 * Seeded random numbers for the measure tests (test helper, not a test file).
 * the mulberry32 32-bit generator (T. Ettinger), two draws per 53-bit double;
 * normals by Box–Muller (1958, Ann. Math. Stat. 29:610–611); Laplace and exponential by
 * inversion of their distribution functions.
 */
import { expect } from 'vitest';

export interface Rng {
  /** Uniform on [0, 1) with 53 random bits. */
  uniform(): number;
  normal(): number;
  exponential(): number;
  laplace(): number;
  /** Integer in [0, k). */
  int(k: number): number;
}

export function makeRng(seed: number): Rng {
  let a = seed >>> 0;
  const u32 = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (t ^ (t >>> 14)) >>> 0;
  };
  const uniform = (): number => ((u32() >>> 5) * 67108864 + (u32() >>> 6)) / 9007199254740992;
  return {
    uniform,
    normal: () => {
      const u = 1 - uniform();
      return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * uniform());
    },
    exponential: () => -Math.log(1 - uniform()),
    laplace: () => {
      const u = uniform() - 0.5;
      return -Math.sign(u) * Math.log(1 - 2 * Math.abs(u));
    },
    int: (k: number) => Math.floor(uniform() * k),
  };
}

/** n draws of `draw` into a Float64Array. */
export function sample(n: number, draw: () => number): Float64Array {
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = draw();
  return x;
}

/** Assert |actual − expected| ≤ abs + rel·|expected| (and that actual is a number). */
export function expectClose(actual: number | null, expected: number, rel: number, abs = 0, label = ''): void {
  if (actual === null || !(Math.abs(actual - expected) <= abs + rel * Math.abs(expected))) {
    expect.fail(`${label ? label + ': ' : ''}got ${actual}, expected ${expected} (rel ${rel}, abs ${abs})`);
  }
}
