/**
 * Multiple-testing adjustments of p-values (adjusted p-values, returned in input order).
 *
 * Holm (1979), "A simple sequentially rejective multiple test procedure", Scand. J. Stat. 6:65–70
 * (controls the family-wise error rate). With p sorted ascending p_(1) ≤ … ≤ p_(m):
 *   p̃_(i) = min(1, max_{j ≤ i} (m − j + 1)·p_(j))
 *
 * Benjamini & Hochberg (1995), "Controlling the false discovery rate", JRSS B 57:289–300
 * (controls the false discovery rate under independence or positive dependence):
 *   p̃_(i) = min(1, min_{j ≥ i} m·p_(j)/j)
 *
 * Rejecting where p̃ ≤ α is the same decision as each published step-down / step-up procedure
 * at level α. Input: numbers in [0, 1] (a `RangeError` naming the index otherwise; NaN is not a
 * p-value). An empty array gives an empty array. Ties keep their input order (stable sort).
 * Cost: O(m log m).
 *
 * @example holm([0.01, 0.04, 0.03, 0.005]) // → [0.03, 0.06, 0.06, 0.02]
 * @example benjaminiHochberg([0.01, 0.04, 0.03, 0.005]) // → [0.02, 0.04, 0.04, 0.02]
 */

function order(p: readonly number[], name: string): number[] {
  p.forEach((v, i) => {
    if (!(v >= 0 && v <= 1)) throw new RangeError(`${name}: p[${i}] is ${v}; p-values must be in [0, 1]`);
  });
  return p.map((_, i) => i).sort((a, b) => p[a] - p[b]);
}

/** Holm's step-down adjusted p-values. */
export function holm(p: readonly number[]): number[] {
  const idx = order(p, 'holm');
  const m = p.length;
  const out = new Array<number>(m);
  let running = 0;
  idx.forEach((k, i) => {
    running = Math.max(running, Math.min(1, (m - i) * p[k]));
    out[k] = running;
  });
  return out;
}

/** Benjamini–Hochberg step-up adjusted p-values (false discovery rate). */
export function benjaminiHochberg(p: readonly number[]): number[] {
  const idx = order(p, 'benjaminiHochberg');
  const m = p.length;
  const out = new Array<number>(m);
  let running = 1;
  for (let i = m - 1; i >= 0; i--) {
    const k = idx[i];
    running = Math.min(running, (m * p[k]) / (i + 1));
    out[k] = running;
  }
  return out;
}
