/** Tabular CUSUM: a short series worked by hand from Page (1954) as restated by Montgomery (K = kσ, H = hσ). */
import { describe, expect, it } from 'vitest';
import { cusumChart } from '../../src/stats/cusum.ts';

describe('cusumChart', () => {
  it('worked by hand: μ₀ = 10, σ = 1, k = 0.5, h = 4 → K = 0.5, H = 4', () => {
    // x:    10.5   12    11    13    9     8
    // S_H:  max(0, 10.5−10.5+0)=0; 12−10.5+0=1.5; 11−10.5+1.5=2; 13−10.5+2=4.5; 9−10.5+4.5=3; 8−10.5+3=0.5
    // S_L:  max(0, 9.5−10.5)=0; 0; 0; 0; 9.5−9+0=0.5; 9.5−8+0.5=2
    // Signal when S > H = 4: only t = 4 (index 3).
    const r = cusumChart([10.5, 12, 11, 13, 9, 8], { mu0: 10, sigma: 1, k: 0.5, h: 4 });
    expect(r.high).toEqual([0, 1.5, 2, 4.5, 3, 0.5]);
    expect(r.low).toEqual([0, 0, 0, 0, 0.5, 2]);
    expect(r.H).toBe(4);
    expect(r.signal).toEqual([false, false, false, true, false, false]);
    expect(r.firstSignal).toBe(3);
  });

  it('scales with σ and signals on the low side: μ₀ = 0, σ = 2, k = 0.5, h = 2 → K = 1, H = 4', () => {
    // S_L: max(0, −1 − (−3)) = 2; −1 − (−2) + 2 = 3; −1 − (−3) + 3 = 5 > 4 → signal at index 2.
    const r = cusumChart([-3, -2, -3], { mu0: 0, sigma: 2, k: 0.5, h: 2 });
    expect(r.low).toEqual([2, 3, 5]);
    expect(r.high).toEqual([0, 0, 0]);
    expect(r.firstSignal).toBe(2);
    // Equal to H is not a signal (S must exceed H).
    expect(cusumChart([-3, -2, -2], { mu0: 0, sigma: 2, k: 0.5, h: 2 }).firstSignal).toBeNull();
  });

  it('refuses non-finite x and bad parameters', () => {
    const o = { mu0: 0, sigma: 1, k: 0.5, h: 5 };
    expect(() => cusumChart([NaN], o)).toThrow(/x\[0\]/);
    expect(() => cusumChart([1], { ...o, h: 0 })).toThrow(/h/);
    expect(() => cusumChart([1], { ...o, k: -1 })).toThrow(/k/);
  });
});
