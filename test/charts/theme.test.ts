/**
 * The chart look reads in greyscale print and on white paper. Lightness is CIE 1976 L* from
 * sRGB (IEC 61966-2-1 transfer function, Rec. 709 luminance weights); contrast is the WCAG 2.1
 * ratio (L1 + 0.05) / (L2 + 0.05), with 3:1 the minimum for graphical objects (SC 1.4.11).
 */
import { describe, expect, it } from 'vitest';
import { CATEGORY, cssCustomProperties, DASHES, PALETTE, ROLE, SHAPES, themeConfig } from '../../src/charts/theme.ts';

function luminance(hex: string): number {
  const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((v) => (v <= 0.04045 ? v / 12.92 : ((v + 0.055) / 1.055) ** 2.4));
  return 0.2126 * c[0]! + 0.7152 * c[1]! + 0.0722 * c[2]!;
}
const lstar = (hex: string) => {
  const y = luminance(hex);
  return y > 216 / 24389 ? 116 * Math.cbrt(y) - 16 : (24389 / 27) * y;
};
const contrastOnWhite = (hex: string) => 1.05 / (luminance(hex) + 0.05);

describe('theme', () => {
  it('neighbouring series differ by at least 15 L* (greyscale), the first two by 25', () => {
    for (let i = 1; i < CATEGORY.length; i++) expect(Math.abs(lstar(CATEGORY[i]!) - lstar(CATEGORY[i - 1]!))).toBeGreaterThanOrEqual(15);
    expect(Math.abs(lstar(CATEGORY[0]!) - lstar(CATEGORY[1]!))).toBeGreaterThanOrEqual(25);
  });

  it('every series colour and the estimate colour stand 3:1 against the white chart background', () => {
    for (const c of [...CATEGORY, ROLE.estimate, ROLE.muted]) expect(contrastOnWhite(c)).toBeGreaterThanOrEqual(3);
  });

  it('every series has its own shape and dash, so colour is never the only cue', () => {
    expect(new Set(SHAPES.slice(0, CATEGORY.length)).size).toBe(CATEGORY.length);
    expect(new Set(DASHES.slice(0, CATEGORY.length).map((d) => d.join(','))).size).toBe(CATEGORY.length);
    expect(CATEGORY).not.toContain(ROLE.estimate); // the estimate colour is never a series colour
  });

  it('the same values reach the Vega-Lite config and the CSS custom properties', () => {
    const cfg = themeConfig() as { range: { category: string[] }; font: string };
    expect(cfg.range.category).toEqual(CATEGORY);
    const css = cssCustomProperties();
    expect(css).toContain(`--chart-data: ${PALETTE.indigo};`);
    expect(css).toContain(`--chart-font: ${cfg.font};`);
  });
});
