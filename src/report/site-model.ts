/**
 * The report page (`index.html` of a version) as plain text fields for the templates: every
 * number already written out with what it is, its interval and n. No HTML here except
 * `notesHtml` and `methodsHtml`, which come from `renderMarkdown` (escaped, links checked).
 */
import type { AuditResult, DatasetResult, Finding, FindingLevel, MeasureResult } from '../types.ts';
import type { ChartModel } from './site-charts.ts';
import { isDriftChart } from './site-charts.ts';
import { describeInterval, formatBytes, formatCount, formatDate, formatInterval, formatNumber, formatValue, measureLabel, uniqueSlugger } from './site-format.ts';
import { findingKind, siteData } from './site-data.ts';
import type { FindingKindItem, OverviewModel } from './site-overview.ts';
import { findingKinds, measureEntries, overviewModel, verdictSentences } from './site-overview.ts';
import { renderMarkdown } from './markdown.ts';
import { pushAll } from '../util/arrays.ts';

export interface DatasetSection {
  id: string;
  /** Link from the version page to the dataset's own page. */
  href: string;
  kind: string;
  shape: string;
  month: string;
  group: string;
  files: { path: string; sha256: string; size: string; bytes: string }[];
  findings: { exclude: number; caution: number; notice: number };
  /** Every finding of the dataset, most serious level first, in words. */
  findingList: { level: FindingLevel; kind: string; code: string; message: string; where: string[]; count: string }[];
  /** One sentence per measure: estimate, interval (level, method, resampling, seed), n, excluded. */
  sentences: string[];
  charts: ChartModel[];
}

export interface Download {
  file: string;
  label: string;
  what: string;
}

export interface ReportModel {
  audit: string;
  title: string;
  version: string;
  created: string;
  tool: string;
  node: string;
  commit: string;
  provenance: {
    inputs: { path: string; sha256: string; size: string; bytes: string }[];
    manifest: { path: string; sha256: string };
    parameters: { name: string; value: string }[];
    seeds: string[];
  };
  /** One line for the closed provenance block: files, total size, manifest hash. */
  provenanceLine: string;
  /** The verdict paragraph, sentence by sentence. */
  verdict: string[];
  overview: OverviewModel;
  /** Findings grouped by kind, most serious level first. */
  findingKinds: FindingKindItem[];
  /** What each level means for the reader, in level order. */
  levels: { level: FindingLevel; title: string; meaning: string; count: number }[];
  /** One chart per measure across datasets (`across-` charts without a dataset). */
  acrossCharts: ChartModel[];
  methodsHtml: string;
  cautions: string[];
  notesHtml: string;
  downloads: Download[];
  /** Every figure file of the version (drift charts included), for the downloads list. */
  figures: { file: string; title: string }[];
  hasDrift: boolean;
  hasCompare: boolean;
}

/** Words and sentences from `src/report/methods.ts` (or a stand-in), handed to the model. */
export interface ReportTexts {
  methods: { markdown: string; plain: string };
  cautions: string[];
}

/** Flatten nested parameters to dotted names: `bootstrap.seed = 20240117`. */
export function flattenParameters(params: Record<string, unknown>, prefix = ''): { name: string; value: string }[] {
  const out: { name: string; value: string }[] = [];
  for (const [k, v] of Object.entries(params)) {
    const name = prefix ? `${prefix}.${k}` : k;
    if (v !== null && typeof v === 'object' && !Array.isArray(v)) pushAll(out, flattenParameters(v as Record<string, unknown>, name));
    else out.push({ name, value: formatValue(v) });
  }
  return out;
}

/**
 * Every seed used: parameters whose name mentions `seed`, then each distinct seed recorded on an
 * interval with the number of intervals that used it (`seed 20240117 — 14 intervals`).
 */
export function collectSeeds(result: AuditResult): string[] {
  const out: string[] = [];
  for (const p of flattenParameters(result.parameters)) if (/seed/i.test(p.name)) out.push(`${p.name} = ${p.value}`);
  const perSeed = new Map<number, number>();
  for (const ds of result.datasets) {
    for (const [, m] of measureEntries(ds)) {
      if (m.intervalRecord) perSeed.set(m.intervalRecord.seed, (perSeed.get(m.intervalRecord.seed) ?? 0) + 1);
    }
  }
  for (const [seed, k] of perSeed) out.push(`seed ${seed} used by ${k} bootstrap ${k === 1 ? 'interval' : 'intervals'}`);
  return out;
}

/** `Lifetime sparseness 0.692, 95% BCa bootstrap interval [0.609, 0.771] (…), n = 11, 1 excluded. Mean over …` */
export function measureSentence(name: string, m: MeasureResult, event: boolean): string {
  const label = `${measureLabel(name)}${event ? ' (event-based)' : ''}`;
  const est = m.estimate === null ? `no estimate${m.note ? ` (${m.note})` : ''}` : formatNumber(m.estimate);
  const iv = m.interval ? `, ${formatInterval(m.interval)} (${describeInterval(m)})` : m.estimate === null ? '' : `, ${describeInterval(m)}`;
  return `${label}: ${est}${iv}; n = ${formatCount(m.n)}, excluded ${formatCount(m.excluded)}. Summarises: ${m.summary}.`;
}

function fileRows(files: AuditResult['inputs']) {
  return files.map((f) => ({ path: f.path, sha256: f.sha256, size: formatBytes(f.bytes), bytes: `${formatCount(f.bytes)} bytes` }));
}

