/**
 * Lacuna's chart look: one palette, one typeface stack, light gridlines.
 *
 * Palette: the eight colours of Okabe & Ito (2008), "Color Universal Design (CUD): how to make
 * figures and presentations that are friendly to colorblind people" (as published in Wong 2011,
 * Nature Methods 8:441), which stay distinguishable under the common colour-vision deficiencies.
 * Colour never carries meaning alone: flagged months also get a shape and a text label, layer
 * lines also get a dash pattern and a point shape.
 */

/** Okabe–Ito colours, by name. */
export const PALETTE = {
  black: '#000000',
  orange: '#E69F00',
  sky: '#56B4E9',
  green: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  purple: '#CC79A7',
} as const;

/** Colour roles used by every chart. */
export const ROLE = {
  /** Per-item data (units, windows, layers). */
  data: PALETTE.blue,
  /** Our estimate and its bootstrap interval. */
  estimate: PALETTE.vermillion,
  /** Ranges of data (min–max band of windows). */
  range: PALETTE.sky,
  /** Baseline band of a drift series. */
  baseline: '#9aa3ad',
  /** Control limits. */
  limit: '#3b4148',
  /** Flagged points. */
  signal: PALETTE.vermillion,
  ink: '#1f2328',
  muted: '#5b626b',
  grid: '#e8eaed',
} as const;

/** Categorical order for series (layers, directions): yellow is left out (too light on white). */
export const CATEGORY = [PALETTE.blue, PALETTE.orange, PALETTE.green, PALETTE.purple, PALETTE.sky, PALETTE.vermillion, PALETTE.black];
/** Dash patterns paired with CATEGORY, so series differ without colour. */
export const DASHES = [[1, 0], [6, 3], [2, 2], [8, 3, 2, 3], [4, 4], [10, 2], [1, 3]];
/** Point shapes paired with CATEGORY. */
export const SHAPES = ['circle', 'square', 'triangle-up', 'diamond', 'cross', 'triangle-down', 'wedge'];

/** Typeface stack: humanist sans faces with wide language coverage, then the platform default. */
export const FONT = '"Source Sans 3", "Noto Sans", "Fira Sans", "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif';

export const CHART_WIDTH = 520;
export const CHART_HEIGHT = 220;

/** Vega-Lite `config` block applied to every chart. */
export function themeConfig(): Record<string, unknown> {
  return {
    font: FONT,
    background: '#ffffff',
    padding: 8,
    view: { stroke: null },
    title: { anchor: 'start', color: ROLE.ink, fontSize: 14, fontWeight: 600, subtitleColor: ROLE.muted, subtitleFontSize: 11, offset: 10 },
    axis: {
      grid: true,
      gridColor: ROLE.grid,
      gridWidth: 0.7,
      domainColor: '#8c939b',
      tickColor: '#8c939b',
      labelColor: ROLE.muted,
      titleColor: ROLE.ink,
      labelFontSize: 11,
      titleFontSize: 12,
      titleFontWeight: 500,
    },
    axisBand: { grid: false },
    legend: { labelColor: ROLE.muted, titleColor: ROLE.ink, labelFontSize: 11, titleFontSize: 11, orient: 'bottom', direction: 'horizontal' },
    header: { labelColor: ROLE.ink, labelFontSize: 12, titleColor: ROLE.ink },
    range: { category: CATEGORY },
    mark: { color: ROLE.data },
    text: { color: ROLE.ink, fontSize: 11 },
  };
}
