/**
 * Site-wide words kept as data in the top-level `_data/` folder (Eleventy's global data folder):
 * the measure glossary, what each finding level means, the names of finding kinds and page
 * labels. The report pages, the methods text and the README's measure table all read them from
 * there, so a definition is written once.
 *
 * `_data/` holds JSON only (a test checks it): Eleventy would run a `.js` data file, and the
 * shared Eleventy rules (`.eleventy.js`) switch its data folder off anyway. The files are read
 * here with `JSON.parse` and handed to the templates as plain values. The folder sits two levels
 * above this file in both `src/report/` and the compiled `dist/report/`.
 */
import { readFileSync } from 'node:fs';
import type { FindingLevel } from '../types.ts';
import { InternalError } from '../errors.ts';

export interface GlossaryRow {
  /** The term as the README's measure table names it (Markdown emphasis allowed). */
  term: string;
  formula: string;
  /** The published source in words (Markdown). */
  source: string;
  /** Keys into `citations.ts`. */
  citations: string[];
  /** Measure names (`MeasureName`, or `l0`) this row defines. */
  measures: string[];
}

export interface SiteData {
  measures: { glossary: GlossaryRow[] };
  levels: { order: FindingLevel[]; levels: Record<FindingLevel, { title: string; meaning: string; affectsNumbers: boolean }> };
  findings: { kinds: Record<string, string> };
  labels: Record<string, string>;
}

/** The `_data/` folder. */
export const DATA_DIR = new URL('../../_data/', import.meta.url);

let cached: SiteData | null = null;

function read(name: string): unknown {
  const url = new URL(`${name}.json`, DATA_DIR);
  try {
    return JSON.parse(readFileSync(url, 'utf8')) as unknown;
  } catch (err) {
    throw new InternalError(`site data ${url.pathname} could not be read as JSON`, err);
  }
}

/** Every file of `_data/`, read once per process. */
export function siteData(): SiteData {
  cached ??= {
    measures: read('measures') as SiteData['measures'],
    levels: read('levels') as SiteData['levels'],
    findings: read('findings') as SiteData['findings'],
    labels: read('labels') as SiteData['labels'],
  };
  return cached;
}

/** A finding kind in words (`duplicate-units` → `duplicated units`); unknown codes in plain words. */
export function findingKind(code: string): string {
  return siteData().findings.kinds[code] ?? code.replace(/-/g, ' ');
}

/** The README's measure table, generated from the glossary (pipes in cells escaped for Markdown). */
export function readmeMeasureTable(): string {
  const cell = (s: string) => s.replace(/\|/g, '\\|');
  const rows = siteData().measures.glossary.map((g) => `| ${cell(g.term)} | ${cell(g.formula)} | ${cell(g.source)} |`);
  return ['| measure | formula | source |', '|---|---|---|', ...rows].join('\n');
}