function countLevels(findings: Finding[]) {
  const c = { exclude: 0, caution: 0, notice: 0 };
  for (const f of findings) c[f.level]++;
  return c;
}

/** Where a dataset's own page lives, relative to the version folder (`datasets/<slug>/`). */
export function datasetPaths(result: AuditResult): Map<string, string> {
  const slugger = uniqueSlugger();
  return new Map(result.datasets.map((ds) => [ds.id, `datasets/${slugger(ds.id)}/`]));
}

/** Everything a dataset's own page shows: facts, charts, findings, files, each measure in words. */
export function datasetSection(ds: DatasetResult, href: string, charts: ChartModel[]): DatasetSection {
  const order = siteData().levels.order;
  return {
    id: ds.id,
    href,
    kind: ds.kind,
    shape: ds.kind === 'activity' && ds.shape.length === 2 ? `${formatCount(ds.shape[0])} units × ${formatCount(ds.shape[1])} bins` : ds.shape.length ? ds.shape.join(' × ') : 'several tensors (see charts)',
    month: ds.month ?? 'not set',
    group: ds.group ?? 'not set',
    files: fileRows(ds.files),
    findings: countLevels(ds.findings),
    findingList: [...ds.findings]
      .sort((x, y) => order.indexOf(x.level) - order.indexOf(y.level))
      .map((f) => ({ level: f.level, kind: findingKind(f.code), code: f.code, message: f.message, where: f.where, count: formatCount(f.count) })),
    sentences: [
      ...(Object.entries(ds.measures) as [string, MeasureResult][]).map(([k, m]) => measureSentence(k, m, false)),
      ...(Object.entries(ds.eventMeasures ?? {}) as [string, MeasureResult][]).map(([k, m]) => measureSentence(k, m, true)),
    ],
    charts,
  };
}

/** The downloads every version folder holds (figures are listed per chart). */
export const DOWNLOADS: Download[] = [
  { file: 'results.json', label: 'results.json', what: 'everything on this page, machine-readable (the audit result)' },
  { file: 'summary.csv', label: 'summary.csv', what: 'the summary table as comma-separated values' },
  { file: 'summary.md', label: 'summary.md', what: 'the summary table as a Markdown table' },
  { file: 'summary.tex', label: 'summary.tex', what: 'the overview table (a row per dataset, a column per measure) as a LaTeX longtable; the packages it needs are named at its top' },
  { file: 'methods.md', label: 'methods.md', what: 'the methods paragraph as Markdown' },
  { file: 'methods.txt', label: 'methods.txt', what: 'the methods paragraph as plain text, ready to paste' },
  { file: 'references.bib', label: 'references.bib', what: 'BibTeX entries for the methods cited' },
];

/**
 * Build the version page model. `charts` are already prepared (`chartModels`); only charts
 * across datasets (no `datasetId`, not drift) appear here: each dataset's charts are on its own
 * page (`datasetSection`).
 */
export function reportModel(
  result: AuditResult,
  charts: ChartModel[],
  texts: ReportTexts,
  extra: { hasCompare: boolean; figures: { file: string; title: string }[]; datasetHref: Map<string, string> },
): ReportModel {
  const hrefFor = (id: string) => `${extra.datasetHref.get(id) ?? ''}index.html`;
  const data = siteData().levels;
  const bytes = result.inputs.reduce((k, f) => k + f.bytes, 0);
  return {
    audit: result.audit,
    title: result.title,
    version: result.version,
    created: formatDate(result.created),
    tool: `${result.tool.name} ${result.tool.version}${result.tool.sourceCommit ? ` (source commit ${result.tool.sourceCommit.slice(0, 12)})` : ''}`,
    node: result.tool.node,
    commit: result.tool.commit
      ? `${result.tool.commit}${result.tool.workspaceDirty ? ' (with uncommitted changes when built)' : ''}`
      : 'not recorded (workspace is not a git repository, or git was unavailable)',
    provenance: {
      inputs: fileRows(result.inputs),
      manifest: result.manifest,
      parameters: flattenParameters(result.parameters),
      seeds: collectSeeds(result),
    },
    provenanceLine: `${formatCount(result.inputs.length)} input ${result.inputs.length === 1 ? 'file' : 'files'}, ${formatBytes(bytes)} in total; manifest SHA-256 ${result.manifest.sha256.slice(0, 12)}…`,
    verdict: verdictSentences(result),
    overview: overviewModel(result, hrefFor),
    findingKinds: findingKinds(result, hrefFor),
    levels: data.order.map((level) => ({
      level,
      title: data.levels[level].title,
      meaning: data.levels[level].meaning,
      count: result.datasets.reduce((k, d) => k + d.findings.filter((f) => f.level === level).length, 0),
    })),
    // Their captions list every dataset's estimate and interval, as the overview table does: folded.
    acrossCharts: charts.filter((c) => !isDriftChart(c) && (c.datasetId === null || !extra.datasetHref.has(c.datasetId))).map((c) => ({ ...c, foldCaption: true })),
    methodsHtml: renderMarkdown(texts.methods.markdown, 3),
    cautions: texts.cautions,
    notesHtml: renderMarkdown(result.notes, 3),
    downloads: DOWNLOADS,
    figures: extra.figures,
    hasDrift: result.drift !== null,
    hasCompare: extra.hasCompare,
  };
}
