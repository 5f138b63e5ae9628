/**
 * Number and label formatting shared by chart builders and their text alternatives.
 */
import type { MeasureName, MeasureResult } from '../types.ts';
import { themeConfig, CHART_HEIGHT, CHART_WIDTH } from './theme.ts';

/** Significant digits used in chart descriptions and labels. */
export const DESCRIPTION_DIGITS = 3;

/**
 * `x` to `digits` significant digits, without trailing zeros ("0.495", "4.46", "2000");
 * `null`/non-finite → "n/a".
 */
export function fmt(x: number | null | undefined, digits = DESCRIPTION_DIGITS): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  return String(Number(x.toPrecision(digits)));
}

/** "95% CI 0.609–0.771 (BCa)" or "" when the measure has no interval. */
export function intervalPhrase(m: Pick<MeasureResult, 'interval' | 'level' | 'method'>): string {
  if (!m.interval) return '';
  const level = m.level === null ? '' : `${fmt(m.level * 100, 4)}% `;
  const method = m.method === 'bca' ? ' (BCa bootstrap)' : m.method === 'percentile' ? ' (percentile bootstrap)' : '';
  return `${level}CI ${fmt(m.interval[0])} to ${fmt(m.interval[1])}${method}`;
}

/** "0.692 (95% CI 0.609 to 0.771 (BCa bootstrap), n = 11)" — estimate, interval and n in words. */
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

/** Human label of a measure name. */
export function measureLabel(name: MeasureName | string): string {
  return (LABELS as Record<string, string>)[name] ?? name.replace(/_/g, ' ');
}

/** A stable, id-safe slug: lower case letters, digits and single hyphens. */
export function slug(s: string): string {
  return s.toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-+|-+$/g, '') || 'x';
}

/** The top-level frame every chart spec shares: schema, text alternative, size, theme. */
export function frame(
  title: string,
  description: string,
  body: Record<string, unknown>,
  opts: { width?: number; height?: number; subtitle?: string; noSize?: boolean } = {},
): Record<string, unknown> {
  const dims = opts.noSize ? {} : { width: opts.width ?? CHART_WIDTH, height: opts.height ?? CHART_HEIGHT };
  return {
    $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
    title: opts.subtitle ? { text: title, subtitle: opts.subtitle } : title,
    description,
    ...dims,
    ...body,
    config: themeConfig(),
  };
}
