/**
 * Number and label formatting shared by chart builders and their text alternatives.
 */
import type { MeasureName, MeasureResult } from '../types.ts';
import { DIGITS, formatLevel, formatNumber } from '../format/number.ts';
import { themeConfig, CHART_HEIGHT, CHART_WIDTH, SUBTITLE_CHARS, TITLE_CHARS } from './theme.ts';
import { pushAll } from '../util/arrays.ts';

/** Significant digits used in chart descriptions and labels (the shared policy's). */
export const DESCRIPTION_DIGITS = DIGITS;

/**
 * `x` under Lacuna's one number policy (`src/format/number.ts`, shared with the pages): whole
 * numbers in full (`9,596`), others to `digits` significant digits (`0.495`, `4.46`, `0.0500`);
 * `null` → "n/a" (read aloud better than a dash in a text alternative).
 */
export function fmt(x: number | null | undefined, digits = DESCRIPTION_DIGITS): string {
  return formatNumber(x, { digits, absent: 'n/a' });
}

/** A confidence level as a percentage: 0.95 → "95%". */
export function pct(level: number | null | undefined): string {
  return formatLevel(level, 'n/a');
}

/** "95% CI 0.609–0.771 (BCa)" or "" when the measure has no interval. */
export function intervalPhrase(m: Pick<MeasureResult, 'interval' | 'level' | 'method'>): string {
  if (!m.interval) return '';
  const level = m.level === null ? '' : `${pct(m.level)} `;
  const method = m.method === 'bca' ? ' (BCa bootstrap)' : m.method === 'percentile' ? ' (percentile bootstrap)' : '';
  return `${level}CI ${fmt(m.interval[0])} to ${fmt(m.interval[1])}${method}`;
}

/** "0.692 (95% CI 0.609 to 0.771 (BCa bootstrap), n = 11)" — estimate, interval and n in words. */
/** `0.991 [0.989, 0.994]` (the interval when there is one), or `no estimate`: a chart's legend words. */
export function estimateWithInterval(m: MeasureResult): string {
  return m.estimate === null ? 'no estimate' : `${fmt(m.estimate)}${m.interval ? ` [${fmt(m.interval[0])}, ${fmt(m.interval[1])}]` : ''}`;
}

export function estimatePhrase(m: MeasureResult): string {
  if (m.estimate === null) return `no estimate${m.note ? ` (${m.note})` : ''}, n = ${m.n}`;
  const ci = intervalPhrase(m);
  const noInterval = !ci && m.note ? `; no interval: ${m.note}` : '';
  return `${fmt(m.estimate)} (${ci ? `${ci}, ` : ''}n = ${m.n}${m.excluded ? `, ${m.excluded} excluded` : ''})${noInterval}`;
}

const LABELS: Record<MeasureName, string> = {
  population_sparseness: 'population sparseness',
  lifetime_sparseness: 'lifetime sparseness',
  kurtosis: 'excess kurtosis',
  density: 'density',
  hoyer: 'Hoyer sparseness',
  gini: 'Gini index',
  activity_ratio: 'activity ratio',
  graph_density: 'graph density',
};

/** Labels of event-only measures (shown after "event "). */
const EVENT_LABELS: Record<string, string> = { l0: 'count (L0)' };

/** Human label of a measure name. */
export function measureLabel(name: MeasureName | string): string {
  return (LABELS as Record<string, string>)[name] ?? EVENT_LABELS[name] ?? name.replace(/_/g, ' ');
}

/** A stable, id-safe slug: lower case letters, digits and single hyphens. */
export function slug(s: string): string {
  return s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'x';
}

/**
 * Break `text` into lines of at most `max` characters, at " · " separators first, then at
 * spaces; a single word longer than `max` stays whole. Vega draws an array title as lines.
 */
export function wrapLines(text: string, max: number): string[] {
  const lines: string[] = [];
  for (const part of text.split(' · ')) {
    const last = lines[lines.length - 1];
    if (last !== undefined && last.length + 3 + part.length <= max) {
      lines[lines.length - 1] = `${last} · ${part}`;
      continue;
    }
    let line = '';
    for (const word of part.split(' ')) {
      if (line && line.length + 1 + word.length > max) {
        lines.push(line);
        line = word;
      } else line = line ? `${line} ${word}` : word;
    }
    if (line) lines.push(line);
  }
  return lines;
}

/** A title as one line, or as lines broken at " — " and then at spaces when it is too long. */
export function titleLines(title: string): string | string[] {
  if (title.length <= TITLE_CHARS) return title;
  const [head, ...rest] = title.split(' — ');
  const lines = wrapLines(head!, TITLE_CHARS);
  for (const part of rest) pushAll(lines, wrapLines(`— ${part}`, TITLE_CHARS));
  return lines;
}

/**
 * The top-level frame every chart spec shares: schema, text alternative, size, theme. A long
 * title breaks at its " — " and a subtitle at its " · " into lines that fit the chart's width,
 * so no text widens the SVG beyond what a phone column shows at a legible size.
 */
export function frame(
  title: string,
  description: string,
  body: Record<string, unknown>,
  opts: { width?: number; height?: number; subtitle?: string; noSize?: boolean } = {},
): Record<string, unknown> {
  const dims = opts.noSize ? {} : { width: opts.width ?? CHART_WIDTH, height: opts.height ?? CHART_HEIGHT };
  const text = titleLines(title);
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: opts.subtitle ? { text, subtitle: wrapLines(opts.subtitle, SUBTITLE_CHARS) } : { text },
    description,
    ...dims,
    ...body,
    config: themeConfig(),
  };
}
