/**
 * How numbers, dates, sizes and names are written on report pages. Plain string functions, so a
 * page model can be tested without running Eleventy. Every function returns text (never HTML):
 * the templates escape it.
 */
import type { IntervalMethod, MeasureName, MeasureResult } from '../types.ts';
import { NONE as SHARED_NONE, formatCount as sharedCount, formatLevel as sharedLevel, formatNumber as sharedNumber } from '../format/number.ts';

/** Shown where a number is absent; the page always says why next to it. */
export const NONE = SHARED_NONE;

/**
 * A measured value under Lacuna's one number policy (`src/format/number.ts`, shared with the
 * charts): whole numbers in full (`9,596`), others to three significant digits (`0.421`, `0.0500`),
 * exponent form only below 0.001 or from a million (`1.23e-4`); `null` gives `—`.
 */
export function formatNumber(x: number | null | undefined, digits = 3): string {
  return sharedNumber(x, { digits, absent: NONE });
}

/** A count with thousands separators: `12,345`. */
export function formatCount(n: number | null | undefined): string {
  return sharedCount(n, NONE);
}

/** `[0.401, 0.447]`, or `—` when there is no interval. */
export function formatInterval(iv: [number, number] | null | undefined): string {
  if (!iv) return NONE;
  return `[${formatNumber(iv[0])}, ${formatNumber(iv[1])}]`;
}

/** Confidence level as a percentage: 0.95 → `95%`, 0.995 → `99.5%`. */
export function formatLevel(level: number | null | undefined): string {
  return sharedLevel(level, NONE);
}

/** The interval method in words. */
export function formatMethod(method: IntervalMethod | null | undefined): string {
  if (method === 'bca') return 'BCa bootstrap';
  if (method === 'percentile') return 'percentile bootstrap';
  return NONE;
}

/** One line that says what an interval is: `95% BCa bootstrap, 2,000 resamples of units`. */
export function describeInterval(m: MeasureResult): string {
  if (!m.interval) return m.note ? `no interval: ${m.note}` : 'no interval';
  const r = m.intervalRecord;
  const head = `${formatLevel(m.level)} ${formatMethod(m.method)}`;
  if (!r) return head;
  const block = r.blockLength !== null ? `, blocks of ${formatCount(r.blockLength)} bins (${r.blockLengthChoice ?? 'set'})` : '';
  return `${head}, ${formatCount(r.resamples)} resamples of ${r.resampling}${block}, seed ${r.seed}`;
}

/** File size: `1.2 MiB`, with the exact byte count kept for the title attribute by the caller. */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 0) return NONE;
  if (bytes < 1024) return `${bytes} B`;
  const units = ['KiB', 'MiB', 'GiB', 'TiB'];
  let v = bytes / 1024;
  let i = 0;
  while (v >= 1024 && i < units.length - 1) {
    v /= 1024;
    i++;
  }
  return `${v.toFixed(v < 10 ? 1 : 0)} ${units[i]}`;
}

/** An ISO timestamp as `2025-03-01 14:02 UTC`; text that is not a date is returned unchanged. */
export function formatDate(iso: string): string {
  const t = Date.parse(iso);
  if (Number.isNaN(t)) return iso;
  const d = new Date(t).toISOString();
  return `${d.slice(0, 10)} ${d.slice(11, 16)} UTC`;
}

const MEASURE_LABELS: Record<string, string> = {
  population_sparseness: 'Population sparseness',
  lifetime_sparseness: 'Lifetime sparseness',
  kurtosis: 'Kurtosis',
  density: 'Density',
  graph_density: 'Graph density',
  hoyer: 'Hoyer sparseness',
  gini: 'Gini index',
  activity_ratio: 'Activity ratio',
  l0: 'Event count (L0)',
};

/** A measure name for people: `population_sparseness` → `Population sparseness`. */
export function measureLabel(name: MeasureName | string): string {
  return MEASURE_LABELS[name] ?? name.replace(/_/g, ' ');
}

/** A parameter value as short text: strings bare, everything else as compact JSON. */
export function formatValue(v: unknown): string {
  if (typeof v === 'string') return v;
  if (v === undefined) return 'not set';
  return JSON.stringify(v) ?? String(v);
}

/**
 * An id safe to use in an HTML `id` attribute or a file name: letters, digits, `-`, `_`, `.`;
 * anything else becomes `-`; a leading dot or dash is prefixed with `x`. Never empty.
 */
export function slug(text: string): string {
  const s = text.replace(/[^A-Za-z0-9._-]+/g, '-').slice(0, 80);
  if (s === '' || /^[.-]/.test(s)) return `x${s}`;
  return s;
}

/** Make slugs unique within one page by appending `-2`, `-3`, … */
export function uniqueSlugger(): (text: string) => string {
  const seen = new Map<string, number>();
  return (text) => {
    const base = slug(text);
    const k = (seen.get(base) ?? 0) + 1;
    seen.set(base, k);
    return k === 1 ? base : `${base}-${k}`;
  };
}
