/**
 * The report page (`index.html` of a version) as plain text fields for the templates: every
 * number already written out with what it is, its interval and n. No HTML here except
 * `notesHtml` and `methodsHtml`, which come from `renderMarkdown` (escaped, links checked).
 */
import type { AuditResult, DatasetResult, Finding, FindingLevel, MeasureResult } from '../types.ts';
import { FINDING_LEVELS } from '../types.ts';
import type { ChartModel } from './site-charts.ts';
import { isDriftChart } from './site-charts.ts';
import { describeInterval, formatBytes, formatCount, formatDate, formatInterval, formatLevel, formatMethod, formatNumber, formatValue, measureLabel } from './site-format.ts';
import { renderMarkdown } from './markdown.ts';
import { pushAll } from '../util/arrays.ts';

export interface SummaryRow {
  dataset: string;
  datasetAnchor: string;
  measure: string;
  /** `event-based` for event measures, '' otherwise. */
  variant: string;
  estimate: string;
  interval: string;
  level: string;
  method: string;
  intervalDetail: string;
  n: string;
  excluded: string;
  summary: string;
  note: string;
}

export interface FindingItem {
  dataset: string;
  datasetAnchor: string;
  code: string;
  message: string;
  where: string[];
  count: string;
}

export interface FindingGroup {
  level: FindingLevel;
  /** What the level means, in one sentence. */
  meaning: string;
  items: FindingItem[];
  /** Number of findings at this level (each item carries its own count of units, bins or files). */
  findings: number;
}

