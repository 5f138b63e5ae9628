/**
 * Lacuna's chart look, shared with the report pages.
 *
 * - Inks: a small set of Lacuna's own colours, chosen for this report's warm paper and black
 *   ink rather than taken from a charting library or another product. Neighbouring series
 *   differ in lightness as well as hue (dark indigo next to light ochre), so two groups stay
 *   apart in greyscale print; and colour never carries meaning alone: every series also has a
 *   point shape and a dash pattern (SHAPES, DASHES), and a name in a legend or label.
 * - Type: one sans-serif stack (FONT) for the charts and the pages (`--sans` in
 *   `src/report/style.css` is `var(--chart-font)`), at sizes that stay at least 10 CSS px when a
 *   chart is scaled down to a 420 px phone column (see CHART_WIDTH).
 * - Marks: an estimate is a rule in the estimate colour (a point, shaped by its group, where
 *   several datasets share a chart), intervals are bars with short end caps, grids are dotted
 *   hairlines like the pages' table rules, axes have no box.
 *
 * `cssCustomProperties()` gives the same values as CSS custom properties (`--chart-…`); the
 * report's stylesheet is written with them first (src/report/assets.ts) and takes its ink and
 * sans-serif type from them.
 */
import { AXIS_NUMBER_FORMAT } from '../format/number.ts';

/** Lacuna's inks, by name (hex sRGB). Approximate CIE L* in brackets, for greyscale order. */
export const PALETTE = {
  /** Deep blue-violet ink (L* 28): the default data colour. */
  indigo: '#2b3a8f',
  /** Yellow-brown (L* 63): the light partner of indigo. */
  ochre: '#c08a1e',
  /** Red-purple (L* 36). */
  plum: '#7b3a6c',
  /** Green (L* 49). */
  moss: '#4e7d3a',
  /** Blue-grey (L* 52). */
  slate: '#6a7c8c',
  /** Red-brown (L* 46): our estimates and flags, never a series. */
  rust: '#b24a1e',
  /** Near-black (L* 12), as the pages' `--ink`. */
  ink: '#1c1e22',
} as const;

/** Colour roles used by every chart. */
export const ROLE = {
  /** Per-item data (units, windows, layers). */
  data: PALETTE.indigo,
  /** Our estimate and its bootstrap interval. */
  estimate: PALETTE.rust,
  /** Ranges of data (min–max band of windows): a pale indigo tint. */
  range: '#c3c9e6',
  /** Baseline band of a drift series: the pages' warm hairline colour. */
  baseline: '#d9d2c2',
  /** Control limits. */
  limit: '#3b4148',
  /** Flagged points. */
  signal: PALETTE.rust,
  ink: PALETTE.ink,
  muted: '#50555c',
  grid: '#cfc9bb',
  /** Chart background: white, as the pages' `--sheet`. */
  paper: '#ffffff',
} as const;

/** Categorical order for series (groups, layers): dark and light alternate, so greyscale keeps them apart. */
export const CATEGORY = [PALETTE.indigo, PALETTE.ochre, PALETTE.plum, PALETTE.slate, PALETTE.ink, PALETTE.moss];
/** Dash patterns paired with CATEGORY, so series differ without colour. */
export const DASHES = [[1, 0], [7, 3], [2, 2], [9, 3, 2, 3], [4, 4], [1, 3]];
/** Point shapes paired with CATEGORY (filled where the mark allows). */
export const SHAPES = ['circle', 'square', 'triangle-up', 'diamond', 'triangle-down', 'cross'];

/** Typeface stack, shared with the pages (their `--sans` is this, as `--chart-font`). */
export const FONT = 'system-ui, -apple-system, "Segoe UI", "Noto Sans", "DejaVu Sans", Arial, sans-serif';

/** Type sizes in SVG px (see SVG_WIDTH for why these sizes are legible on a phone). */
export const TYPE = { title: 14, subtitle: 12, label: 12, axisTitle: 12 } as const;

/**
 * Width budget of a whole chart SVG in px, axes, legend and titles included. A page scales the
 * SVG down to its column: about 362 px on a 420 px-wide phone, so 400 px keeps 12 px text at
 * 12 × 362 / 400 ≈ 10.9 px. The server-side SVG measures text by Vega's estimate (no canvas,
 * `estimateTextWidth`), which is wider than the real text, so the budget is met with room.
 */
export const SVG_WIDTH = 400;

/** Plot width in px (the data rectangle), leaving room in SVG_WIDTH for a y axis and padding. */
export const CHART_WIDTH = 300;
export const CHART_HEIGHT = 200;

/**
 * Text width as Vega estimates it without a canvas (vega-scenegraph `estimateWidth`:
 * 0.8 × font size × characters); charts size their text to fit SVG_WIDTH by this measure.
 */
export function estimateTextWidth(text: string, fontSize: number): number {
  return 0.8 * fontSize * text.length;
}

/** Longest title line and subtitle line, in characters, that fit SVG_WIDTH by the estimate. */
export const TITLE_CHARS = Math.floor((SVG_WIDTH - 16) / (0.8 * TYPE.title));
export const SUBTITLE_CHARS = Math.floor((SVG_WIDTH - 16) / (0.8 * TYPE.subtitle));

/** Vega-Lite `config` block applied to every chart. */
export function themeConfig(): Record<string, unknown> {
  return {
    font: FONT,
    background: ROLE.paper,
    padding: 8,
    view: { stroke: null },
    title: { anchor: 'start', color: ROLE.ink, fontSize: TYPE.title, fontWeight: 700, subtitleColor: ROLE.muted, subtitleFontSize: TYPE.subtitle, subtitlePadding: 4, offset: 12 },
    axis: {
      grid: true,
      gridColor: ROLE.grid,
      gridWidth: 0.8,
      gridDash: [1, 3],
      domain: false,
      ticks: true,
      tickColor: ROLE.muted,
      tickSize: 4,
      labelColor: ROLE.muted,
      labelFontSize: TYPE.label,
      labelPadding: 3,
      titleColor: ROLE.ink,
      titleFontSize: TYPE.axisTitle,
      titleFontWeight: 600,
      titlePadding: 6,
    },
    axisX: { domain: true, domainColor: ROLE.ink, domainWidth: 1 },
    axisBand: { grid: false },
    legend: { labelColor: ROLE.ink, titleColor: ROLE.ink, labelFontSize: TYPE.label, titleFontSize: TYPE.label, titleFontWeight: 600, orient: 'bottom', direction: 'horizontal', layout: { bottom: { anchor: 'start', direction: 'vertical', margin: 6 } }, symbolStrokeWidth: 1.8, columns: 2, columnPadding: 14, labelLimit: 150 },
    header: { labelColor: ROLE.ink, labelFontSize: TYPE.label, labelFontWeight: 600, titleColor: ROLE.ink },
    range: { category: CATEGORY },
    mark: { color: ROLE.data },
    text: { color: ROLE.ink, fontSize: TYPE.label },
    // Axis tick labels follow the shared number policy (src/format/number.ts).
    numberFormat: AXIS_NUMBER_FORMAT,
  };
}

/** The theme as CSS custom properties (`--chart-data: #2b3a8f; …`), for pages that match the charts. */
export function cssCustomProperties(): string {
  const vars: [string, string][] = [
    ['--chart-font', FONT],
    ...Object.entries(ROLE).map(([k, v]): [string, string] => [`--chart-${k}`, v]),
    ...CATEGORY.map((c, i): [string, string] => [`--chart-series-${i + 1}`, c]),
  ];
  return vars.map(([k, v]) => `${k}: ${v};`).join(' ');
}