export interface DatasetSection {
  id: string;
  anchor: string;
  kind: string;
  shape: string;
  month: string;
  group: string;
  files: { path: string; sha256: string; size: string; bytes: string }[];
  findings: { exclude: number; caution: number; notice: number };
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
  /** Whether the provenance block starts open (closed when the input list is long). */
  provenanceOpen: boolean;
  summaryGroups: { dataset: string; anchor: string; rows: SummaryRow[] }[];
  summaryCount: number;
  findingGroups: FindingGroup[];
  datasets: DatasetSection[];
  overviewCharts: ChartModel[];
  methodsHtml: string;
  methodsPlain: string;
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

export const LEVEL_MEANING: Record<FindingLevel, string> = {
  exclude: 'Data were left out of a measure; every excluded item is counted in the summary table.',
  caution: 'The numbers stand, but read them with this in mind.',
  notice: 'Worth knowing; no number changed because of it.',
};

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

function measureEntries(ds: DatasetResult): [string, MeasureResult][] {
  const plain = Object.entries(ds.measures) as [string, MeasureResult][];
  const events = (Object.entries(ds.eventMeasures ?? {}) as [string, MeasureResult][]).map(([k, m]) => [`${k} (event-based)`, m] as [string, MeasureResult]);
  return [...plain, ...events];
}

function summaryRow(ds: DatasetResult, anchor: string, name: string, m: MeasureResult, event: boolean): SummaryRow {
  return {
    dataset: ds.id,
    datasetAnchor: anchor,
    measure: measureLabel(name),
    variant: event ? 'event-based' : '',
    estimate: formatNumber(m.estimate),
    interval: formatInterval(m.interval),
    level: m.interval ? formatLevel(m.level) : '',
    method: m.interval ? formatMethod(m.method) : '',
    intervalDetail: describeInterval(m),
    n: formatCount(m.n),
    excluded: formatCount(m.excluded),
    summary: m.summary,
    note: m.note ?? (m.estimate === null ? 'no estimate' : ''),
  };
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

/** Group every dataset's findings by level, most serious first; empty levels are kept (and say so). */
export function groupFindings(result: AuditResult, anchors: Map<string, string>): FindingGroup[] {
  return FINDING_LEVELS.map((level) => {
    const items: FindingItem[] = [];
    for (const ds of result.datasets) {
      for (const f of ds.findings) {
        if (f.level !== level) continue;
        items.push({ dataset: ds.id, datasetAnchor: anchors.get(ds.id) ?? '', code: f.code, message: f.message, where: f.where, count: formatCount(f.count) });
      }
    }
    return { level, meaning: LEVEL_MEANING[level], items, findings: items.length };
  });
}

/** The downloads every version folder holds (figures are listed per chart). */
export const DOWNLOADS: Download[] = [
  { file: 'results.json', label: 'results.json', what: 'everything on this page, machine-readable (the audit result)' },
  { file: 'summary.csv', label: 'summary.csv', what: 'the summary table as comma-separated values' },
  { file: 'summary.md', label: 'summary.md', what: 'the summary table as a Markdown table' },
  { file: 'summary.tex', label: 'summary.tex', what: 'the summary table as a LaTeX tabular' },
  { file: 'methods.md', label: 'methods.md', what: 'the methods paragraph, ready to paste' },
  { file: 'references.bib', label: 'references.bib', what: 'BibTeX entries for the methods cited' },
];

/**
 * Build the report page model. `anchorFor` hands out unique ids; `charts` are already prepared
 * (`chartModels`), and charts with a `datasetId` go to that dataset's section, drift charts to
 * the drift page, the rest to an overview section.
 */
export function reportModel(
  result: AuditResult,
  charts: ChartModel[],
  texts: ReportTexts,
  extra: { hasCompare: boolean; anchorFor: (text: string) => string; figures: { file: string; title: string }[] },
): ReportModel {
  const anchors = new Map(result.datasets.map((ds) => [ds.id, extra.anchorFor(`ds-${ds.id}`)]));
  const pageCharts = charts.filter((c) => !isDriftChart(c));
  const summaryGroups = result.datasets.map((ds) => {
    const a = anchors.get(ds.id) ?? '';
    const rows = [
      ...(Object.entries(ds.measures) as [string, MeasureResult][]).map(([k, m]) => summaryRow(ds, a, k, m, false)),
      ...(Object.entries(ds.eventMeasures ?? {}) as [string, MeasureResult][]).map(([k, m]) => summaryRow(ds, a, k, m, true)),
    ];
    return { dataset: ds.id, anchor: a, rows };
  }).filter((g) => g.rows.length > 0);
  return {
    audit: result.audit,
    title: result.title,
    version: result.version,
    created: formatDate(result.created),
    tool: `${result.tool.name} ${result.tool.version}`,
    node: result.tool.node,
    commit: result.tool.commit ?? 'not recorded (workspace is not a git repository, or git was unavailable)',
    provenance: {
      inputs: fileRows(result.inputs),
      manifest: result.manifest,
      parameters: flattenParameters(result.parameters),
      seeds: collectSeeds(result),
    },
    provenanceOpen: result.inputs.length <= 12,
    summaryGroups,
    summaryCount: summaryGroups.reduce((k, g) => k + g.rows.length, 0),
    findingGroups: groupFindings(result, anchors),
    datasets: result.datasets.map((ds) => ({
      id: ds.id,
      anchor: anchors.get(ds.id) ?? '',
      kind: ds.kind,
      shape: ds.kind === 'activity' && ds.shape.length === 2 ? `${formatCount(ds.shape[0])} units × ${formatCount(ds.shape[1])} bins` : ds.shape.length ? ds.shape.join(' × ') : 'several tensors (see charts)',
      month: ds.month ?? 'not set',
      group: ds.group ?? 'not set',
      files: fileRows(ds.files),
      findings: countLevels(ds.findings),
      sentences: [
        ...(Object.entries(ds.measures) as [string, MeasureResult][]).map(([k, m]) => measureSentence(k, m, false)),
        ...(Object.entries(ds.eventMeasures ?? {}) as [string, MeasureResult][]).map(([k, m]) => measureSentence(k, m, true)),
      ],
      charts: pageCharts.filter((c) => c.datasetId === ds.id),
    })),
    overviewCharts: pageCharts.filter((c) => c.datasetId === null || !anchors.has(c.datasetId)),
    methodsHtml: renderMarkdown(texts.methods.markdown, 3),
    methodsPlain: texts.methods.plain,
    cautions: texts.cautions,
    notesHtml: renderMarkdown(result.notes, 3),
    downloads: DOWNLOADS,
    figures: extra.figures,
    hasDrift: result.drift !== null,
    hasCompare: extra.hasCompare,
  };
}
